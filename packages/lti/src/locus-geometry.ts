import { type Complex, cabs, carg, cx } from './complex.ts';
import { MAX_ORDER } from './errors.ts';
import * as P from './poly.ts';
import { polyRootsDetailed } from './roots.ts';
import { type FactoredPoly, factoredLogDerivative, factoredRatio } from './pencil.ts';
import type { LocusAngle, RootLocus } from './locus.ts';

/**
 * Root-locus geometry of D(s) + k·N(s) = 0 (rules: Ogata, Sec. 6-2; Nise, Ch. 8 (from memory)):
 * asymptotes, real-axis segments, breakaway/break-in points, imaginary-axis crossings and
 * departure/arrival angles. Poles and zeros come in product form (pencil.ts), repeated ones at
 * their exact centres; every special point found from a coefficient polynomial is polished and
 * checked in product form, so high orders (poles (s + 1)^20, thirty distinct poles) keep their
 * geometry.
 */

const DEG = 180 / Math.PI;
export const normDeg = (a: number): number => {
  let x = a % 360;
  if (x <= -180) x += 360;
  if (x > 180) x -= 360;
  return x;
};

/** The gain k = −D(s)/N(s) that puts a closed-loop pole at s (product form: no overflow on the way). */
export const gainIn = (Nf: FactoredPoly, Df: FactoredPoly, s: Complex): Complex => {
  const r = factoredRatio(Df, Nf, s);
  return cx(-r.re, -r.im);
};

export function asymptotesOf(N: readonly number[], D: readonly number[], sgn: number): RootLocus['asymptotes'] {
  const n = D.length - 1;
  const m = N.length - 1;
  const out: RootLocus['asymptotes'] = { centroid: null, anglesDeg: [] };
  if (n <= m) return out;
  // From the coefficients: Σpoles = −d_{n−1}/d_n, Σzeros = −n_{m−1}/n_m.
  const sumP = n > 0 ? -(D[n - 1] ?? 0) / D[n] : 0;
  const sumZ = m > 0 ? -(N[m - 1] ?? 0) / N[m] : 0;
  out.centroid = (sumP - sumZ) / (n - m);
  const kcPositive = sgn * (P.lead(N) / P.lead(D)) > 0;
  for (let q = 0; q < n - m; q++) out.anglesDeg.push(normDeg(((kcPositive ? 2 * q + 1 : 2 * q) * 180) / (n - m)));
  return out;
}

function angleEntry(at: Complex, sumDeg: number, mu: number): LocusAngle {
  const anglesDeg: number[] = [];
  for (let q = 0; q < mu; q++) anglesDeg.push(normDeg((sumDeg + 360 * q) / mu));
  return { at, angleDeg: anglesDeg[0], multiplicity: mu, anglesDeg };
}

/** Departure angles at complex poles and arrival angles at complex zeros (each with its multiplicity). */
export function anglesOf(
  N: readonly number[],
  D: readonly number[],
  Nf: FactoredPoly,
  Df: FactoredPoly,
  sgn: number,
): { departures: LocusAngle[]; arrivals: LocusAngle[] } {
  const kcAngle = sgn * (P.lead(N) / P.lead(D)) > 0 ? 0 : 180;
  const arg = (a: Complex, b: Complex) => carg(cx(a.re - b.re, a.im - b.im)) * DEG;
  const departures: LocusAngle[] = [];
  for (const pc of Df.factors) {
    if (pc.root.im === 0) continue;
    let sum = kcAngle - 180;
    for (const z of Nf.factors) sum += z.multiplicity * arg(pc.root, z.root);
    for (const p of Df.factors) if (p !== pc) sum -= p.multiplicity * arg(pc.root, p.root);
    departures.push(angleEntry(pc.root, sum, pc.multiplicity));
  }
  const arrivals: LocusAngle[] = [];
  for (const zc of Nf.factors) {
    if (zc.root.im === 0) continue;
    let sum = 180 - kcAngle;
    for (const z of Nf.factors) if (z !== zc) sum -= z.multiplicity * arg(zc.root, z.root);
    for (const p of Df.factors) sum += p.multiplicity * arg(zc.root, p.root);
    arrivals.push(angleEntry(zc.root, sum, zc.multiplicity));
  }
  return { departures, arrivals };
}

