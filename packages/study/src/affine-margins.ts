/**
 * Margins of L(k) = (a + k·b)/(c + k·d)·e^(−sT) on a frequency grid fixed once per diagram edit:
 * the four pieces are evaluated at every grid point once, so a slider step evaluates L by one
 * complex division a point; crossings and peaks are refined on the exact pieces. The figures
 * follow lti's loopMargins definition for definition (same bracketing density, refinement and
 * verdict from the closed-loop poles); where the fixed grid cannot promise the same brackets —
 * a lightly damped pole or zero of L(k) (loopMargins adds points around those), or |L| not yet
 * past its limits at the grid's ends — the step returns null and the caller uses loopMargins.
 */
import type { Reduction } from '@loopwright/graph';
import { cabs, closedLoopPolesDetailed, frequencyRange, padeOrderFor, rational, transfer, type Complex, type LoopMargins } from '@loopwright/lti';

const DEG = 180 / Math.PI;
/** lti's loopMargins verdict tolerance (relative to a pole's size) and its listed-crossover limit. */
const VERDICT_TOL = 1e-12;
const MAX_LISTED = 100;
/** Bracketing density of loopMargins' sweep (points per decade). */
const PER_DECADE = 200;

/** The pieces of one reading evaluated on its grid (e^(−jωT) folded into a and b). */
export interface PieceGrid {
  omega: Float64Array;
  ar: Float64Array;
  ai: Float64Array;
  br: Float64Array;
  bi: Float64Array;
  cr: Float64Array;
  ci: Float64Array;
  dr: Float64Array;
  di: Float64Array;
}

export interface AffinePieces {
  a: number[];
  b: number[];
  c: number[];
  d: number[];
  delay: number;
}

/** p(jω) for an ascending polynomial (Horner in ω² on the even and odd parts). */
function atJw(p: readonly number[], w: number): [number, number] {
  const x = -w * w;
  let e = 0;
  let o = 0;
  for (let i = p.length - 1; i >= 0; i--) {
    if (i % 2) o = o * x + p[i];
    else e = e * x + p[i];
  }
  return [e, w * o];
}

/**
 * The grid: log-spaced over the frequency ranges of L at the sample values, widened two decades
 * each way (the slider moves crossovers), with loopMargins' dead-time cap π/(8T) up to ωT = 20.
 */
export function pieceGrid(p: AffinePieces, samples: readonly number[]): PieceGrid {
  let lo = Infinity;
  let hi = 0;
  for (const k of samples) {
    const [l, h] = frequencyRange(transfer(rational(addScaled(p.a, p.b, k), addScaled(p.c, p.d, k)), p.delay), 2);
    lo = Math.min(lo, l);
    hi = Math.max(hi, h);
  }
  lo /= 100;
  hi *= 100;
  const ratio = 10 ** (1 / PER_DECADE);
  const T = p.delay;
  const linCap = T > 0 ? Math.PI / (8 * T) : Infinity;
  const linLimit = T > 0 ? 20 / T : 0;
  const pts: number[] = [];
  for (let w = lo; w < hi; w += w < linLimit ? Math.min(w * (ratio - 1), linCap) : w * (ratio - 1)) pts.push(w);
  pts.push(hi);
  const n = pts.length;
  const g: PieceGrid = {
    omega: Float64Array.from(pts),
    ar: new Float64Array(n),
    ai: new Float64Array(n),
    br: new Float64Array(n),
    bi: new Float64Array(n),
    cr: new Float64Array(n),
    ci: new Float64Array(n),
    dr: new Float64Array(n),
    di: new Float64Array(n),
  };
  for (let i = 0; i < n; i++) {
    const w = pts[i];
    const cs = Math.cos(w * T);
    const sn = -Math.sin(w * T);
    const [ar, ai] = atJw(p.a, w);
    const [br, bi] = atJw(p.b, w);
    [g.ar[i], g.ai[i]] = [ar * cs - ai * sn, ar * sn + ai * cs];
    [g.br[i], g.bi[i]] = [br * cs - bi * sn, br * sn + bi * cs];
    [g.cr[i], g.ci[i]] = atJw(p.c, w);
    [g.dr[i], g.di[i]] = atJw(p.d, w);
  }
  return g;
}

