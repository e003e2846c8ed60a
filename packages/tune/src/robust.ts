import { InputError, type TransferFunction, frequencyEvaluator, frequencyRange, poly, polyRoots, relativeDegree } from '@loopwright/lti';
import { type ControllerSetting, DEFAULT_DERIVATIVE_FILTER, controllerSetting } from './controller.ts';
import { predictLoop } from './predict.ts';
import type { TuneSuggestion } from './rules.ts';
import { lowFrequencySign, negated } from './ultimate.ts';

/**
 * A robustness-constrained tuner: the PI or PID setting with the largest integral gain
 * ki = kp/ti such that the loop L = C·P keeps its Nyquist curve out of the disk of radius
 * 1/Ms_max around −1 (peak sensitivity Ms ≤ Ms_max, default 1.4) for every controller on the
 * way from ki = 0 (so the loop cannot jump to another encirclement count: it stays stable),
 * and optionally keeps a gain margin ≥ gmMin (the curve does not cross the real axis in
 * [−1, −1/gmMin]) and a phase margin ≥ pmMinDeg (it does not cross the unit circle within
 * pmMinDeg of −1). Maximising ki under an Ms bound is the design idea of Åström,
 * Panagopoulos & Hägglund, "Design of PI controllers based on non-convex optimization",
 * Automatica 34 (1998) 585–601 (from memory); integral gain is what sets the integrated error
 * after a load step (IE = 1/ki).
 *
 * Method: P(jω) is evaluated once on a dense grid (dead time exact). For fixed kp (and, for
 * PID, fixed td with kd = kp·td and the block's derivative filter td/n), L is affine in ki:
 * L = A(ω) + ki·B(ω), so at each ω the first ki at which L enters the disk is the smaller
 * root of a quadratic, and ki_max(kp) is their minimum over ω. Margin floors, crossings of
 * curves rather than regions, then lower ki by bisection, the crossings read off the polyline
 * through the grid. ki_max is maximised over kp (PI), or over (kp, td) with ti ≥ tiOverTdMin·td (PID,
 * default 4: real controller zeros), by a grid and golden-section refinement. The result is
 * then checked with lti loopMargins on the exact frequency response; if the grid missed a
 * narrow excursion, ki is reduced by bisection until the exact Ms and floors hold.
 *
 * The plant must have no poles in the open right half-plane or on the imaginary axis other
 * than integrators (the start from ki = 0 must be a stable loop). A plant of negative gain is
 * tuned as −P and the controller's kp returned negative (reverse action).
 */
export interface RobustTuneOptions {
  controller?: 'pi' | 'pid';
  msMax?: number;
  pmMinDeg?: number;
  gmMin?: number;
  /** The PID block's derivative filter n (default 10). */
  derivativeFilter?: number;
  /** PID only: the least ti/td (default 4). */
  tiOverTdMin?: number;
}

interface Grid {
  w: Float64Array;
  pr: Float64Array;
  pi: Float64Array;
}

function plantGrid(plant: TransferFunction): Grid {
  const g = frequencyEvaluator(plant);
  const [lo, hi] = frequencyRange(plant, 3);
  const ws: number[] = [];
  const ratio = 10 ** (1 / 150);
  const T = plant.delay;
  const cap = T > 0 ? Math.PI / (24 * T) : Infinity;
  const limit = T > 0 ? 80 / T : 0;
  for (let w = lo; w < hi;) {
    ws.push(w);
    w += w < limit ? Math.min(w * (ratio - 1), cap) : w * (ratio - 1);
  }
  ws.push(hi);
  const w = Float64Array.from(ws);
  const pr = new Float64Array(w.length);
  const pi = new Float64Array(w.length);
  for (let i = 0; i < w.length; i++) {
    const v = g(w[i]);
    pr[i] = v.re;
    pi[i] = v.im;
  }
  return { w, pr, pi };
}

interface Forbidden {
  r: number; // disk radius 1/Ms
  gmMin: number | null;
  pmMin: number | null; // rad
}

/** First k > 0 with L = A + k·B inside the disk |L + 1| < r; 0 if A is inside; Infinity if never. */
function firstHit(ar: number, ai: number, br: number, bi: number, r: number): number {
  const cr = ar + 1;
  const a = br * br + bi * bi;
  const b = 2 * (cr * br + ai * bi);
  const c = cr * cr + ai * ai - r * r;
  if (c < 0) return 0;
  if (!(a > 0) || b >= 0) return Infinity;
  const disc = b * b - 4 * a * c;
  return disc >= 0 ? (2 * c) / (-b + Math.sqrt(disc)) : Infinity;
}