/** The distance from s to the nearest pole or zero, relative to 1 + |s|. */
function nearRoot(f: FactoredPoly, s: Complex, rel: number): boolean {
  return f.factors.some((g) => Math.hypot(s.re - g.root.re, s.im - g.root.im) <= rel * (1 + cabs(s)));
}

/**
 * Breakaway / break-in points: critical points of k(s) = −D/N, i.e. roots of N·D′ − N′·D
 * (found as a coefficient polynomial of degree ≤ 2·MAX_ORDER), each polished by Newton's
 * method on D′/D − N′/N = 0 in product form, kept when k there is real with the locus's sign.
 * A root of multiplicity μ of N·D′ − N′·D is a point where μ + 1 branches meet.
 */
export function findBreakaways(N: number[], D: number[], Nf: FactoredPoly, Df: FactoredPoly, sgn: number): RootLocus['breakaways'] {
  const B = P.sub(P.mul(N, P.derivative(D)), P.mul(P.derivative(N), D));
  if (P.trim(B).length < 2) return [];
  const found = polyRootsDetailed(B, { maxDegree: 2 * MAX_ORDER });
  const seen: Complex[] = [];
  const out: RootLocus['breakaways'] = [];
  const multiplicityOf = (z: Complex) => found.roots.filter((w) => w.re === z.re && w.im === z.im).length;
  for (const z0 of found.roots) {
    if (seen.some((w) => w.re === z0.re && w.im === z0.im)) continue;
    seen.push(z0);
    const mu = multiplicityOf(z0);
    if (nearRoot(Df, z0, 1e-9) || nearRoot(Nf, z0, 1e-9)) continue; // a repeated pole (k = 0) or zero (k = ∞)
    const s = mu === 1 ? polishCritical(Nf, Df, z0) : z0;
    if (nearRoot(Df, s, 1e-9) || nearRoot(Nf, s, 1e-9)) continue;
    const k = gainIn(Nf, Df, s);
    if (!Number.isFinite(k.re) || k.re === 0) continue;
    // Complex gain: not on any real-gain locus. The bound is tight because near a (near-)triple
    // point k(s) ≈ k0 + a(s − c)³ has critical points off the axis with Im k ~ a·r³, tiny but not 0.
    if (Math.abs(k.im) > 1e-9 * Math.abs(k.re)) continue;
    if (Math.sign(k.re) !== sgn) continue;
    const pt = Math.abs(s.im) <= 1e-12 * (1 + cabs(s)) ? cx(s.re) : s;
    out.push({ s: pt, gain: k.re, branches: mu + 1 });
  }
  return out.sort((a, b) => Math.abs(a.gain) - Math.abs(b.gain) || a.s.re - b.s.re || a.s.im - b.s.im);
}

/** Newton on g(s) = D′/D − N′/N (g′ = −Σ m/(s − p)² + Σ m/(s − z)²); keeps a step while |g| falls. */
function polishCritical(Nf: FactoredPoly, Df: FactoredPoly, z0: Complex): Complex {
  const g = (s: Complex) => {
    const a = factoredLogDerivative(Df, s);
    const b = factoredLogDerivative(Nf, s);
    return cx(a.re - b.re, a.im - b.im);
  };
  const dg = (s: Complex) => {
    let re = 0;
    let im = 0;
    const add = (f: FactoredPoly, sign: number) => {
      for (const q of f.factors) {
        const dr = s.re - q.root.re;
        const di = s.im - q.root.im;
        const d2r = dr * dr - di * di;
        const d2i = 2 * dr * di;
        const mm = d2r * d2r + d2i * d2i;
        if (mm === 0) continue;
        re += (sign * q.multiplicity * d2r) / mm;
        im -= (sign * q.multiplicity * d2i) / mm;
      }
    };
    add(Df, -1);
    add(Nf, 1);
    return cx(re, im);
  };
  let z = z0;
  let gz = g(z);
  let fz = cabs(gz);
  const real = z0.im === 0;
  for (let it = 0; it < 12 && fz > 0; it++) {
    const d = dg(z);
    const dd = d.re * d.re + d.im * d.im;
    if (!(dd > 0)) break;
    const step = cx((gz.re * d.re + gz.im * d.im) / dd, (gz.im * d.re - gz.re * d.im) / dd);
    const next = cx(z.re - step.re, real ? 0 : z.im - step.im);
    const gn = g(next);
    const fn = cabs(gn);
    if (!(fn < fz)) break;
    z = next;
    gz = gn;
    fz = fn;
  }
  return z;
}

