/**
 * The exact L(jω) of a live sweep's loop when dead times sit inside other loops (graph's
 * cutLoop solves the diagram at s = jω there). At each frequency the diagram is linear in the
 * swept node's transfer, so L(k, jω) is a Möbius map of k, fixed by its values at three sample
 * values: L(k) = L₁ + δ·α/(1 + δ·β), δ = k − k₁ (anchored at the first sample, which keeps it
 * accurate where k barely moves L). The three exact evaluators are tabulated once per edit on a
 * grid at least as dense as lti's loopMarginsOf would sweep at any k; a slider step then runs
 * loopMarginsOf itself (same definitions, verdict, notes) on that grid, each point one complex
 * division, and only the refinement between grid points solves the diagram (three times).
 */
import type { Complex, LoopSource } from '@loopwright/lti';
import { cx, deadlineTicker, firstIndexAtLeast, frequencyEvaluator, frequencyRange, poly, rational, transfer } from '@loopwright/lti';

/** Bracketing density of loopMarginsOf's sweep (points per decade, its default). */
const PER_DECADE = 200;
/** Most grid points a tabulation may hold (beyond: the step is read in full). */
const MAX_POINTS = 60000;

/** Exact L(jω) at the three sample values, and the anchored Möbius coefficients on the grid. */
export interface ExactTable {
  ks: readonly [number, number, number];
  evaluators: readonly [(w: number) => Complex, (w: number) => Complex, (w: number) => Complex];
  omega: Float64Array;
  /** L₁, α, β per grid point (re, im interleaved). */
  l1: Float64Array;
  alpha: Float64Array;
  beta: Float64Array;
  delaySum: number;
}

/** α and β from the three values at one frequency (see the file comment). */
function mobius(ks: readonly number[], l1r: number, l1i: number, l2: Complex, l3: Complex): [number, number, number, number] {
  const d2 = ks[1] - ks[0];
  const d3 = ks[2] - ks[0];
  const s2r = (l2.re - l1r) / d2;
  const s2i = (l2.im - l1i) / d2;
  const s3r = (l3.re - l1r) / d3;
  const s3i = (l3.im - l1i) / d3;
  // β = (s₂ − s₃)/(s₃δ₃ − s₂δ₂), where s₃δ₃ − s₂δ₂ = L₃ − L₂.
  const qr = l3.re - l2.re;
  const qi = l3.im - l2.im;
  const qq = qr * qr + qi * qi;
  let br = 0;
  let bi = 0;
  if (qq > 0) {
    const pr = s2r - s3r;
    const pi = s2i - s3i;
    br = (pr * qr + pi * qi) / qq;
    bi = (pi * qr - pr * qi) / qq;
  }
  // α = s₂(1 + δ₂β)
  const fr = 1 + d2 * br;
  const fi = d2 * bi;
  return [s2r * fr - s2i * fi, s2r * fi + s2i * fr, br, bi];
}

/** L(k) from L₁, α, β. */
function apply(k: number, k1: number, l1r: number, l1i: number, ar: number, ai: number, br: number, bi: number): Complex {
  const d = k - k1;
  const nr = d * ar;
  const ni = d * ai;
  const er = 1 + d * br;
  const ei = d * bi;
  const ee = er * er + ei * ei;
  return cx(l1r + (nr * er + ni * ei) / ee, l1i + (ni * er - nr * ei) / ee);
}

/**
 * The grid: log-spaced at loopMarginsOf's density over its sweep limits at the sample values
 * (four more decades below), with its dead-time caps applied everywhere below their limits: π/(8T) up to ωT = 20 and π/(4·T_inner) up to 20000 such steps.
 * Null when that would take more than MAX_POINTS points.
 */
