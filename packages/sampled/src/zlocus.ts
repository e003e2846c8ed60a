import { type Complex, type RootLocus, type RootLocusOptions, cabs, cdiv, cx, poly as P, polyRoots, rootLocus } from '@loopwright/lti';
import type { DiscreteTransferFunction } from './discrete.ts';
import { type SampledLoop, loopPulseTransfer } from './sampled-loop.ts';
import { bisectRoot } from './search.ts';

/** A branch meeting the unit circle: gain k, the point z = e^(jθ) (θ = ωT ∈ [0, π]) and ω = θ/T. */
export interface UnitCircleCrossing {
  gain: number;
  z: Complex;
  /** ωT in radians, 0 … π. */
  theta: number;
  omega: number;
}

/**
 * The root locus of 1 + k·N(z)/D(z) = 0 in the z-plane (k > 0, or k < 0 with `negative`). The
 * geometry (real-axis parts, asymptotes, breakaway points, departure and arrival angles) and the
 * traced branches follow the same rules as in the s-plane; what changes is the stability
 * boundary: `crossings` are the unit-circle crossings (not imaginary-axis ones), and
 * `stableGainRanges` the gains for which every closed-loop pole lies inside the unit circle.
 */
export interface ZPlaneLocus extends Omit<RootLocus, 'crossings'> {
  plane: 'z';
  sampleTime: number;
  crossings: UnitCircleCrossing[];
  /** Signed gain intervals with every pole strictly inside the unit circle; `to` null = unbounded. */
  stableGainRanges: { from: number; to: number | null }[];
  /** The end of the stable range that starts at small |k|: the critical gain (Jury limit); null when there is none. */
  criticalGain: number | null;
  /** The unit-circle crossing at the critical gain, if any. */
  criticalCrossing: UnitCircleCrossing | null;
}

export function zPlaneLocus(pulse: DiscreteTransferFunction, opts: RootLocusOptions = {}): ZPlaneLocus {
  const T = pulse.sampleTime;
  const N = P.trim(pulse.rational.num);
  const D = P.trim(pulse.rational.den);
  const sgn = opts.negative ? -1 : 1;
  const crossings = unitCircleCrossings(N, D, T).filter((c) => c.gain * sgn > 0);
  let locus = rootLocus(N, D, opts);
  // The trace must reach past every unit-circle crossing.
  const far = Math.max(0, ...crossings.map((c) => Math.abs(c.gain)));
  if (opts.kMax === undefined && far > 0 && Math.abs(locus.kRange[1]) < 1.5 * far) locus = rootLocus(N, D, { ...opts, kMax: 2 * far });
  const { crossings: _sPlane, ...rest } = locus;
  const ranges = stableRanges(
    N,
    D,
    crossings.map((c) => Math.abs(c.gain)),
    sgn,
  );
  const first = ranges.length && ranges[0].from === 0 ? ranges[0] : null;
  const criticalGain = first && first.to !== null ? sgn * first.to : null;
  const criticalCrossing =
    criticalGain === null
      ? null
      : crossings.reduce<UnitCircleCrossing | null>(
          (b, c) => (!b || Math.abs(c.gain - criticalGain) < Math.abs(b.gain - criticalGain) ? c : b),
          null,
        );
  return {
    ...rest,
    plane: 'z',
    sampleTime: T,
    crossings,
    stableGainRanges: ranges.map((r) => ({ from: sgn * r.from, to: r.to === null ? null : sgn * r.to })),
    criticalGain,
    criticalCrossing,
  };
}

/** The z-plane locus of a sampled loop (pulse transfer function of plant, hold, delay and controller). */
export function sampledLocus(loop: SampledLoop, opts: RootLocusOptions = {}): ZPlaneLocus {
  return zPlaneLocus(loopPulseTransfer(loop), opts);
}

/**
 * Every (k, θ) with D(e^(jθ)) + k·N(e^(jθ)) = 0, k real, θ ∈ [0, π]: k = −D/N must be real, i.e.
 * Im(D(z)·N(1/z)) = 0 on |z| = 1. Clearing 1/z gives the polynomial
 * Q(z) = z^m·[D(z)·N(1/z) − D(1/z)·N(z)], whose roots on the unit circle are the candidates
 * (z = ±1 always among them); each θ is then polished by bisection on Im(D·conj N).
 */
export function unitCircleCrossings(num: readonly number[], den: readonly number[], sampleTime: number): UnitCircleCrossing[] {
  const N = P.trim(num);
  const D = P.trim(den);
  if (N.length === 0) return [];
  const m = Math.max(N.length, D.length) - 1;
  const Q = new Array<number>(2 * m + 1).fill(0);
  for (let i = 0; i < D.length; i++) {
    for (let j = 0; j < N.length; j++) {
      Q[m + i - j] += D[i] * N[j];
      Q[m + j - i] -= D[i] * N[j];
    }
  }
  const scale = Math.max(...Q.map(Math.abs));
  const Qt = P.trim(Q.map((c) => (Math.abs(c) <= 1e-14 * scale ? 0 : c)));
  if (Qt.length < 2) return [];
  const f = (th: number) => {
    const z = cx(Math.cos(th), Math.sin(th));
    const d = P.evalComplex(D, z);
    const n = P.evalComplex(N, z);
    return d.im * n.re - d.re * n.im; // Im(D·conj N)
  };
  const gainScale = Math.max(...D.map(Math.abs)) / Math.max(...N.map(Math.abs));
  const out: UnitCircleCrossing[] = [];
  const thetas: number[] = [];
  for (const r of polyRoots(Qt)) {
    if (Math.abs(cabs(r) - 1) > 1e-6 || r.im < -1e-9) continue;
    let th = Math.abs(Math.atan2(r.im, r.re));
    if (th < 1e-7) th = 0;
    else if (Math.PI - th < 1e-7) th = Math.PI;
    else {
      for (const h of [1e-9, 1e-7, 1e-5]) {
        const a = Math.max(0, th - h);
        const b = Math.min(Math.PI, th + h);
        if (f(a) * f(b) < 0) {
          th = bisectRoot(a, b, f);
          break;
        }
      }
    }
    if (thetas.some((t) => Math.abs(t - th) < 1e-8)) continue;
    const z = th === 0 ? cx(1) : th === Math.PI ? cx(-1) : cx(Math.cos(th), Math.sin(th));
    const nv = P.evalComplex(N, z);
    if (cabs(nv) === 0) continue;
    const kv = cdiv(P.evalComplex(D, z), nv);
    // An open-loop pole on the circle is met at k = 0 (rounding leaves ~1e-16): snap it.
    const k = Math.abs(kv.re) <= 1e-10 * gainScale ? 0 : -kv.re;
    if (!Number.isFinite(k) || Math.abs(kv.im) > 1e-6 * Math.max(1, Math.abs(kv.re))) continue;
    thetas.push(th);
    out.push({ gain: k, z, theta: th, omega: th / sampleTime });
  }
  return out.sort((a, b) => Math.abs(a.gain) - Math.abs(b.gain) || a.theta - b.theta);
}