/**
 * Phase- and gain-margin floors read off the grid: where the polyline through L(jω_i) crosses
 * the unit circle (by |L|) within pmMin of −1, or the negative real axis in [−1, −1/gmMin].
 */
function floorsHold(g: Grid, kp: number, ki: number, dr: Float64Array, di: Float64Array, f: Forbidden): boolean {
  let pr = 0;
  let pim = 0;
  for (let i = 0; i < g.w.length; i++) {
    const w = g.w[i];
    // L = P·(kp·D(jω) + ki/(jω))
    const cr = kp * dr[i];
    const ci = kp * di[i] - ki / w;
    const lr = g.pr[i] * cr - g.pi[i] * ci;
    const li = g.pr[i] * ci + g.pi[i] * cr;
    if (i > 0) {
      if (f.pmMin !== null) {
        const m0 = Math.hypot(pr, pim) - 1;
        const m1 = Math.hypot(lr, li) - 1;
        if (m0 === 0 || m0 > 0 !== m1 > 0) {
          const t = m0 / (m0 - m1);
          const xr = pr + t * (lr - pr);
          const xi = pim + t * (li - pim);
          if (Math.atan2(Math.abs(xi), -xr) < f.pmMin) return false;
        }
      }
      if (f.gmMin !== null && (pim === 0 || pim > 0 !== li > 0)) {
        const t = pim / (pim - li);
        const x = pr + t * (lr - pr);
        if (x >= -1 && x <= -1 / f.gmMin) return false;
      }
    }
    pr = lr;
    pim = li;
  }
  return true;
}

/** The largest kp for which the P (+D) loop kp·P·D(jω) stays out of the forbidden set. */
function kpLimit(g: Grid, dr: Float64Array, di: Float64Array, f: Forbidden): number {
  let k = Infinity;
  for (let i = 0; i < g.w.length; i++) {
    const br = g.pr[i] * dr[i] - g.pi[i] * di[i];
    const bi = g.pr[i] * di[i] + g.pi[i] * dr[i];
    k = Math.min(k, firstHit(0, 0, br, bi, f.r));
  }
  return k;
}

/** ki_max at kp, with the proportional-derivative factor D(jω) = 1 + jω·td/(1 + jω·td/n) given. */
function kiLimit(g: Grid, kp: number, dr: Float64Array, di: Float64Array, f: Forbidden): number {
  let k = Infinity;
  for (let i = 0; i < g.w.length; i++) {
    const w = g.w[i];
    const ar = kp * (g.pr[i] * dr[i] - g.pi[i] * di[i]);
    const ai = kp * (g.pr[i] * di[i] + g.pi[i] * dr[i]);
    // B = P/(jω) = (pi − j·pr)/ω
    const hit = firstHit(ar, ai, g.pi[i] / w, -g.pr[i] / w, f.r);
    if (hit < k) {
      k = hit;
      if (k === 0) return 0;
    }
  }
  return k;
}

function derivativeFactor(g: Grid, td: number, n: number): { dr: Float64Array; di: Float64Array } {
  const dr = new Float64Array(g.w.length);
  const di = new Float64Array(g.w.length);
  for (let i = 0; i < g.w.length; i++) {
    if (td === 0) {
      dr[i] = 1;
      continue;
    }
    // jω·td/(1 + jω·tf) = (ω²·td·tf + jω·td)/(1 + ω²tf²)
    const w = g.w[i];
    const tf = td / n;
    const den = 1 + w * w * tf * tf;
    dr[i] = 1 + (w * w * td * tf) / den;
    di[i] = (w * td) / den;
  }
  return { dr, di };
}

/** Golden-section maximum of f on [a, b]. */
function goldenMax(a: number, b: number, f: (x: number) => number, iterations = 50): { x: number; value: number } {
  const phi = (Math.sqrt(5) - 1) / 2;
  let x1 = b - phi * (b - a);
  let x2 = a + phi * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let i = 0; i < iterations; i++) {
    if (f1 >= f2) {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = b - phi * (b - a);
      f1 = f(x1);
    } else {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = a + phi * (b - a);
      f2 = f(x2);
    }
  }
  return f1 >= f2 ? { x: x1, value: f1 } : { x: x2, value: f2 };
}