export function exactGrid(
  approximants: readonly { num: readonly number[]; den: readonly number[]; delay: number }[],
  delaySum: number,
  innerDelay: number,
): Float64Array | null {
  let lo = Infinity;
  let hi = 0;
  const T = Math.max(delaySum, ...approximants.map((a) => a.delay));
  for (const a of approximants) {
    // loopMarginsOf's own limits at the sample (its sweepGrid): decades around the features,
    // 100/T with inner dead times, the top widened by decades until |L| ≤ 0.1.
    const tf = transfer(rational([...a.num], [...a.den]), a.delay);
    const [l, h0] = frequencyRange(tf, 2);
    let h = T > 0 && T !== a.delay ? Math.max(h0, 100 / T) : h0;
    const g = frequencyEvaluator(tf);
    const strictlyProper = poly.trim([...a.num]).length < poly.trim([...a.den]).length;
    for (let i = 0; i < 8 && strictlyProper && g(h).mag > 0.1; i++) h *= 10;
    lo = Math.min(lo, l);
    hi = Math.max(hi, h);
  }
  // Below, four more decades (log-spaced points are cheap; integrators widen loopMarginsOf's
  // bottom). Above, none: the dense tracking of inner dead times makes each decade costly; where
  // a step's sweep reaches past the top, loopMarginsOf builds its own grid (and solves there).
  lo /= 1e4;
  const ratio = 10 ** (1 / PER_DECADE);
  const linCap = T > 0 ? Math.PI / (8 * T) : Infinity;
  const linLimit = T > 0 ? 20 / T : 0;
  const innerCap = innerDelay > 0 ? Math.PI / 4 / innerDelay : Infinity;
  // loopMarginsOf follows the phase to max(10·lo, 20000 steps): the second bounds the first here.
  const tracked = innerDelay > 0 ? Math.max(lo * 10, 20000 * innerCap) : 0;
  const pts: number[] = [];
  for (let w = lo; w < hi;) {
    pts.push(w);
    let step = w < linLimit ? Math.min(w * (ratio - 1), linCap) : w * (ratio - 1);
    if (w < tracked) step = Math.min(step, innerCap);
    w += step;
    if (pts.length > MAX_POINTS) return null;
  }
  pts.push(hi);
  return Float64Array.from(pts);
}

/**
 * Tabulates the three evaluators on the grid; null when a fourth value `check` (evaluated in
 * full at every 37th point) does not follow the Möbius map to 1e-8 of |L| + 1e-12: then the value
 * does not enter as assumed and the step is read in full.
 */
export function tabulate(
  omega: Float64Array,
  ks: readonly [number, number, number],
  evaluators: ExactTable['evaluators'],
  delaySum: number,
  check: { k: number; evaluate: (w: number) => Complex },
  deadline?: number,
): ExactTable | null {
  const ticker = deadlineTicker(deadline, 'margins', 64);
  const n = omega.length;
  const l1 = new Float64Array(2 * n);
  const alpha = new Float64Array(2 * n);
  const beta = new Float64Array(2 * n);
  for (let i = 0; i < n; i++) {
    ticker.tick();
    const w = omega[i];
    const v1 = evaluators[0](w);
    const [ar, ai, br, bi] = mobius(ks, v1.re, v1.im, evaluators[1](w), evaluators[2](w));
    l1[2 * i] = v1.re;
    l1[2 * i + 1] = v1.im;
    alpha[2 * i] = ar;
    alpha[2 * i + 1] = ai;
    beta[2 * i] = br;
    beta[2 * i + 1] = bi;
    if (i % 37 === 0) {
      const want = check.evaluate(w);
      const got = apply(check.k, ks[0], v1.re, v1.im, ar, ai, br, bi);
      if (!(Math.hypot(got.re - want.re, got.im - want.im) <= 1e-8 * Math.hypot(want.re, want.im) + 1e-12)) return null;
    }
  }
  return { ks, evaluators, omega, l1, alpha, beta, delaySum };
}

/** Index of w in the ascending grid, or −1 when w is not a grid point. */
function gridIndex(omega: Float64Array, w: number): number {
  const i = firstIndexAtLeast(omega, w);
  return i < omega.length && omega[i] === w ? i : -1;
}

/** Most off-grid values a source keeps (a step reads a few hundred). */
const MAX_KEPT = 4096;

/**
 * The loop source at value k: tabulated on the grid; between grid points (refinement, the
 * points loopMarginsOf adds around lightly damped roots) the diagram at k solved at s = jω, by
 * the evaluator `solveAt` builds on first need. Solved values are kept by ω: a crossover the
 * refinement ends on is read again for its value, its phase, |S| and |T| and the plotted curve.
 */
export function exactSourceAt(
  t: ExactTable,
  k: number,
  approximant: LoopSource['approximant'],
  solveAt: () => (w: number) => Complex,
): LoopSource {
  let direct: ((w: number) => Complex) | undefined;
  const solved = new Map<number, Complex>();
  const omega = t.omega;
  // The sweep reads the grid in order: the point after the last one found is tried first.
  let last = -1;
  return {
    approximant,
    delaySum: t.delaySum,
    evaluate: (w) => {
      const i = omega[last + 1] === w ? last + 1 : gridIndex(omega, w);
      if (i >= 0) {
        last = i;
        return apply(k, t.ks[0], t.l1[2 * i], t.l1[2 * i + 1], t.alpha[2 * i], t.alpha[2 * i + 1], t.beta[2 * i], t.beta[2 * i + 1]);
      }
      let v = solved.get(w);
      if (!v) {
        v = (direct ??= solveAt())(w);
        if (solved.size < MAX_KEPT) solved.set(w, v);
      }
      return cx(v.re, v.im);
    },
  };
}
