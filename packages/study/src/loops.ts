/**
 * The loops table: every cut (or one proposed on each feedback wire) read with every other
 * loop closed and, where loops enclose it, inner-first (those opened), each with the number of
 * open-loop right-half-plane poles of its L; separation ratios of nested loops; and for every
 * nested pair the outer loop with the real inner loop against an ideal one — both curves and
 * both margin rows in one configuration (the loops around the outer one opened).
 */
import { DEFAULT_PADE_ORDER, analyseLoops, type CutAnalysis, type Diagram } from '@loopwright/graph';
import { marginFigures, type Complex } from '@loopwright/lti';
import { liveReader } from './affine-loop.ts';
import { without } from './split.ts';
import { engineParameterName, withLiveValue } from './sweep-target.ts';
import { frequencyOfLoop } from './cuts.ts';
import { bodeOf, rhpPoleCount, sharedGrid, transferData } from './transfer-data.ts';
import type { LiveValue, LoopReading, LoopRow, LoopsData, OuterIdealData } from './types.ts';
import { assertAnalysable } from './validate.ts';
import { loopAdvice } from './loop-advice.ts';
import { loopName } from './names.ts';
import { polesStudy } from './poles.ts';

export interface LoopsRequest {
  overrides?: Record<string, number>;
  live?: LiveValue | null;
  padeOrder?: number;
  /** Also give every row's Bode, Nyquist, |S| and |T| data (every other loop closed), e.g. for a report. */
  frequency?: boolean;
  /** false: recompute in full at the live value (the check of the precomputed path). */
  affine?: boolean;
}

const plain = (c: Complex) => ({ re: c.re, im: c.im });

export function loopsStudy(d: Diagram, req: LoopsRequest = {}, deadline?: number): LoopsData {
  const { diagram, overrides } = withLiveValue(d, req.overrides ?? {}, req.live);
  assertAnalysable(diagram, req.live ? without(overrides, engineParameterName(req.live.target)) : overrides, deadline);
  const padeOrder = req.padeOrder ?? DEFAULT_PADE_ORDER;
  const live = liveReader(diagram, overrides, req.affine === false ? null : req.live, padeOrder, deadline);
  const rep = analyseLoops(diagram, overrides, { padeOrder, ...(deadline !== undefined ? { deadline } : {}) }, live.reader);
  // Opened loops are given by their cut ids; every view names them by loopName (one name per
  // loop across table, canvas and report).
  const cutOfWire = new Map(rep.cuts.map((c) => [c.wire, c.cut]));
  const ids = (wires: readonly string[]) => wires.map((w) => cutOfWire.get(w) ?? w);
  const names: Record<string, string> = Object.fromEntries(rep.cuts.map((c) => [c.cut, loopName(diagram, c.cut)]));
  const rows: LoopRow[] = rep.cuts.map((c) => {
    const margins = marginFigures(c.margins);
    const openLoopRhpPoles = rhpPoleCount(c.loop);
    const alone: LoopReading | null = c.alone.opened.length
      ? {
          loop: transferData(c.alone.loop),
          margins: marginFigures(c.alone.margins),
          openLoopRhpPoles: rhpPoleCount(c.alone.loop),
          opened: ids(c.alone.opened),
        }
      : null;
    return {
      cutId: c.cut,
      wire: c.wire,
      label: names[c.cut],
      auto: c.auto,
      stable: c.stable,
      blocks: [...c.blocks],
      margins,
      loop: transferData(c.loop),
      openLoopRhpPoles,
      delayHandling: c.delayHandling,
      frequencyMethod: { ...c.frequency },
      notes: [...c.margins.notes],
      hiddenModes: c.hiddenModes.map(plain),
      frequency: req.frequency
        ? {
            ...frequencyOfLoop(
              { id: c.cut, wire: c.wire, label: names[c.cut] },
              { tf: c.loop, source: c.source, delayHandling: c.delayHandling, frequency: c.frequency },
              c.margins,
            ),
            sweepPath: live.path(),
          }
        : null,
      alone,
      advice: loopAdvice(
        margins,
        openLoopRhpPoles,
        alone,
        (alone?.opened ?? []).map((id) => names[id] ?? id),
      ),
    };
  });
  const byCut = new Map<string, CutAnalysis>(rep.cuts.map((c) => [c.cut, c]));
  const outerVsIdeal: OuterIdealData[] = [];
  for (const o of rep.outerVsIdeal) {
    const outer = byCut.get(o.outer);
    if (!outer) continue;
    // The real curve is the outer loop as read for its margins here: inner-first (outer.alone).
    // Two decades past the highest crossover of either reading is enough: beyond, a dead time
    // only winds the phase round (the Frequency view's rule too).
    const wc = [...o.real.gainCrossovers, ...o.ideal.gainCrossovers].filter((w) => w > 0 && Number.isFinite(w));
    const full = sharedGrid([o.idealLoop, outer.alone.loop]);
    const clipped = wc.length ? full.filter((w) => w <= 100 * Math.max(...wc)) : full;
    const grid = clipped.length > 20 ? clipped : full;
    const ideal = bodeOf(o.idealLoop, grid);
    const real = bodeOf(outer.alone.loop, grid);
    outerVsIdeal.push({
      outer: o.outer,
      inner: o.inner,
      omega: ideal.omega,
      realMagDb: real.magDb,
      realPhaseDeg: real.phaseDeg,
      idealMagDb: ideal.magDb,
      idealPhaseDeg: ideal.phaseDeg,
      realMargins: marginFigures(o.real),
      idealMargins: marginFigures(o.ideal),
      realLoop: transferData(outer.alone.loop),
      idealLoop: transferData(o.idealLoop),
      opened: ids(outer.alone.opened),
    });
  }
  // The closed-loop poles as the poles study finds them, each marked by Padé origin.
  const poles = polesStudy(d, { overrides: req.overrides ?? {}, live: req.live ?? null, padeOrder });
  return {
    rows,
    names,
    separations: rep.separations.map((s) => ({ ...s })),
    outerVsIdeal,
    closedLoopPoles: poles.poles,
    closedLoopPoleOrigin: poles.origin,
    delayHandling: poles.delayHandling,
    stable: poles.stable,
    notes: [...rep.notes],
    sweepPath: live.path(),
  };
}
