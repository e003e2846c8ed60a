import {
  type Complex,
  type Rational,
  type TransferFunction,
  InputError,
  cancelCommon,
  padeDelay,
  poly,
  polyRoots,
  rational,
  rstaticGain,
  transfer,
} from '@loopwright/lti';
import type { Diagram } from '../document-types.ts';
import type { ParameterOverrides } from '../resolve.ts';
import { linearGraphOf } from './from-diagram.ts';
import { type CompiledGraph, type LinearGraph, compileGraph } from './linear-graph.ts';
import { type Cycle, type FlowGraph, determinantPoly, flowGraph, forwardPaths, simpleCycles, transmission } from './mason.ts';
import { type SignalGraph, type SignalRef, describeRef, prepareTransmission, relevantNodes, wholeGraph } from './points.ts';

/**
 * Padé order used for a dead time that sits inside a loop (or on paths of unequal delay)
 * when poles are needed. Order 3 keeps the phase error below 1° up to ω·T ≈ 3 (the (3,3)
 * approximant's phase error grows like (ωT)^7) while adding only three poles per delay.
 */
export const DEFAULT_PADE_ORDER = 3;

export interface ReduceOptions {
  /** Padé order for dead times that cannot be kept exact (default DEFAULT_PADE_ORDER). */
  padeOrder?: number;
  /** 'auto': keep a dead time exact where it factors out of every path; 'pade': approximate every dead time. */
  delays?: 'auto' | 'pade';
  /** Relative tolerance for cancelling common numerator/denominator roots (default 1e-7). */
  cancelTolerance?: number;
  /** Deadline on the performance.now() clock (ms): past it the analysis stops with a BudgetError('time'). */
  deadline?: number;
}

/** How dead times were treated in a result. */
export interface DelayHandling {
  /** none: no dead time on the way; exact: e^(−s·delay) factors out of every path; pade: replaced. */
  mode: 'none' | 'exact' | 'pade';
  /** Padé order (mode 'pade'). */
  order?: number;
  /** Blocks whose dead time was replaced by its Padé approximant (mode 'pade'). */
  blocks: string[];
  note: string;
}

export interface Reduction {
  /** Rational part (cancelled, monic denominator) times e^(−s·delay). */
  tf: TransferFunction;
  poles: Complex[];
  zeros: Complex[];
  /** Leading-coefficient gain k of k·Π(s − z)/Π(s − p). */
  gain: number;
  /** Static gain T(0) of the rational part (±Infinity with a pole at the origin). */
  staticGain: number;
  delay: number;
  delayHandling: DelayHandling;
  /** Roots common to numerator and denominator that were cancelled (modes the path cannot see). */
  hiddenModes: Complex[];
  /** Before cancellation: numerator and denominator (ascending, not normalised). */
  rawNumerator: number[];
  rawDenominator: number[];
}

/** Transmission of a prepared signal graph, uncancelled: num/den polynomials and a pure delay. */
export interface RawTransmission {
  num: number[];
  den: number[];
  delay: number;
  handling: DelayHandling;
  /** Block factors (node numerators and denominators) that may divide both sides exactly. */
  factors?: number[][];
}

const padeOrderOf = (o: ReduceOptions) => {
  const order = o.padeOrder ?? DEFAULT_PADE_ORDER;
  if (!Number.isInteger(order) || order < 1 || order > 10)
    throw new InputError(`Padé order must be a whole number from 1 to 10, got ${order}`, { field: 'padeOrder' });
  return order;
};

/** A sub-graph on the chosen nodes, with node gains from `num`/`den`. */
function subFlowGraph(g: SignalGraph, keep: boolean[], num: number[][], den: number[][]) {
  const map = new Array<number>(g.ids.length).fill(-1);
  const nodes: number[] = [];
  keep.forEach((k, i) => {
    if (k) {
      map[i] = nodes.length;
      nodes.push(i);
    }
  });
  const branches = g.branches
    .filter((b) => b.to >= 0 && map[b.from] >= 0 && map[b.to] >= 0)
    .map((b) => ({ from: map[b.from], to: map[b.to], weight: b.weight }));
  const fg = flowGraph(
    nodes.length,
    nodes.map((v) => num[v]),
    nodes.map((v) => den[v]),
    branches,
  );
  return { fg, nodes, map };
}

/** Node gains with the chosen dead times replaced by their Padé approximant. */
function withPade(g: SignalGraph, pade: ReadonlySet<number>, order: number) {
  const num = g.num.slice();
  const den = g.den.slice();
  for (const v of pade) {
    const p = padeDelay(g.delay[v], order);
    num[v] = poly.mul(num[v], p.num);
    den[v] = poly.mul(den[v], p.den);
  }
  return { num, den };
}

