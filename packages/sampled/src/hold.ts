import {
  type Complex,
  InputError,
  MAX_ORDER,
  type StateSpace,
  type TransferFunction,
  cexp,
  cx,
  matrixExponential,
  poly as P,
  polyRoots,
  realize,
} from '@loopwright/lti';
import { type DiscreteTransferFunction, checkSampleTime, discreteTransfer } from './discrete.ts';

/**
 * Zero-order-hold discretisation of ẋ = A x + B u(t − τ), y = C x + D u(t − τ), with u held
 * constant over each sample and 0 ≤ τ < T (the fractional part of a dead time):
 *   x[k+1] = Φ x[k] + Γ0 u[k] + Γ1 u[k−1],
 *   Φ = e^(AT), Γ0 = ∫₀^(T−τ) e^(As) ds B, Γ1 = e^(A(T−τ)) ∫₀^τ e^(As) ds B.
 * Each integral comes from one matrix exponential of the augmented matrix [[A, B], [0, 0]]
 * (Van Loan's block form; Franklin, Powell & Workman, Digital Control of Dynamic Systems,
 * 3rd ed., ch. 4 (from memory); Åström & Wittenmark, Computer-Controlled Systems, 3rd ed.,
 * Sec. 2.3 (from memory)). With τ = 0, Γ1 = 0.
 */
export interface HoldStateSpace {
  Phi: number[][];
  Gamma0: number[];
  Gamma1: number[];
}

export function holdStateSpace(ss: StateSpace, sampleTime: number, tau = 0): HoldStateSpace {
  checkSampleTime(sampleTime);
  if (!(tau >= 0 && tau < sampleTime)) throw new InputError(`fractional delay τ must lie in [0, T), got τ = ${tau} with T = ${sampleTime}`);
  const n = ss.A.length;
  const blocks = (h: number) => {
    if (h === 0) return { E: identity(n), G: new Array<number>(n).fill(0) };
    const M: number[][] = ss.A.map((row, i) => [...row.map((v) => v * h), ss.B[i] * h]);
    M.push(new Array<number>(n + 1).fill(0));
    const X = matrixExponential(M);
    return { E: X.slice(0, n).map((r) => r.slice(0, n)), G: X.slice(0, n).map((r) => r[n]) };
  };
  const first = blocks(sampleTime - tau);
  const second = blocks(tau);
  return {
    Phi: tau === 0 ? first.E : matMul(first.E, second.E),
    Gamma0: first.G,
    Gamma1: tau === 0 ? new Array<number>(n).fill(0) : matVec(first.E, second.G),
  };
}

/** A dead time θ as d whole samples plus a fraction τ ∈ [0, T) (snapped to a whole sample within 1e-9·T). */
export function splitDelay(theta: number, sampleTime: number): { samples: number; fraction: number } {
  if (!Number.isFinite(theta) || theta < 0) throw new InputError(`dead time must be a finite number ≥ 0 s, got ${theta}`);
  const r = theta / sampleTime;
  const d = Math.round(r);
  if (Math.abs(r - d) <= 1e-9 * Math.max(1, r)) return { samples: d, fraction: 0 };
  const f = Math.floor(r);
  return { samples: f, fraction: theta - f * sampleTime };
}

export interface HoldOptions {
  /**
   * Computation delay in samples (0: none; 1: one sample; a fraction such as 0.5): the time from
   * sampling to the new output, added to the plant's own dead time. Default 0.
   */
  computeDelay?: number;
}

/** Checks a computation delay given in samples. */
export function checkComputeDelay(D: number | undefined, what = 'computeDelay'): number {
  const v = D ?? 0;
  if (typeof v !== 'number' || !Number.isFinite(v) || v < 0 || v > 1000) {
    throw new InputError(
      `${what}: the computation delay is a number of samples from 0 to 1000 (0 none, 1 one sample, or a fraction), got ${v}`,
      { field: what },
    );
  }
  return v;
}

/**
 * The zero-order-hold equivalent H(z) = (1 − z⁻¹)·Z{G(s)/s} of a continuous G(s) (proper, with
 * dead time), sampled every T, including a computation delay of D samples. A total dead time
 * θ = delay + D·T = d·T + τ with 0 < τ < T is handled exactly by the modified z-transform
 * (m = 1 − τ/T): H(z) = z^(−d) · [Cd (zI − Φd)⁻¹ Γd + Dd] for the state [x; u[k−1]].
 *
 * Method: the state matrices from matrix exponentials (holdStateSpace) of a realisation of
 * G(ω0·σ) (frequency-scaled so that its poles have size about 1, which keeps the companion
 * form well conditioned); the denominator from the exact pole map z = e^(pT); the numerator
 * from the Markov parameters h_k = Cd·Φd^(k−1)·Γd, so num = den·H truncated to powers ≥ 0.
 */