/** Real and imaginary parts of p(jω) as real polynomials in ω. */
function splitJw(p: readonly number[]): { re: number[]; im: number[] } {
  const re: number[] = [];
  const im: number[] = [];
  for (let i = 0; i < p.length; i++) {
    const sign = (i >> 1) % 2 === 0 ? 1 : -1; // j^i = 1, j, −1, −j
    re.push(i % 2 === 0 ? sign * p[i] : 0);
    im.push(i % 2 === 1 ? sign * p[i] : 0);
  }
  return { re: P.trim(re), im: P.trim(im) };
}

/**
 * θ(ω) = arg D(jω) − arg N(jω) from the factors: each arg(jω − r) = atan2(ω − Im r, −Re r) is
 * continuous in ω (for roots off the axis), so θ is too, and −D(jω)/N(jω) is real exactly where
 * θ + arg(lead D/lead N) is a multiple of π.
 */
function thetaOf(Nf: FactoredPoly, Df: FactoredPoly): { theta: (w: number) => number; dtheta: (w: number) => number } {
  const theta = (w: number) => {
    let t = 0;
    for (const f of Df.factors) t += f.multiplicity * Math.atan2(w - f.root.im, -f.root.re);
    for (const f of Nf.factors) t -= f.multiplicity * Math.atan2(w - f.root.im, -f.root.re);
    return t;
  };
  // d/dω arg(jω − r) = Re(1/(jω − r)) = −Re r/|jω − r|².
  const dtheta = (w: number) => {
    let t = 0;
    for (const f of Df.factors) t += (f.multiplicity * -f.root.re) / (f.root.re ** 2 + (w - f.root.im) ** 2);
    for (const f of Nf.factors) t -= (f.multiplicity * -f.root.re) / (f.root.re ** 2 + (w - f.root.im) ** 2);
    return t;
  };
  return { theta, dtheta };
}

/**
 * jω-axis crossings s = ±jω with the exact gain. Candidates come from two independent
 * sources — the roots in x = ω² of Im(D·conj N)(jω)/ω (exact algebra, but a coefficient
 * polynomial), and level crossings θ(ω) = qπ on a log grid (product form) — and each is
 * refined by Newton's method on θ(ω) − qπ, then kept when −D(jω)/N(jω) is real with the
 * locus's sign. ω = 0 is a crossing when D(0) + k·N(0) = 0.
 */