function handlingOf(g: SignalGraph, pade: ReadonlySet<number>, order: number, exactDelay: number, why: string): DelayHandling {
  if (pade.size > 0) {
    const blocks = [...pade].map((v) => g.ids[v]);
    return {
      mode: 'pade',
      order,
      blocks,
      note: `dead time of ${blocks.join(', ')} replaced by its Padé (${order},${order}) approximant: ${why}`,
    };
  }
  if (exactDelay > 0)
    return {
      mode: 'exact',
      blocks: [],
      note: `dead time ${exactDelay} s is common to every path and outside every loop: kept exact as e^(-${exactDelay}*s)`,
    };
  return { mode: 'none', blocks: [], note: 'no dead time on the way' };
}

/** Method A core: exact transmission by polynomial Mason elimination on the relevant nodes. */
export function transmissionOfGraph(g: SignalGraph, opts: ReduceOptions = {}): RawTransmission {
  const order = padeOrderOf(opts);
  const keep = relevantNodes(g);
  if (!keep[g.output]) return { num: [], den: [1], delay: 0, handling: handlingOf(g, new Set(), order, 0, '') };
  const plain = subFlowGraph(g, keep, g.num, g.den);
  const cycles = simpleCycles(plain.fg, undefined, opts.deadline);
  const delayed = plain.nodes.filter((v) => g.delay[v] > 0);
  const pade = new Set<number>();
  let why = 'requested';
  let exactDelay = 0;
  if (delayed.length > 0) {
    if (opts.delays === 'pade') delayed.forEach((v) => pade.add(v));
    else {
      const inLoop = loopMembers(plain.fg.n, cycles);
      for (const v of delayed) if (inLoop[plain.map[v]]) pade.add(v);
      if (pade.size) why = 'the dead time sits inside a loop';
      const pathDelays = new Set<number>();
      for (const p of forwardPaths(plain.fg, plain.map[g.input], plain.map[g.output], opts.deadline)) {
        let d = 0;
        for (const i of p.nodes) {
          const v = plain.nodes[i];
          if (!pade.has(v)) d += g.delay[v];
        }
        pathDelays.add(d);
      }
      if (pathDelays.size > 1) {
        delayed.forEach((v) => pade.add(v));
        why = 'paths of unequal dead time meet';
      } else exactDelay = [...pathDelays][0] ?? 0;
    }
  }
  let fg: FlowGraph = plain.fg;
  if (pade.size) {
    const { num, den } = withPade(g, pade, order);
    fg = subFlowGraph(g, keep, num, den).fg;
  }
  const t = transmission(fg, plain.map[g.input], plain.map[g.output], cycles, opts.deadline);
  const factors = [...fg.num, ...fg.den].filter((f) => poly.degree(f) > 0).map((f) => f.slice());
  return { num: t.num, den: t.den, delay: exactDelay, handling: handlingOf(g, pade, order, exactDelay, why), factors };
}

export function loopMembers(n: number, cycles: readonly Cycle[]): boolean[] {
  const inLoop = new Array<boolean>(n).fill(false);
  for (const c of cycles) for (const v of c.nodes) inLoop[v] = true;
  return inLoop;
}

/**
 * Zeroes coefficients left at round-off level when a polynomial is rebuilt from its roots
 * (after a cancellation): c_k is dropped when it is below 1e−12 of the largest neighbouring
 * coefficient scaled by the root scale ρ = |c_lo/c_hi|^(1/(hi−lo)), i.e. of max_j |c_j|·ρ^(j−k),
 * the size at which c_k would move any root by more than round-off.
 */
export function cleanRoundOff(p: readonly number[]): number[] {
  const t = poly.trim(p);
  let lo = 0;
  while (lo < t.length && t[lo] === 0) lo++;
  const hi = t.length - 1;
  if (hi - lo < 2) return t;
  const rho = Math.abs(t[lo] / t[hi]) ** (1 / (hi - lo));
  if (!(rho > 0) || !Number.isFinite(rho)) return t;
  return poly.trim(
    t.map((c, k) => {
      if (k <= lo || k >= hi) return c;
      let scale = 0;
      for (let j = lo; j <= hi; j++) scale = Math.max(scale, Math.abs(t[j]) * rho ** (j - k));
      return Math.abs(c) <= 1e-12 * scale ? 0 : c;
    }),
  );
}

