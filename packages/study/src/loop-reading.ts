/**
 * A loop read for tuning: the loop transfer L at a cut, either with every other loop closed or
 * inner-first (the loops around it opened, as a cascade is tuned), and from it what the loop's
 * controller sees and the loop's ultimate gain.
 *
 * What the controller sees: the loop at the cut divided by the controller, P = L/C. When the
 * controller lies only on loops through the cut (the usual case, and always inner-first), L is
 * linear in C and P is read exactly as the loop with the controller replaced by a unit gain;
 * that is checked (L with the gain 2 must be twice L with the gain 1). Otherwise — an inner
 * controller read with its outer loop closed also sits in that outer loop — P = L/C by exact
 * division with today's C, and it changes with C: the result says so.
 */
import {
  DEFAULT_PADE_ORDER,
  compiledOf,
  feedbackWires,
  loopAtCutDetailed,
  resolveParams,
  blockSpec,
  sweepLocus,
  type Block,
  type DelayHandling,
  type Diagram,
} from '@loopwright/graph';
import {
  type Complex,
  InputError,
  type TransferFunction,
  cancelCommon,
  cabs,
  csub,
  cx,
  rdiv,
  tevalComplex,
  transfer,
} from '@loopwright/lti';
import { type UltimatePoint, ultimatePoint } from '@loopwright/tune';
import { type ChosenCut, chooseCut } from './cuts.ts';
import { loopBlocks, withBlockParams } from './controller-block.ts';

export type LoopReadingMode = 'closed' | 'inner-first';
export const READING_MODES: readonly LoopReadingMode[] = ['closed', 'inner-first'];

export interface LoopConfiguration {
  cut: ChosenCut;
  mode: LoopReadingMode;
  /** The cuts opened for this reading (inner-first: the loops around it), with their wires. */
  opened: { cut: string; wire: string }[];
}

/** The cuts of the loops table: the diagram's, or one proposed on each feedback wire when it has none. */
export function tableCuts(d: Diagram, overrides: Record<string, number>): { id: string; wire: string; label?: string }[] {
  if (d.cuts.length) return d.cuts;
  return feedbackWires(compiledOf(d, overrides)).map((w) => ({ id: `auto:${w}`, wire: w, label: w }));
}

/**
 * Which cut is read and which loops are opened. Inner-first opens every cut of the loops table
 * whose loop encloses this one, by the rule graph's loops table uses: loop B encloses loop A
 * when B's loop passes through the junction where A's wire enters (A's error is formed inside
 * B's forward path) and A's loop does not pass through B's.
 */
export function configureLoop(
  d: Diagram,
  requested: string | null,
  mode: LoopReadingMode,
  overrides: Record<string, number>,
): LoopConfiguration {
  if (!READING_MODES.includes(mode))
    throw new InputError(`reading: '${String(mode)}' is not one of ${READING_MODES.join(', ')}`, { field: 'reading' });
  const cut = chooseCut(d, requested, overrides);
  if (!cut) throw new InputError('the diagram has no feedback loop to tune', { field: 'cut' });
  const mine = loopBlocks(d, cut.wire);
  if (mine.size === 0) throw new InputError(`cut ${cut.id}: no feedback loop passes through wire ${cut.wire}`, { field: 'cut' });
  if (mode === 'closed') return { cut, mode, opened: [] };
  const junction = (wire: string) => d.wires.find((w) => w.id === wire)?.to.block ?? '';
  const opened = tableCuts(d, overrides).filter((c) => {
    if (c.wire === cut.wire || !d.wires.some((w) => w.id === c.wire)) return false;
    return loopBlocks(d, c.wire).has(junction(cut.wire)) && !mine.has(junction(c.wire));
  });
  return { cut, mode, opened: opened.map((c) => ({ cut: c.id, wire: c.wire })) };
}

/** The diagram as read: the opened cuts' wires removed. */
export function configured(d: Diagram, c: LoopConfiguration): Diagram {
  if (c.opened.length === 0) return d;
  const drop = new Set(c.opened.map((o) => o.wire));
  return { ...d, wires: d.wires.filter((w) => !drop.has(w.id)) };
}

/** L at the cut in this configuration (1 + L = 0), with how dead times were treated. */
export function readLoop(
  d: Diagram,
  c: LoopConfiguration,
  overrides: Record<string, number>,
  padeOrder = DEFAULT_PADE_ORDER,
): { L: TransferFunction; delayHandling: DelayHandling } {
  const r = loopAtCutDetailed(configured(d, c), c.cut.wire, overrides, { padeOrder });
  return { L: r.tf, delayHandling: r.delayHandling };
}