export function holdEquivalent(G: TransferFunction, sampleTime: number, opts: HoldOptions = {}): DiscreteTransferFunction {
  const T = checkSampleTime(sampleTime);
  const D = checkComputeDelay(opts.computeDelay);
  const num = P.trim(G.rational.num);
  const den = P.trim(G.rational.den);
  if (num.length > den.length) {
    throw new InputError(
      `the continuous part is improper (numerator degree ${num.length - 1} > denominator degree ${den.length - 1}): a zero-order-hold equivalent needs a proper transfer function`,
      { field: 'plant' },
    );
  }
  const { samples: d, fraction: tau } = splitDelay(G.delay + D * T, T);
  if (num.length === 0) return discreteTransfer([], [1], T);
  const n = den.length - 1;
  const order = n + d + (tau > 0 ? 1 : 0);
  if (order > MAX_ORDER) {
    throw new InputError(
      `the dead time of ${G.delay + D * T} s is ${d} samples of ${T} s: the pulse transfer function would have order ${order}, above the limit of ${MAX_ORDER}; use a longer sample time for this loop`,
      { field: 'sampleTime' },
    );
  }

  // Frequency scaling s = ω0·σ; the same H(z) is the hold equivalent of G(ω0σ) at T' = ω0·T.
  let q = 0;
  while (q < n && den[q] === 0) q++;
  const w0 = n > q ? Math.abs(den[q] / den[n]) ** (1 / (n - q)) : 1 / T;
  const scale = (c: readonly number[]) => c.map((v, i) => v * w0 ** i);
  const ss = realize({ num: scale(num), den: scale(den) }, 'plant');
  const hs = holdStateSpace(ss, T * w0, tau * w0);

  // The discrete state [x; u[k−1]] when τ > 0 (the output then sees u[k−1] through D at t = kT).
  const frac = tau > 0;
  const N = n + (frac ? 1 : 0);
  const Ad: number[][] = hs.Phi.map((row, i) => (frac ? [...row, hs.Gamma1[i]] : row.slice()));
  if (frac) Ad.push(new Array<number>(N).fill(0));
  const Bd = frac ? [...hs.Gamma0, 1] : hs.Gamma0.slice();
  const Cd = frac ? [...ss.C, ss.D] : ss.C.slice();
  const Dd = frac ? 0 : ss.D;

  const poles: Complex[] = n > 0 ? polyRoots(den).map((p) => cexp(cx(p.re * T, p.im * T))) : [];
  if (frac) poles.push(cx(0));
  const dz = P.fromRoots(poles); // monic, degree N, ascending
  // Markov parameters h_0 … h_N.
  const h: number[] = [Dd];
  let v = Bd.slice();
  for (let k = 1; k <= N; k++) {
    h.push(dot(Cd, v));
    v = matVec(Ad, v);
  }
  // num coefficient of z^(N−j) = Σ_{i=0..j} α_i h_(j−i), α_i = coefficient of z^(N−i) in den.
  const numZ = new Array<number>(N + 1).fill(0);
  for (let j = 0; j <= N; j++) {
    let s = 0;
    for (let i = 0; i <= j; i++) s += (dz[N - i] ?? 0) * h[j - i];
    numZ[N - j] = s;
  }
  const denZ = d > 0 ? P.mul(dz, [...new Array<number>(d).fill(0), 1]) : dz;
  return discreteTransfer(numZ, denZ, T, 'zero-order-hold equivalent');
}

/**
 * Frequency response of the zero-order hold with the sampler's 1/T (unit static gain):
 * H(jω) = (1 − e^(−jωT))/(jωT) = e^(−jωT/2)·sin(ωT/2)/(ωT/2): half a sample of lag and a
 * sinc magnitude (Franklin, Powell & Workman, ch. 6 (from memory)).
 */
export function holdResponse(omega: number, sampleTime: number): Complex {
  const x = (omega * sampleTime) / 2;
  const m = x === 0 ? 1 : Math.sin(x) / x;
  return cx(m * Math.cos(x), -m * Math.sin(x));
}

function identity(n: number): number[][] {
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
}
const dot = (a: readonly number[], b: readonly number[]) => a.reduce((s, x, i) => s + x * b[i], 0);
const matVec = (M: readonly (readonly number[])[], v: readonly number[]) => M.map((row) => dot(row, v));
function matMul(A: readonly (readonly number[])[], B: readonly (readonly number[])[]): number[][] {
  return A.map((row) => B[0].map((_, j) => row.reduce((s, x, k) => s + x * B[k][j], 0)));
}
