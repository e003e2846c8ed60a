import {
  type Complex,
  InputError,
  type TransferFunction,
  cabs,
  cexp,
  cmul,
  cx,
  poly as P,
  polyRoots,
  rational,
  rcompose,
} from '@loopwright/lti';
import { type DiscreteTransferFunction, checkSampleTime, discreteTransfer, dtDelay } from './discrete.ts';
import { splitDelay } from './hold.ts';

export interface TustinOptions {
  /**
   * Prewarping frequency ω1 (rad/s, 0 < ω1·T < π): s ← (ω1/tan(ω1T/2))·(z − 1)/(z + 1) instead
   * of (2/T)·(z − 1)/(z + 1), so that H(e^(jω1T)) = G(jω1) exactly. Omit for plain Tustin.
   */
  prewarp?: number;
}

/** The constant c in s ← c·(z − 1)/(z + 1): 2/T, or ω1/tan(ω1·T/2) when prewarped at ω1. */
export function tustinConstant(sampleTime: number, prewarp?: number): number {
  const T = checkSampleTime(sampleTime);
  if (prewarp === undefined) return 2 / T;
  if (!Number.isFinite(prewarp) || prewarp <= 0 || prewarp * T >= Math.PI) {
    throw new InputError(
      `prewarp: the prewarping frequency must satisfy 0 < ω1·T < π (below the Nyquist frequency ${Math.PI / T} rad/s), got ${prewarp} rad/s`,
      {
        field: 'prewarp',
      },
    );
  }
  return prewarp / Math.tan((prewarp * T) / 2);
}

/**
 * Tustin's (bilinear) form of G(s): H(z) = G(c·(z − 1)/(z + 1)), optionally prewarped (Franklin,
 * Powell & Workman, ch. 6; Åström & Wittenmark, ch. 8 (from memory)). A dead time must be a
 * whole number of samples (it becomes z^(−d)); for a fractional one use the hold equivalent.
 * G must be proper (an improper G has no causal Tustin form).
 */
export function tustin(G: TransferFunction, sampleTime: number, opts: TustinOptions = {}): DiscreteTransferFunction {
  const c = tustinConstant(sampleTime, opts.prewarp);
  const d = wholeSampleDelay(G, sampleTime, 'Tustin');
  const h = rcompose(G.rational, rational([-c, c], [1, 1]));
  return dtDelay(discreteTransfer(h.num, h.den, sampleTime, 'Tustin form'), d);
}

/**
 * Matched pole–zero form: each pole and finite zero p maps to e^(pT); zeros at s = ∞ (the
 * relative degree r) map to z = −1, except one kept at ∞ (one sample of delay) when
 * `keepOneSampleDelay` — then the output at k does not depend on the input at k, which leaves a
 * sample for the computation. The gain matches G at low frequency: with q net poles at s = 0,
 * lim ((z−1)/T)^q H(z) at z → 1 equals lim s^q G(s) at s → 0 (Franklin, Powell & Workman, ch. 6
 * (from memory)).
 */
export function matchedPoleZero(
  G: TransferFunction,
  sampleTime: number,
  opts: { keepOneSampleDelay?: boolean } = {},
): DiscreteTransferFunction {
  const T = checkSampleTime(sampleTime);
  const d = wholeSampleDelay(G, T, 'matched pole–zero');
  const num = P.trim(G.rational.num);
  const den = P.trim(G.rational.den);
  if (num.length > den.length)
    throw new InputError('matched pole–zero: the transfer function is improper (more zeros than poles)', { field: 'transfer function' });
  if (num.length === 0) return discreteTransfer([], [1], T);
  const zs = num.length > 1 ? polyRoots(num) : [];
  const ps = den.length > 1 ? polyRoots(den) : [];
  const map = (r: Complex) => cexp(cx(r.re * T, r.im * T));
  const r = ps.length - zs.length;
  const atMinusOne = opts.keepOneSampleDelay && r > 0 ? r - 1 : r;
  const zz = [...zs.map(map), ...new Array<Complex>(atMinusOne).fill(cx(-1))];
  const pz = ps.map(map);
  // Low-frequency gain match: drop the factors at s = 0 (z = 1) on both sides.
  const isOrigin = (x: Complex) => cabs(x) === 0;
  const q = ps.filter(isOrigin).length - zs.filter(isOrigin).length;
  const gs = lowFrequencyGain(num, den);
  const prodAt1 = (roots: Complex[], orig: Complex[]) =>
    roots.reduce((acc, x, i) => (i < orig.length && isOrigin(orig[i]) ? acc : cmul(acc, cx(1 - x.re, -x.im))), cx(1));
  const nz = prodAt1(zz, zs);
  const dp = prodAt1(pz, ps);
  // H(z) ≈ K·nz/dp·(z−1)^(zeros at origin − poles at origin) near z = 1; ((z−1)/T)^q H → K·nz/dp·T^(−q)… so:
  const K = (gs * dp.re) / (nz.re * T ** -q);
  const H = discreteTransfer(P.fromRoots(zz, K), P.fromRoots(pz), T, 'matched pole–zero form');
  return dtDelay(H, d);
}

/** lim s→0 of s^q·G(s), q = poles at the origin − zeros at the origin. */
function lowFrequencyGain(num: number[], den: number[]): number {
  let i = 0;
  while (i < num.length - 1 && num[i] === 0) i++;
  let j = 0;
  while (j < den.length - 1 && den[j] === 0) j++;
  return num[i] / den[j];
}

function wholeSampleDelay(G: TransferFunction, T: number, method: string): number {
  const { samples, fraction } = splitDelay(G.delay, T);
  if (fraction > 0) {
    throw new InputError(
      `${method}: the dead time ${G.delay} s is not a whole number of samples of ${T} s; use the zero-order-hold equivalent (modified z-transform) for it`,
      { field: 'delay' },
    );
  }
  return samples;
}