function addScaled(x: readonly number[], y: readonly number[], k: number): number[] {
  const out = new Array<number>(Math.max(x.length, y.length)).fill(0);
  for (let i = 0; i < out.length; i++) out[i] = (x[i] ?? 0) + k * (y[i] ?? 0);
  while (out.length > 1 && out[out.length - 1] === 0) out.pop();
  return out;
}

const wrap180 = (deg: number): number => {
  let x = deg % 360;
  if (x <= -180) x += 360;
  if (x > 180) x -= 360;
  return x;
};
const lag360 = (deg: number): number => ((deg % 360) + 360) % 360;

/**
 * Sign change of f in [a, b], refined in log ω by the Illinois variant of regula falsi with a
 * bisection step whenever an iteration fails to halve the bracket (as loopMargins refines).
 */
function refine(a: number, b: number, f: (w: number) => number): number {
  let xa = Math.log(a);
  let xb = Math.log(b);
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  let side = 0;
  for (let it = 0; it < 100 && xb - xa > 4e-16 * Math.max(1, Math.abs(xa)); it++) {
    const width = xb - xa;
    let x = (xa * fb - xb * fa) / (fb - fa);
    if (!(x > xa && x < xb)) x = 0.5 * (xa + xb);
    const fx = f(Math.exp(x));
    if (fx === 0 || !Number.isFinite(fx)) return Math.exp(x);
    if (fx > 0 === fa > 0) {
      [xa, fa] = [x, fx];
      if (side === -1) fb /= 2;
      side = -1;
    } else {
      [xb, fb] = [x, fx];
      if (side === 1) fa /= 2;
      side = 1;
    }
    if (xb - xa > 0.5 * width) {
      const xm = 0.5 * (xa + xb);
      const fm = f(Math.exp(xm));
      if (fm === 0) return Math.exp(xm);
      if (fm > 0 === fa > 0) [xa, fa] = [xm, fm];
      else [xb, fb] = [xm, fm];
      side = 0;
    }
  }
  return Math.exp(Math.abs(fa) < Math.abs(fb) ? xa : xb);
}

function goldenMax(a: number, b: number, f: (x: number) => number): { x: number; value: number } {
  const phi = (Math.sqrt(5) - 1) / 2;
  let x1 = b - phi * (b - a);
  let x2 = a + phi * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let it = 0; it < 80 && b - a > 1e-13; it++) {
    if (f1 >= f2) {
      [b, x2, f2] = [x2, x1, f1];
      x1 = b - phi * (b - a);
      f1 = f(x1);
    } else {
      [a, x1, f1] = [x1, x2, f2];
      x2 = a + phi * (b - a);
      f2 = f(x2);
    }
  }
  return f1 >= f2 ? { x: x1, value: f1 } : { x: x2, value: f2 };
}

/** Largest value on the grid, its three largest local maxima refined by golden section in log ω. */
function peakOf(grid: Float64Array, vals: Float64Array, f: (w: number) => number): { value: number; omega: number } {
  const cands: number[] = [];
  for (let i = 0; i < vals.length; i++) {
    const l = i > 0 ? vals[i - 1] : -Infinity;
    const r = i + 1 < vals.length ? vals[i + 1] : -Infinity;
    if (vals[i] >= l && vals[i] >= r) cands.push(i);
  }
  cands.sort((x, y) => vals[y] - vals[x]);
  let best = { value: vals[cands[0]] ?? NaN, omega: grid[cands[0]] ?? NaN };
  for (const i of cands.slice(0, 3)) {
    if (!Number.isFinite(vals[i])) return { value: Infinity, omega: grid[i] };
    const r = goldenMax(Math.log(grid[Math.max(0, i - 1)]), Math.log(grid[Math.min(grid.length - 1, i + 1)]), (x) => f(Math.exp(x)));
    if (r.value > best.value) best = { value: r.value, omega: Math.exp(r.x) };
    if (vals[i] > best.value) best = { value: vals[i], omega: grid[i] };
  }
  return best;
}