/** Normalises and cancels a raw transmission into a Reduction (poles, zeros, gains, hidden modes). */
export function reductionOf(raw: RawTransmission, opts: ReduceOptions = {}): Reduction {
  if (poly.isZero(raw.den))
    throw new InputError(
      'the diagram is ill-posed: its interconnection determinant is identically zero (an algebraic loop with loop gain 1?)',
    );
  const structural = divideBlockFactors(raw.num, raw.den, raw.factors ?? []);
  const r0 = rational(structural.num, structural.den);
  let r: Rational = r0;
  let hidden: Complex[] = structural.cancelled;
  let poles: Complex[] | null = null;
  if (!poly.isZero(r0.num) && poly.degree(r0.num) > 0 && poly.degree(r0.den) > 0) {
    // Cheap screen first: the full cancellation (roots of both sides, clustered) runs only when
    // some pole nearly annuls the numerator; otherwise those poles are the result's.
    const denRoots = polyRoots(r0.den);
    if (denRoots.some((p) => nearlyAnnuls(r0.num, p))) {
      const c = cancelCommon(r0, opts.cancelTolerance ?? 1e-7);
      if (c.cancelled.length) {
        hidden = [...hidden, ...c.cancelled];
        r = rational(cleanRoundOff(c.result.num), cleanRoundOff(c.result.den));
      }
    }
    if (r === r0) poles = denRoots;
  }
  const out = {
    tf: transfer(r, raw.delay),
    gain: poly.lead(r.num) / poly.lead(r.den),
    staticGain: rstaticGain(r),
    delay: raw.delay,
    delayHandling: raw.handling,
    hiddenModes: hidden,
    rawNumerator: raw.num,
    rawDenominator: raw.den,
  };
  // Poles and zeros are found on first use (a cut's L(s) or a sweep rarely needs them); own
  // enumerable getters, so JSON and structured clone still carry them.
  lazy(out, 'poles', () => poles ?? polyRoots(r.den));
  lazy(out, 'zeros', () => (poly.isZero(r.num) ? [] : polyRoots(r.num)));
  return out as Reduction;
}

/**
 * Exact division p = q·f when f divides p to round-off, else null. Both long divisions are
 * tried — from the top (stable for small roots of f) and from the constant term (stable for
 * large ones) — and the quotient with the smaller residual ‖p − q·f‖ is kept if that residual
 * is at round-off level coefficient by coefficient.
 */
export function divideExactly(p: readonly number[], f: readonly number[]): number[] | null {
  const pt = poly.trim(p);
  const ft = poly.trim(f);
  const m = ft.length - 1;
  const n = pt.length - 1;
  if (m < 1 || n < m) return null;
  const top = poly.divmod(pt, ft).q;
  let bottom: number[] | null = null;
  if (ft[0] !== 0) {
    const q = new Array<number>(n - m + 1).fill(0);
    for (let k = 0; k <= n - m; k++) {
      let acc = pt[k];
      for (let j = 1; j <= Math.min(k, m); j++) acc -= ft[j] * q[k - j];
      q[k] = acc / ft[0];
    }
    bottom = q;
  }
  let best: number[] | null = null;
  let bestErr = Infinity;
  for (const q of bottom ? [top, bottom] : [top]) {
    let worst = 0;
    for (let k = 0; k <= n; k++) {
      let prod = 0;
      let mag = Math.abs(pt[k]);
      for (let j = Math.max(0, k - (q.length - 1)); j <= Math.min(k, m); j++) {
        prod += ft[j] * (q[k - j] ?? 0);
        mag += Math.abs(ft[j] * (q[k - j] ?? 0));
      }
      worst = Math.max(worst, mag > 0 ? Math.abs(pt[k] - prod) / mag : 0);
    }
    if (worst < bestErr) {
      bestErr = worst;
      best = q;
    }
  }
  return bestErr <= 1e-10 ? poly.trim(best!) : null;
}

/**
 * Removes block factors that divide both numerator and denominator of a transmission exactly
 * (a mode of a block that the path cannot see, or a controller zero on a plant pole): cheap
 * and structural, before any root-based cancellation.
 */
function divideBlockFactors(
  num: number[],
  den: number[],
  factors: readonly number[][],
): { num: number[]; den: number[]; cancelled: Complex[] } {
  const cancelled: Complex[] = [];
  if (poly.isZero(num)) return { num, den, cancelled };
  const seen = new Set<string>();
  for (const f of factors) {
    const key = f.join(',');
    if (seen.has(key)) continue;
    seen.add(key);
    for (;;) {
      const qn = divideExactly(num, f);
      if (!qn) break;
      const qd = divideExactly(den, f);
      if (!qd) break;
      num = qn;
      den = qd;
      cancelled.push(...polyRoots(f));
    }
  }
  return { num, den, cancelled: cancelled.sort((a, b) => a.re - b.re || a.im - b.im) };
}

