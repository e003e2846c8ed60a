/**
 * Cuts: which loop the Frequency view opens, and the frequency data of L there (Bode,
 * Nyquist, |S| and |T|) with its margins and the number of open-loop right-half-plane poles.
 */
import {
  DEFAULT_PADE_ORDER,
  compiledOf,
  cutLoopResponse,
  feedbackWires,
  type CutFrequencyMethod,
  type DelayHandling,
  type Diagram,
} from '@loopwright/graph';
import { InputError, defaultFrequencyGrid, marginFigures, type LoopMargins, type LoopSource, type TransferFunction } from '@loopwright/lti';
import { liveReader } from './affine-loop.ts';
import { without } from './split.ts';
import { engineParameterName, withLiveValue } from './sweep-target.ts';
import { rhpPoleCount, transferData } from './transfer-data.ts';
import type { FrequencyData, LiveValue } from './types.ts';
import { assertAnalysable } from './validate.ts';
import { cutName, loopName } from './names.ts';

export interface ChosenCut {
  id: string;
  wire: string;
  label: string;
  auto: boolean;
}

/**
 * The cut to open: the one asked for ("auto:<wire>" for a proposed one); else the diagram's
 * active cut, its first cut, or one proposed on the first feedback wire; null when there is
 * no loop at all. An unknown cut is an InputError unless `fallback` (the editor, whose chosen
 * cut may just have been deleted) asks for the default instead.
 */
export function chooseCut(
  d: Diagram,
  requested: string | null,
  overrides: Record<string, number> = {},
  fallback = false,
): ChosenCut | null {
  if (requested?.startsWith('auto:')) {
    const wire = requested.slice(5);
    if (d.wires.some((w) => w.id === wire)) return { id: requested, wire, label: loopName(d, requested), auto: true };
    if (!fallback) throw new InputError(`cut ${requested}: the diagram has no wire "${wire}"`, { field: 'cut' });
  } else if (requested !== null) {
    const c = d.cuts.find((x) => x.id === requested);
    if (c) return { id: c.id, wire: c.wire, label: cutName(c), auto: false };
    if (!fallback)
      throw new InputError(`cut ${requested} is not in the diagram (cuts: ${d.cuts.map((x) => x.id).join(', ') || 'none'})`, {
        field: 'cut',
      });
  }
  const c = d.cuts.find((x) => x.id === d.view.activeCut) ?? d.cuts[0];
  if (c) return { id: c.id, wire: c.wire, label: cutName(c), auto: false };
  const wire = feedbackWires(compiledOf(d, overrides))[0];
  return wire ? { id: `auto:${wire}`, wire, label: loopName(d, `auto:${wire}`), auto: true } : null;
}

export interface CutRequest {
  /** Cut id or "auto:<wire>"; null: the default cut (see chooseCut). */
  cut: string | null;
  overrides?: Record<string, number>;
  live?: LiveValue | null;
  padeOrder?: number;
  /** Fall back to the default cut when the asked one is gone (the editor). */
  fallback?: boolean;
  /** false: recompute in full at the live value (the check of the precomputed path). */
  affine?: boolean;
}

/** Frequency data of L at a cut (every other loop closed), margins marked; null when the diagram has no loop. */
export function cutStudy(d: Diagram, req: CutRequest, deadline?: number): FrequencyData | null {
  const { diagram, overrides } = withLiveValue(d, req.overrides ?? {}, req.live);
  assertAnalysable(diagram, req.live ? without(overrides, engineParameterName(req.live.target)) : overrides, deadline);
  const cut = chooseCut(diagram, req.cut, overrides, req.fallback === true);
  if (!cut) return null;
  const live = liveReader(diagram, overrides, req.affine === false ? null : req.live, req.padeOrder ?? DEFAULT_PADE_ORDER, deadline);
  const { margins, loop } = live.readClosed(cut.wire, () => compiledOf(diagram, overrides));
  return {
    ...frequencyOfLoop(
      cut,
      { tf: loop.reduction.tf, source: loop.source, delayHandling: loop.reduction.delayHandling, frequency: loop.frequency },
      margins,
    ),
    sweepPath: live.path(),
  };
}

/** A cut's loop as the frequency data need it: L(s), the exact L(jω) where that differs, and how each was formed. */
export interface LoopAtCut {
  tf: TransferFunction;
  source: LoopSource | null;
  delayHandling: DelayHandling;
  frequency: CutFrequencyMethod;
}

/** Bode, Nyquist, |S| and |T| of a loop L at a cut, on a grid that covers its crossovers, with its margins. */
export function frequencyOfLoop(cut: Pick<ChosenCut, 'id' | 'wire' | 'label'>, at: LoopAtCut, margins: LoopMargins): FrequencyData {
  const L = at.tf;
  // Two decades above the highest gain crossover (and past the phase crossover the gain margin
  // is read at) are enough: beyond, a dead time only winds the phase round and round.
  let omega = defaultFrequencyGrid(L, 60);
  const wc = margins.gainCrossovers.filter((w) => w > 0 && Number.isFinite(w));
  if (wc.length > 0) {
    const hi = Math.max(100 * Math.max(...wc), 3 * (margins.phaseCrossover ?? 0), 3 * (margins.peakSensitivityFrequency ?? 0));
    const clipped = omega.filter((w) => w <= hi);
    if (clipped.length > 20) omega = clipped;
  }
  const top = omega[omega.length - 1];
  const extra = [...margins.gainCrossovers, ...margins.phaseCrossovers].filter((w) => w > 0 && Number.isFinite(w) && w <= top);
  if (extra.length) omega = [...omega, ...extra].sort((x, y) => x - y);
  const fr = cutLoopResponse({ reduction: { tf: L }, source: at.source }, omega);
  const sensDb: number[] = [];
  const compDb: number[] = [];
  for (let i = 0; i < fr.omega.length; i++) {
    const one = Math.hypot(1 + fr.re[i], fr.im[i]);
    const l = Math.hypot(fr.re[i], fr.im[i]);
    sensDb.push(-20 * Math.log10(one));
    compDb.push(20 * Math.log10(l / one));
  }
  return {
    cutId: cut.id,
    wire: cut.wire,
    label: cut.label,
    omega: fr.omega,
    magDb: fr.magDb,
    phaseDeg: fr.phaseDeg,
    re: fr.re,
    im: fr.im,
    sensDb,
    compDb,
    margins: marginFigures(margins),
    openLoopRhpPoles: rhpPoleCount(L),
    loop: transferData(L),
    delayHandling: at.delayHandling,
    frequencyMethod: { ...at.frequency },
    notes: [...margins.notes],
  };
}