const leading = (q: readonly number[]) => {
  let i = 0;
  while (i < q.length - 1 && q[i] === 0) i++;
  return i;
};

/** lti's frequencyRange from roots already found: two decades beyond |poles|, |zeros| and 1/T. */
function rangeOf(poles: readonly Complex[], zeros: readonly Complex[], delay: number): [number, number] {
  const f = [...poles, ...zeros].map(cabs).filter((m) => m > 0 && Number.isFinite(m));
  if (delay > 0) f.push(1 / delay);
  if (f.length === 0) return [1e-2, 1e2];
  return [10 ** (Math.floor(Math.log10(Math.min(...f)) + 1e-9) - 2), 10 ** (Math.ceil(Math.log10(Math.max(...f)) - 1e-9) + 2)];
}

/** Lightly damped (ζ ≤ 0.2) roots: loopMargins packs extra points around them; the fixed grid does not. */
const lightlyDamped = (roots: readonly Complex[]) => roots.some((r) => r.im !== 0 && Math.abs(r.re) / cabs(r) <= 0.2);

/** Margins of L(k) from the grid, or null where only loopMargins' own sweep can promise the same brackets. */
export function affineMargins(p: AffinePieces, g: PieceGrid, k: number, r: Reduction): LoopMargins | null {
  const num = r.tf.rational.num;
  const den = r.tf.rational.den;
  if (num.length === 0 || lightlyDamped(r.poles) || lightlyDamped(r.zeros)) return null;
  const at = (w: number) => {
    const cs = Math.cos(w * p.delay);
    const sn = -Math.sin(w * p.delay);
    const [a1, a2] = atJw(p.a, w);
    const [b1, b2] = atJw(p.b, w);
    const [c1, c2] = atJw(p.c, w);
    const [d1, d2] = atJw(p.d, w);
    const xr = a1 + k * b1;
    const xi = a2 + k * b2;
    const nr = xr * cs - xi * sn;
    const ni = xr * sn + xi * cs;
    const dr = c1 + k * d1;
    const di = c2 + k * d2;
    const dd = dr * dr + di * di;
    const vr = (nr * dr + ni * di) / dd;
    const vi = (ni * dr - nr * di) / dd;
    return { re: vr, im: vi, mag: Math.hypot(vr, vi) };
  };
  // loopMargins' sweep limits: two decades beyond the poles, zeros and 1/T, widened until
  // |L| ≥ 10 at the bottom (with integrators) and |L| ≤ 0.1 at the top. The fixed grid is used
  // between them, with the limits themselves as its ends (figures such as |T| → 1 at low
  // frequency are read at the ends).
  let [lo, hi] = rangeOf(r.poles, r.zeros, p.delay);
  const integrators = leading(den) - leading(num);
  for (let i = 0; i < 8 && integrators > 0 && at(lo).mag < 10; i++) lo /= 10;
  for (let i = 0; i < 8 && at(hi).mag > 0.1; i++) hi *= 10;
  if (lo < g.omega[0] || hi > g.omega[g.omega.length - 1]) return null;
  let first = 0;
  while (g.omega[first] <= lo) first++;
  let last = g.omega.length - 1;
  while (g.omega[last] >= hi) last--;
  const n = last - first + 3;
  const omega = new Float64Array(n);
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const mag = new Float64Array(n);
  const ph = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let vr: number;
    let vi: number;
    if (i === 0 || i === n - 1) {
      omega[i] = i === 0 ? lo : hi;
      const v = at(omega[i]);
      [vr, vi] = [v.re, v.im];
    } else {
      const j = first + i - 1;
      omega[i] = g.omega[j];
      const nr = g.ar[j] + k * g.br[j];
      const ni = g.ai[j] + k * g.bi[j];
      const dr = g.cr[j] + k * g.dr[j];
      const di = g.ci[j] + k * g.di[j];
      const dd = dr * dr + di * di;
      vr = (nr * dr + ni * di) / dd;
      vi = (ni * dr - nr * di) / dd;
    }
    re[i] = vr;
    im[i] = vi;
    mag[i] = Math.hypot(vr, vi);
    const principal = Math.atan2(vi, vr) * DEG;
    ph[i] = i === 0 ? principal : ph[i - 1] + wrap180(principal - ph[i - 1]);
  }
  /** Continuous phase at w inside the step [grid[i], grid[i+1]]. */
  const phaseAt = (w: number, i: number) => {
    const v = at(w);
    return ph[i] + wrap180(Math.atan2(v.im, v.re) * DEG - ph[i]);
  };

  const gainCrossoverDetails: LoopMargins['gainCrossoverDetails'] = [];
  for (let i = 0; i + 1 < n; i++) {
    const x = mag[i] - 1;
    const y = mag[i + 1] - 1;
    if (!(Number.isFinite(x) && Number.isFinite(y))) continue;
    if (x === 0 || (x > 0 !== y > 0 && y !== 0)) {
      const w = x === 0 ? omega[i] : refine(omega[i], omega[i + 1], (v) => Math.log(at(v).mag));
      const pm = wrap180(180 + phaseAt(w, i));
      gainCrossoverDetails.push({ omega: w, phaseMarginDeg: pm, delayMargin: pm / DEG / w });
    }
  }

  const phaseCrossoverDetails: LoopMargins['phaseCrossoverDetails'] = [];
  const v0 = (den[0] ?? 0) === 0 ? null : (num[0] ?? 0) / den[0];
  if (v0 !== null && v0 < 0) phaseCrossoverDetails.push({ omega: 0, gainFactor: 1 / Math.abs(v0), phaseDeg: 180 });
  for (let i = 0; i + 1 < n; i++) {
    const pa = ph[i];
    const pb = ph[i + 1];
    if (!Number.isFinite(pa) || !Number.isFinite(pb)) continue;
    if (mag[i] < 1e-6 && mag[i + 1] < 1e-6) continue;
    const lo = Math.min(pa, pb);
    const hi = Math.max(pa, pb);
    for (let m = Math.floor((lo + 180) / 360) + 1; -180 + 360 * m <= hi; m++) {
      const level = -180 + 360 * m;
      const w = level === pb ? omega[i + 1] : refine(omega[i], omega[i + 1], (x) => phaseAt(x, i) - level);
      const v = at(w);
      if (!(v.mag > 0 && Number.isFinite(v.mag)) || Math.abs(v.im) > 1e-6 * v.mag || v.re >= 0) continue;
      phaseCrossoverDetails.push({ omega: w, gainFactor: 1 / v.mag, phaseDeg: level });
    }
  }

  let upper: { omega: number; gainFactor: number } | null = null;
  let lower: { omega: number; gainFactor: number } | null = null;
  for (const c of phaseCrossoverDetails) {
    if (c.gainFactor >= 1 && (!upper || c.gainFactor < upper.gainFactor)) upper = c;
    if (c.gainFactor < 1 && (!lower || c.gainFactor > lower.gainFactor)) lower = c;
  }
  let worst: (typeof gainCrossoverDetails)[number] | null = null;
  for (const c of gainCrossoverDetails) if (!worst || c.phaseMarginDeg < worst.phaseMarginDeg) worst = c;

  const sVals = new Float64Array(n);
  const tVals = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const one = Math.hypot(1 + re[i], im[i]);
    sVals[i] = 1 / one;
    tVals[i] = mag[i] / one;
  }
  const sAt = (w: number) => {
    const v = at(w);
    return 1 / Math.hypot(1 + v.re, v.im);
  };
  const tAt = (w: number) => {
    const v = at(w);
    return v.mag / Math.hypot(1 + v.re, v.im);
  };
  const s = peakOf(omega, sVals, sAt);
  const t = peakOf(omega, tVals, tAt);

  // Verdict from the closed-loop poles, with loopMargins' Padé order for the dead time.
  const wRef = 2 * Math.max(1e-12, ...gainCrossoverDetails.map((c) => c.omega), upper ? upper.omega : 0);
  const hint = p.delay > 0 ? Math.max(3, padeOrderFor(p.delay, wRef)) : 1;
  // As many crossovers as loopMargins lists at most: it truncates and says so; let it.
  if (gainCrossoverDetails.length >= MAX_LISTED || phaseCrossoverDetails.length >= MAX_LISTED) return null;
  // The verdict as loopMargins gives it for a rational loop: each pole left of the axis by more
  // than its own error and than rounding relative to its size; doubtful poles named in the notes.
  const notes: string[] = [];
  const cl = closedLoopPolesDetailed(num, den, p.delay, hint);
  const poles = cl.poles;
  const padeOrder = cl.padeOrder;
  const closedLoopStable = poles.every((q, i) => q.re < -Math.max(cl.errors[i], VERDICT_TOL * cabs(q)));
  if (cl.limited) notes.push(`closed-loop poles are good to about ${cl.worstRelativeError.toExponential(0)} (relative): accuracy limited`);
  const doubtful = poles.filter((q, i) => Math.abs(q.re) <= cl.errors[i] && cl.errors[i] > VERDICT_TOL * cabs(q));
  if (doubtful.length) notes.push(`the verdict is uncertain: ${doubtful.length} closed-loop pole(s) lie within their error of the imaginary axis`);
  if (closedLoopStable) for (const c of gainCrossoverDetails) c.delayMargin = lag360(c.phaseMarginDeg) / DEG / c.omega;

  // Bandwidth: first ω where |T| falls to |T(0)|/√2.
  const t0 = v0 === null ? ((num[0] ?? 0) === 0 && den[0] === 0 ? NaN : 1) : Math.abs(v0 / (1 + v0));
  let bandwidth: number | null = null;
  if (Number.isFinite(t0) && t0 !== 0) {
    const level = t0 / Math.SQRT2;
    for (let i = 0; i < n; i++) {
      if (tVals[i] < level) {
        bandwidth = i === 0 ? null : refine(omega[i - 1], omega[i], (x) => tAt(x) - level);
        break;
      }
    }
  }
  return {
    gainMargin: upper ? upper.gainFactor : null,
    gainMarginDb: upper ? 20 * Math.log10(upper.gainFactor) : null,
    phaseCrossover: upper ? upper.omega : null,
    lowerGainMargin: lower ? lower.gainFactor : null,
    lowerGainMarginDb: lower ? 20 * Math.log10(lower.gainFactor) : null,
    lowerPhaseCrossover: lower ? lower.omega : null,
    phaseMarginDeg: worst ? worst.phaseMarginDeg : null,
    gainCrossover: worst ? worst.omega : null,
    delayMargin: gainCrossoverDetails.length ? Math.min(...gainCrossoverDetails.map((c) => c.delayMargin)) : null,
    peakSensitivity: s.value,
    peakSensitivityFrequency: s.omega,
    peakComplementary: t.value,
    peakComplementaryFrequency: t.omega,
    bandwidth,
    closedLoopStable,
    closedLoopPoles: poles,
    padeOrder,
    gainCrossovers: gainCrossoverDetails.map((c) => c.omega),
    phaseCrossovers: phaseCrossoverDetails.map((c) => c.omega),
    gainCrossoverDetails,
    phaseCrossoverDetails,
    phaseCrossoverTail: null,
    closedLoopAccuracy: { worstRelativeError: cl.worstRelativeError, limited: cl.limited },
    frequencyMethod: p.delay > 0 ? 'exact' : 'rational',
    notes,
  };
}