/**
 * |N(p)| small against the size of its terms Σ|n_k||p|^k: p is within ~1e−4 relative of a root
 * of N (a loose screen; cancelCommon decides with its own tolerance).
 */
function nearlyAnnuls(num: readonly number[], p: Complex): boolean {
  const v = poly.evalComplex(num, p);
  const r = Math.hypot(p.re, p.im);
  let size = 0;
  for (let k = num.length - 1; k >= 0; k--) size = size * r + Math.abs(num[k]);
  return Math.hypot(v.re, v.im) <= 1e-4 * size;
}

function lazy<T extends object>(o: T, key: string, compute: () => unknown): void {
  let value: unknown;
  let done = false;
  Object.defineProperty(o, key, {
    enumerable: true,
    get: () => {
      if (!done) {
        value = compute();
        done = true;
      }
      return value;
    },
  });
}

/** Compiles a diagram (or an already linear graph) once; analysis functions accept either. */
export type Linearisable = Diagram | LinearGraph | CompiledGraph;

export function compiledOf(x: Linearisable, overrides?: ParameterOverrides): CompiledGraph {
  if ('wireIndex' in x) return x;
  if ('format' in x) return compileGraph(linearGraphOf(x, overrides));
  return compileGraph(x);
}

/**
 * Closed-loop transfer function from an injection at `from` (a source block, a block's output
 * or a wire) to a measurement at `to` (a probe, a block's output or a wire), every loop closed.
 * Method A: exact polynomial elimination (Mason) over the nodes between the two points.
 */
export function closedLoop(
  d: Linearisable,
  from: SignalRef,
  to: SignalRef,
  overrides?: ParameterOverrides,
  opts: ReduceOptions = {},
): Reduction {
  const c = compiledOf(d, overrides);
  const raw = transmissionOfGraph(prepareTransmission(c, from, to), opts);
  try {
    return reductionOf(raw, opts);
  } catch (err) {
    if (err instanceof InputError) throw new InputError(`${describeRef(from)} → ${describeRef(to)}: ${err.message}`, err.details);
    throw err;
  }
}

/** Determinant of the whole interconnection and how its dead times were treated. */
export interface CharacteristicPolynomial {
  /** Ascending, not normalised: Π D_v · Δ (exactly multilinear in each block's coefficients). */
  poly: number[];
  handling: DelayHandling;
}

/**
 * The characteristic polynomial of the whole diagram (every loop closed, every block's modes
 * included, nothing cancelled). Dead times inside loops are replaced by Padé approximants;
 * dead times outside every loop add no poles and are left out ('pade' mode approximates all).
 */
export function characteristicPolynomial(
  d: Linearisable,
  overrides?: ParameterOverrides,
  opts: ReduceOptions = {},
): CharacteristicPolynomial {
  const c = compiledOf(d, overrides);
  const g = wholeGraph(c);
  const order = padeOrderOf(opts);
  const all = new Array<boolean>(g.ids.length).fill(true);
  const plain = subFlowGraph(g, all, g.num, g.den);
  const cycles = simpleCycles(plain.fg, undefined, opts.deadline);
  const inLoop = loopMembers(plain.fg.n, cycles);
  const pade = new Set<number>();
  g.ids.forEach((_, v) => {
    if (g.delay[v] > 0 && (opts.delays === 'pade' || inLoop[v])) pade.add(v);
  });
  const { num, den } = withPade(g, pade, order);
  const fg = subFlowGraph(g, all, num, den).fg;
  const p = determinantPoly(fg, cycles, undefined, opts.deadline);
  if (poly.isZero(p))
    throw new InputError(
      'the diagram is ill-posed: its interconnection determinant is identically zero (an algebraic loop with loop gain 1?)',
    );
  return { poly: p, handling: handlingOf(g, pade, order, 0, opts.delays === 'pade' ? 'requested' : 'the dead time sits inside a loop') };
}

/** Every closed-loop pole of the diagram: the roots of its characteristic polynomial. */
export function closedLoopPoles(d: Linearisable, overrides?: ParameterOverrides, opts: ReduceOptions = {}): Complex[] {
  return polyRoots(characteristicPolynomial(d, overrides, opts).poly);
}