export function findCrossings(N: number[], D: number[], Nf: FactoredPoly, Df: FactoredPoly, sgn: number): RootLocus['crossings'] {
  const out: RootLocus['crossings'] = [];
  const n0 = N[0] ?? 0;
  const d0 = D[0] ?? 0;
  if (n0 !== 0 && d0 !== 0 && Math.sign(-d0 / n0) === sgn) out.push({ omega: 0, gain: -d0 / n0 });
  const cands: number[] = [];
  // (a) algebraic: Q(ω) = Im(D(jω)·conj N(jω)) = ω·Q2(ω²).
  const dj = splitJw(D);
  const nj = splitJw(N);
  const Q = P.sub(P.mul(dj.im, nj.re), P.mul(dj.re, nj.im));
  // Identically zero: −D/N is real all along the axis, which the locus then runs along
  // (crossings are not isolated points); a constant cannot vanish.
  if (Q.length < 2) return out;
  {
    const Q2: number[] = [];
    for (let i = 1; i < Q.length; i += 2) Q2.push(Q[i]);
    const q2 = P.trim(Q2);
    if (q2.length >= 2) {
      try {
        for (const x of polyRootsDetailed(q2, { maxDegree: 2 * MAX_ORDER }).roots) {
          if (x.re > 0 && Math.abs(x.im) <= 1e-6 * x.re) cands.push(Math.sqrt(x.re));
        }
      } catch {
        // A coefficient polynomial too wide for floating point: the grid scan below still runs.
      }
    }
  }
  // (b) level crossings of θ on a log grid through every feature frequency.
  const { theta, dtheta } = thetaOf(Nf, Df);
  const feats = [...Nf.factors, ...Df.factors].map((f) => cabs(f.root)).filter((x) => x > 0 && Number.isFinite(x));
  const lo = feats.length ? Math.min(...feats) * 1e-3 : 1e-3;
  const hi = feats.length ? Math.max(...feats) * 1e3 : 1e3;
  const grid: number[] = [];
  const decades = Math.log10(hi / lo);
  const count = Math.min(6000, Math.ceil(decades * 60) + 1);
  for (let i = 0; i < count; i++) grid.push(lo * (hi / lo) ** (i / (count - 1)));
  for (const f of [...Nf.factors, ...Df.factors]) {
    const w0 = Math.abs(f.root.im);
    if (w0 === 0) continue;
    const width = Math.max(Math.abs(f.root.re), 1e-9 * w0);
    for (const k of [-4, -1, -0.25, 0.25, 1, 4]) if (w0 + k * width > 0) grid.push(w0 + k * width);
  }
  grid.sort((a, b) => a - b);
  let tPrev = theta(grid[0]);
  for (let i = 1; i < grid.length; i++) {
    const t = theta(grid[i]);
    const a = Math.min(tPrev, t);
    const b = Math.max(tPrev, t);
    for (let q = Math.ceil(a / Math.PI); q * Math.PI <= b && q * Math.PI > a - 1e-300; q++) {
      let xa = grid[i - 1];
      let xb = grid[i];
      const level = q * Math.PI;
      const fa = tPrev - level;
      for (let it = 0; it < 200 && xb - xa > 1e-15 * xb; it++) {
        const xm = 0.5 * (xa + xb);
        if (theta(xm) - level > 0 === fa > 0) xa = xm;
        else xb = xm;
      }
      cands.push(0.5 * (xa + xb));
    }
    tPrev = t;
  }
  const seen: number[] = [];
  // Below this an ω is the crossing at the origin (already handled exactly above).
  const tiny = 1e-12 * (feats.length ? Math.max(...feats) : 1);
  for (const c of cands) {
    const w = polishCrossing(theta, dtheta, c);
    if (!(w > tiny) || !Number.isFinite(w)) continue;
    if (seen.some((v) => Math.abs(v - w) <= 1e-9 * (1 + w))) continue;
    const s = cx(0, w);
    if (nearRoot(Df, s, 1e-10) || nearRoot(Nf, s, 1e-10)) continue; // a pole (k = 0) or zero (k = ∞) on the axis
    const k = gainIn(Nf, Df, s);
    if (!Number.isFinite(k.re) || k.re === 0) continue;
    // Polished in product form, a true crossing has Im k at rounding level.
    if (Math.abs(k.im) > 1e-9 * Math.abs(k.re)) continue;
    if (Math.sign(k.re) !== sgn) continue;
    // Next to the crossing at the origin, at its gain: the same event (a root passing through 0).
    if (out.some((x) => x.omega === 0 && Math.abs(x.gain - k.re) <= 1e-6 * Math.abs(k.re)) && w < 1e-6 * (1 + Math.max(0, ...feats)))
      continue;
    seen.push(w);
    out.push({ omega: w, gain: k.re });
  }
  return out.sort((a, b) => Math.abs(a.gain) - Math.abs(b.gain) || a.omega - b.omega);
}