/** Gain intervals (as |k|) between crossing gains where every root of D + k·N is inside the unit circle. */
function stableRanges(N: number[], D: number[], gains: number[], sgn: number): { from: number; to: number | null }[] {
  const ks = [...new Set(gains.filter((k) => k > 0))].sort((a, b) => a - b);
  const stableAt = (k: number) => {
    const ch = P.add(D, P.scale(N, sgn * k));
    return ch.length <= 1 || polyRoots(ch).every((z) => cabs(z) < 1 - 1e-9);
  };
  const edges = [0, ...ks];
  const out: { from: number; to: number | null }[] = [];
  for (let i = 0; i < edges.length; i++) {
    const a = edges[i];
    const b = i + 1 < edges.length ? edges[i + 1] : null;
    const probe = b === null ? (a === 0 ? 1 : 2 * a) : 0.5 * (a + b);
    if (!stableAt(probe)) continue;
    const last = out[out.length - 1];
    if (last && last.to === a) last.to = b;
    else out.push({ from: a, to: b });
  }
  return out;
}

/** The equivalent s-plane pole s = ln(z)/T of a z-plane pole, with its damping ratio ζ and natural frequency ωn; null at z = 0. */
export function equivalentDamping(z: Complex, sampleTime: number): { s: Complex; zeta: number; omegaN: number } | null {
  const m = cabs(z);
  if (m === 0) return null;
  const s = cx(Math.log(m) / sampleTime, Math.atan2(z.im, z.re) / sampleTime);
  const wn = cabs(s);
  return { s, zeta: wn === 0 ? 1 : -s.re / wn, omegaN: wn };
}

export interface ZPlaneGuides {
  /** The unit circle (stability boundary), counter-clockwise from z = 1. */
  unitCircle: Complex[];
  /** Curves of constant damping ratio ζ: z = e^(sT), s = ωn(−ζ ± j√(1 − ζ²)), from the lower half through z = 1 to the upper half, up to ωd·T = π. */
  damping: { zeta: number; points: Complex[] }[];
  /** Curves of constant natural frequency ωn (≤ π/T), ζ from 0 to 1 and back (lower half, real axis, upper half). */
  naturalFrequency: { omegaN: number; points: Complex[] }[];
}

/**
 * Guide curves for the z-plane locus: where the poles of a continuous second-order system with
 * damping ζ and natural frequency ωn map under z = e^(sT) (Franklin, Powell & Workman, ch. 4
 * (from memory)). Defaults: ζ = 0.1 … 0.9 and ωn = (0.1 … 1.0)·π/T.
 */
export function zPlaneGuides(
  sampleTime: number,
  opts: { dampings?: number[]; naturalFrequencies?: number[]; points?: number } = {},
): ZPlaneGuides {
  const T = sampleTime;
  const n = opts.points ?? 64;
  const zetas = opts.dampings ?? [0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9];
  const wns = opts.naturalFrequencies ?? [0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1].map((f) => (f * Math.PI) / T);
  const ez = (re: number, im: number) => {
    const m = Math.exp(re * T);
    return cx(m * Math.cos(im * T), m * Math.sin(im * T));
  };
  const unitCircle = Array.from({ length: 4 * n + 1 }, (_, i) =>
    cx(Math.cos((2 * Math.PI * i) / (4 * n)), Math.sin((2 * Math.PI * i) / (4 * n))),
  );
  const damping = zetas
    .filter((z) => z >= 0 && z < 1)
    .map((zeta) => {
      const wd = Math.sqrt(1 - zeta * zeta);
      const wnMax = Math.PI / (T * wd);
      const pts: Complex[] = [];
      for (let i = -n; i <= n; i++) {
        const wn = (wnMax * i) / n;
        pts.push(ez(-zeta * Math.abs(wn), wn * wd));
      }
      return { zeta, points: pts };
    });
  const naturalFrequency = wns
    .filter((w) => w > 0 && w * T <= Math.PI + 1e-12)
    .map((omegaN) => {
      const pts: Complex[] = [];
      for (let i = -n; i <= n; i++) {
        const zeta = 1 - Math.abs(i) / n;
        pts.push(ez(-zeta * omegaN, Math.sign(i) * omegaN * Math.sqrt(1 - zeta * zeta)));
      }
      return { omegaN, points: pts };
    });
  return { unitCircle, damping, naturalFrequency };
}