/** Best (kp, ki) at fixed td: a kp grid, then golden section around the best grid point. */
function bestAtTd(g: Grid, td: number, n: number, f: Forbidden, ratio: number, kpScale: number): { kp: number; ki: number } {
  const { dr, di } = derivativeFactor(g, td, n);
  let kpMax = kpLimit(g, dr, di, f);
  if (!Number.isFinite(kpMax)) kpMax = kpScale;
  const kiAt = (kp: number) => {
    let k = kiLimit(g, kp, dr, di, f);
    if (td > 0) k = Math.min(k, kp / (ratio * td));
    if ((f.pmMin === null && f.gmMin === null) || !(k > 0) || floorsHold(g, kp, k, dr, di, f)) return k;
    // The floors bind first: the largest ki below the disk's limit that keeps them (bisection).
    let lo = 0;
    let hi = k;
    for (let i = 0; i < 40; i++) {
      const mid = 0.5 * (lo + hi);
      if (floorsHold(g, kp, mid, dr, di, f)) lo = mid;
      else hi = mid;
    }
    return lo;
  };
  // kp on (0, kpMax): the ideal form needs kp > 0, and at kpMax the P loop touches the set.
  const M = 48;
  const kpAt = (i: number) => (kpMax * i) / (M + 1);
  let bi = 1;
  const vals: number[] = [0];
  for (let i = 1; i <= M; i++) {
    vals.push(kiAt(kpAt(i)));
    if (vals[i] > vals[bi]) bi = i;
  }
  const r = goldenMax(kpAt(bi - 1), kpAt(bi + 1), (x) => (x > 0 ? kiAt(x) : 0));
  return r.value >= vals[bi] && r.x > 0 ? { kp: r.x, ki: r.value } : { kp: kpAt(bi), ki: vals[bi] };
}