/** Newton on θ(ω) − qπ (q the nearest multiple), keeping a step while the residual falls. */
function polishCrossing(theta: (w: number) => number, dtheta: (w: number) => number, w0: number): number {
  let w = w0;
  const level = Math.round(theta(w) / Math.PI) * Math.PI;
  let f = theta(w) - level;
  for (let it = 0; it < 8 && f !== 0; it++) {
    const d = dtheta(w);
    if (!(Math.abs(d) > 0)) break;
    const next = w - f / d;
    if (!(next > 0)) break;
    const fn = theta(next) - level;
    if (!(Math.abs(fn) < Math.abs(f))) break;
    w = next;
    f = fn;
  }
  return w;
}

/**
 * Real-axis parts: intervals between real poles/zeros where k(σ) = −D(σ)/N(σ) has the locus's
 * sign. The sign comes from the factors (complex pairs are positive on the real axis).
 */
export function realSegments(Nf: FactoredPoly, Df: FactoredPoly, sgn: number): RootLocus['realAxisSegments'] {
  const reals = [...Df.factors, ...Nf.factors].filter((f) => f.root.im === 0);
  const pts = [...new Set(reals.map((f) => f.root.re))].sort((a, b) => a - b);
  const edges = [-Infinity, ...pts, Infinity];
  const signAt = (x: number) => {
    let s = -Math.sign(Df.lead / Nf.lead);
    for (const f of reals) if (f.multiplicity % 2 === 1 && x < f.root.re) s = -s;
    return s;
  };
  const onLocus: boolean[] = [];
  for (let i = 0; i + 1 < edges.length; i++) {
    const a = edges[i];
    const b = edges[i + 1];
    const mid =
      a === -Infinity && b === Infinity ? 0 : a === -Infinity ? b - 1 - Math.abs(b) : b === Infinity ? a + 1 + Math.abs(a) : 0.5 * (a + b);
    onLocus.push(signAt(mid) === sgn);
  }
  const out: RootLocus['realAxisSegments'] = [];
  for (let i = 0; i < onLocus.length; i++) {
    if (!onLocus[i]) continue;
    const from = edges[i];
    let j = i;
    while (j + 1 < onLocus.length && onLocus[j + 1]) j++;
    out.push({ from, to: edges[j + 1] });
    i = j;
  }
  return out;
}

/** The largest gain magnitude traced by default: far enough that every branch shows where it goes. */
export function autoKMax(Nf: FactoredPoly, Df: FactoredPoly, R: number, special: readonly number[]): number {
  const n = Df.degree;
  const m = Nf.degree;
  let logk = -Infinity;
  for (const g of special) logk = Math.max(logk, Math.log(10 * g));
  // Asymptotic branches reach |s| ≈ 10·R: |k·lead N| ≈ |lead D|·|s|^(n−m).
  if (n > m) logk = Math.max(logk, Math.log(Math.abs(Df.lead / Nf.lead)) + (n - m) * Math.log(10 * R));
  // Branches ending at zeros come within 1 % of R of them.
  for (const z of Nf.factors) {
    const v = cabs(factoredRatio(Df, Nf, cx(z.root.re + 0.01 * R, z.root.im)));
    if (Number.isFinite(v) && v > 0) logk = Math.max(logk, Math.log(v));
  }
  // n = m: the leading coefficient of D + kN vanishes at k* = −lead D/lead N; go well past it.
  if (n === m) logk = Math.max(logk, Math.log(100 * Math.abs(Df.lead / Nf.lead)));
  if (!Number.isFinite(logk)) return 1;
  // Gains beyond 1e300 cannot be represented with room for the trace's arithmetic.
  return Math.exp(Math.min(logk, Math.log(1e300)));
}