/** The controller's own transfer function, from its block as it stands in `d`. */
export function controllerTransferOf(d: Diagram, b: Block, overrides: Record<string, number>): TransferFunction {
  const f = blockSpec('pid').linear(resolveParams(d, b, overrides));
  if (f.type !== 'transfer') throw new Error('a PID block has a transfer function');
  return f.tf;
}

/** A P-only controller of gain k in place of the block (its filter n kept). */
const pOnly = (d: Diagram, b: Block, k: number) => withBlockParams(d, b.id, { form: 'ideal', kp: k, ti: '', td: 0 });

/** Frequencies at which two readings are compared: decades around the loop's own scale. */
function probeFrequencies(L: TransferFunction): number[] {
  const den = L.rational.den;
  const scale = Math.abs(den[0]) > 0 && den.length > 1 ? Math.abs(den[0] / den[den.length - 1]) ** (1 / (den.length - 1)) : 1;
  const w0 = Number.isFinite(scale) && scale > 0 ? scale : 1;
  return [1e-2, 0.1, 0.5, 1, 2, 10, 100].map((f) => f * w0);
}

const close = (a: Complex, b: Complex) => cabs(csub(a, b)) <= 1e-7 * Math.max(cabs(a), cabs(b), 1e-300);

export interface SeenProcess {
  /** What the controller sees (P = L/C). */
  P: TransferFunction;
  /** true: read exactly with the controller a unit gain (L is linear in C); false: divided by today's C and dependent on it. */
  exact: boolean;
  delayHandling: DelayHandling;
}

/** What the controller sees in this configuration (see the file comment). `L` is today's loop when it exists (null: zero loop gain today). */
export function seenProcess(
  d: Diagram,
  b: Block,
  c: LoopConfiguration,
  overrides: Record<string, number>,
  padeOrder: number,
  L: TransferFunction | null,
): SeenProcess {
  const one = readLoop(pOnly(d, b, 1), c, overrides, padeOrder);
  const two = readLoop(pOnly(d, b, 2), c, overrides, padeOrder).L;
  const linear = probeFrequencies(one.L).every((w) => {
    const a = tevalComplex(one.L, cx(0, w));
    return close(tevalComplex(two, cx(0, w)), cx(2 * a.re, 2 * a.im));
  });
  if (linear) return { P: one.L, exact: true, delayHandling: one.delayHandling };
  if (!L) {
    throw new InputError(
      `controller ${b.id}: its loop gain is zero today and it also sits in a loop that stays closed, so what it sees cannot be read; read the loop inner-first`,
      { field: 'block' },
    );
  }
  const C = controllerTransferOf(d, b, overrides);
  const q = cancelCommon(rdiv(L.rational, C.rational), 1e-7).result;
  return { P: transfer(q, L.delay - C.delay), exact: false, delayHandling: one.delayHandling };
}

/**
 * Ku and Pu of the loop under proportional control, from the diagram itself: with the
 * controller only on loops through the cut, the exact phase crossover of the loop with a unit
 * gain in the controller's place (dead time exact: lti margins on the cut's own L); otherwise
 * the exact jω crossing of the root locus of the whole configured diagram as the controller's
 * gain kp varies (the characteristic polynomial is affine in it; dead times inside loops by
 * Padé, said in `delayHandling`).
 */
export interface DiagramUltimate extends UltimatePoint {
  omega: number;
  from: 'frequency response' | 'root locus';
  delayHandling: DelayHandling | null;
}

export function ultimateOfLoop(
  d: Diagram,
  b: Block,
  c: LoopConfiguration,
  seen: SeenProcess,
  overrides: Record<string, number>,
  padeOrder: number,
): DiagramUltimate | null {
  if (seen.exact) {
    const u = ultimatePoint(seen.P);
    return u ? { ku: u.ku, pu: u.pu, omega: u.omega, from: 'frequency response', delayHandling: seen.delayHandling } : null;
  }
  const name = 'tune_ultimate_kp';
  const dk: Diagram = { ...pOnly(configured(d, c), b, 0), parameters: [...d.parameters, { name, value: 1 }] };
  const sw = sweepLocus(withBlockParams(dk, b.id, { kp: name }), name, overrides, { padeOrder });
  if (sw.mode !== 'exact') return null;
  const best = sw.locus.crossings.filter((x) => x.omega > 0 && x.gain > 0).sort((a, e) => a.gain - e.gain)[0];
  return best
    ? { ku: best.gain, pu: (2 * Math.PI) / best.omega, omega: best.omega, from: 'root locus', delayHandling: sw.delayHandling }
    : null;
}