export function robustTune(plant: TransferFunction, opts: RobustTuneOptions = {}): TuneSuggestion {
  const kind = opts.controller ?? 'pi';
  if (kind !== 'pi' && kind !== 'pid')
    throw new InputError(`controller: the Ms-constrained tuner gives 'pi' or 'pid', not '${String(kind)}'`, { field: 'controller' });
  const msMax = opts.msMax ?? 1.4;
  if (!(msMax > 1 && Number.isFinite(msMax)))
    throw new InputError(`Ms target must be a finite number > 1, got ${msMax}`, { field: 'msMax' });
  const pm = opts.pmMinDeg;
  if (pm !== undefined && !(pm > 0 && pm < 90))
    throw new InputError(`phase-margin floor must lie between 0° and 90°, got ${pm}`, { field: 'pmMinDeg' });
  const gm = opts.gmMin;
  if (gm !== undefined && !(gm > 1 && Number.isFinite(gm)))
    throw new InputError(`gain-margin floor must be a finite number > 1, got ${gm}`, { field: 'gmMin' });
  const n = opts.derivativeFilter ?? DEFAULT_DERIVATIVE_FILTER;
  if (!(n > 0 && Number.isFinite(n))) throw new InputError(`derivative filter n must be a finite number > 0, got ${n}`, { field: 'n' });
  const ratio = opts.tiOverTdMin ?? 4;
  if (!(ratio > 0 && Number.isFinite(ratio)))
    throw new InputError(`ti/td floor must be a finite number > 0, got ${ratio}`, { field: 'tiOverTdMin' });
  if (relativeDegree(plant.rational) < 0) throw new InputError('the plant is improper (more zeros than poles)', { field: 'plant' });
  const den = poly.trim(plant.rational.den);
  let q = 0;
  while (q < den.length - 1 && den[q] === 0) q++;
  const poles = den.length - 1 > q ? polyRoots(den.slice(q)) : [];
  const bad = poles.find((p) => p.re >= -1e-12 * Math.hypot(p.re, p.im));
  if (bad) {
    throw new InputError(
      `the Ms-constrained tuner needs a plant without poles in the right half-plane or on the imaginary axis (other than integrators); it has one at ${bad.re.toPrecision(4)}${bad.im ? ` ± ${Math.abs(bad.im).toPrecision(4)}j` : ''}`,
      { field: 'plant' },
    );
  }

  const sign = lowFrequencySign(plant);
  const p = sign > 0 ? plant : negated(plant);
  const g = plantGrid(p);
  const f: Forbidden = { r: 1 / msMax, gmMin: gm ?? null, pmMin: pm !== undefined ? (pm * Math.PI) / 180 : null };
  // A scale for kp when the P loop never reaches the forbidden set (e.g. a lag without delay).
  let minMag = Infinity;
  for (let i = 0; i < g.w.length; i++) minMag = Math.min(minMag, Math.hypot(g.pr[i], g.pi[i]));
  const kpScale = 1e3 / Math.max(minMag, 1e-300);

  let kp: number;
  let ki: number;
  let td = 0;
  const pi = bestAtTd(g, 0, n, f, ratio, kpScale);
  ({ kp, ki } = pi);
  if (kind === 'pid' && ki > 0) {
    const tiPi = kp / ki;
    const tds = [0];
    for (let j = 0; j < 16; j++) tds.push((tiPi / 1000) * 500 ** (j / 15));
    let best = { td: 0, kp, ki };
    let bj = 0;
    tds.forEach((t, j) => {
      const r = j === 0 ? pi : bestAtTd(g, t, n, f, ratio, kpScale);
      if (r.ki > best.ki) {
        best = { td: t, ...r };
        bj = j;
      }
    });
    // Refine td around the best grid value (kp re-optimised inside).
    const lo = tds[Math.max(0, bj - 1)];
    const hi = tds[Math.min(tds.length - 1, bj + 1)];
    const r = goldenMax(lo, hi, (t) => bestAtTd(g, t, n, f, ratio, kpScale).ki, 30);
    if (r.value > best.ki) {
      const at = bestAtTd(g, r.x, n, f, ratio, kpScale);
      best = { td: r.x, ...at };
    }
    ({ kp, ki, td } = best);
  }
  if (ki === Infinity) {
    // PI on a first-order lag without dead time never nears −1: Ms bounds no integral gain.
    throw new InputError(
      `Ms ≤ ${msMax} bounds no ${kind.toUpperCase()} setting of this plant: the integral gain can grow without limit (a lag without dead time); give the loop its real delays (sampling, sensor, actuator) or use a rule with a chosen closed-loop time`,
      { field: 'plant' },
    );
  }
  if (!(ki > 0) || !Number.isFinite(ki)) {
    throw new InputError(
      `no ${kind.toUpperCase()} setting meets Ms ≤ ${msMax}${gm ? `, GM ≥ ${gm}` : ''}${pm ? `, PM ≥ ${pm}°` : ''} for this plant`,
      { field: 'msMax' },
    );
  }

  // Check on the exact frequency response (lti loopMargins); shrink ki if the grid missed a peak.
  const setting = (k: number): ControllerSetting => controllerSetting(kind, kp, kp / k, td);
  const meets = (k: number) => {
    const c = setting(k);
    const pr = predictLoop(c, p, n);
    return (
      pr.closedLoopStable &&
      pr.ms !== null &&
      pr.ms <= msMax * (1 + 1e-9) &&
      (gm === undefined || pr.gainMargin === null || pr.gainMargin >= gm * (1 - 1e-9)) &&
      (pm === undefined || (pr.phaseMarginDeg !== null && pr.phaseMarginDeg >= pm - 1e-7))
    );
  };
  const notes: string[] = [];
  if (!meets(ki)) {
    // Back off by growing steps (a grid miss is usually tiny), then bisect to 1e-6 of ki.
    let hi = ki;
    let lo = NaN;
    for (let step = 1e-6; step < 1; step *= 10) {
      const k = ki * (1 - step);
      if (meets(k)) {
        lo = k;
        break;
      }
      hi = k;
    }
    if (Number.isNaN(lo))
      throw new InputError(`the Ms-constrained search found no setting that the exact frequency response confirms (Ms ≤ ${msMax})`, {
        field: 'msMax',
      });
    while (hi - lo > 1e-6 * ki) {
      const mid = 0.5 * (lo + hi);
      if (meets(mid)) lo = mid;
      else hi = mid;
    }
    notes.push(`the exact frequency response asked for ${((1 - lo / ki) * 100).toPrecision(2)} % less integral gain than the grid search`);
    ki = lo;
  }
  const c0 = setting(ki);
  const controller: ControllerSetting = { ...c0, kp: sign * c0.kp, kind: c0.kind };
  if (sign < 0) notes.push('the plant has negative gain: the controller acts in reverse (kp < 0)');
  const settings: Record<string, number> = { msMax, integralGain: sign * ki };
  if (gm !== undefined) settings.gmMin = gm;
  if (pm !== undefined) settings.pmMinDeg = pm;
  if (kind === 'pid') settings.tiOverTdMin = ratio;
  return {
    rule: 'ms',
    controller,
    derivativeFilter: n,
    model: null,
    reduction: null,
    settings,
    predicted: predictLoop(controller, plant, n),
    notes,
  };
}
