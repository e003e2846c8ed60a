import { type Complex, cabs, cx } from './complex.ts';
import { companionEigenvalues } from './companion.ts';
import * as P from './poly.ts';

/**
 * Numerical multiplicity of computed roots. A root of multiplicity m is split by rounding
 * into a small circle of radius ~(eps·cond)^(1/m) (for (s + 1)^40 that is about 0.4), so
 * neither a fixed distance nor the raw roots tell a repeated root from close distinct ones.
 * Here (in the spirit of Zeng's numerical multiplicity, ACM TOMS 31 (2005) (from memory)):
 *  1. each computed root gets an uncertainty radius ρ — the distance at which p can change by
 *     its own rounding level K·eps·Σ|c_k||z|^k, from the Taylor coefficients at the root;
 *  2. roots whose discs overlap form groups (connected components);
 *  3. a group of m roots is ONE root of multiplicity m at c when p is within rounding of a
 *     polynomial with an exact m-fold root at c: every Taylor coefficient t_j(c), j < m, is at
 *     its rounding level, and t_m(c) is clearly (50×) above it (the multiplicity is determined, not
 *     a region where p is flat to rounding, as near the middle roots of Wilkinson's polynomial).
 *     The centre c is the simple root of p^(m−1) found by Newton from the group's mean.
 *  Groups that fail are shrunk (farthest member out) and tried again.
 * Each root gets an error estimate: K·eps·S_(m−1)(c)/(m·|t_m(c)|) for a validated m-fold root
 * (the simple root of p^(m−1)), the first-order K·eps·S(z)/|p'(z)| for an isolated root, and its
 * disc radius for a member of a group that is not one multiple root (an ill-conditioned cluster).
 */
export interface MultiplicityResult {
  /** The roots, a validated m-fold root as m copies of its centre. Same order as the input. */
  roots: Complex[];
  /** Estimated absolute error of each root. */
  errors: number[];
  /** The validated multiple roots (multiplicity ≥ 2) with the raw roots they replace. */
  multiple: { center: Complex; multiplicity: number; members: Complex[] }[];
}

const EPS = 2.220446049250313e-16;

/** Taylor coefficients t_j = p^(j)(z)/j! of p at z (complete Horner scheme), real and imaginary parts. */
function taylorAt(c: readonly number[], z: Complex): { re: Float64Array; im: Float64Array } {
  const n = c.length - 1;
  const re = Float64Array.from(c);
  const im = new Float64Array(n + 1);
  for (let j = 0; j < n; j++) {
    for (let k = n - 1; k >= j; k--) {
      // b_k += z·b_(k+1)
      const r = re[k + 1] * z.re - im[k + 1] * z.im;
      const i = re[k + 1] * z.im + im[k + 1] * z.re;
      re[k] += r;
      im[k] += i;
    }
  }
  return { re, im };
}

/** Taylor coefficients of the polynomial with coefficients |c_k| at x = |z| (real): the rounding scales S_j. */
function absTaylorAt(c: readonly number[], x: number): Float64Array {
  const n = c.length - 1;
  const t = Float64Array.from(c, Math.abs);
  for (let j = 0; j < n; j++) for (let k = n - 1; k >= j; k--) t[k] += x * t[k + 1];
  return t;
}

export function rootMultiplicities(c: readonly number[], raw: readonly Complex[]): MultiplicityResult {
  const n = c.length - 1;
  const K = 8 * (n + 1);
  const m = raw.length;
  const roots = raw.slice();
  const errors = new Array<number>(m).fill(0);
  const multiple: MultiplicityResult['multiple'] = [];
  if (m === 0) return { roots, errors, multiple };
  // 1. Uncertainty radii. First order, ρ1 = K·eps·S_0/|p′(z)| (cheap, and never smaller than
  //    the full radius), screens out roots whose discs touch no other; the rest get the full
  //    radius: the smallest ρ with |t_j|·ρ^j ≥ K·eps·S_0 for some j ≥ 1.
  const rho = new Array<number>(m);
  for (let i = 0; i < m; i++) {
    const z = raw[i];
    const a = cabs(z);
    let pr = c[n];
    let pi = 0;
    let dr = 0;
    let di = 0;
    let s0 = Math.abs(c[n]);
    for (let k = n - 1; k >= 0; k--) {
      const ndr = dr * z.re - di * z.im + pr;
      di = dr * z.im + di * z.re + pi;
      dr = ndr;
      const npr = pr * z.re - pi * z.im + c[k];
      pi = pr * z.im + pi * z.re;
      pr = npr;
      s0 = s0 * a + Math.abs(c[k]);
    }
    const d1 = Math.hypot(dr, di);
    rho[i] = d1 > 0 ? (K * EPS * s0) / d1 : Infinity;
    errors[i] = rho[i];
  }
  const touching = new Array<boolean>(m).fill(false);
  let any = false;
  for (let i = 0; i < m; i++) {
    for (let j = i + 1; j < m; j++) {
      if (Math.hypot(raw[i].re - raw[j].re, raw[i].im - raw[j].im) <= rho[i] + rho[j]) touching[i] = touching[j] = any = true;
    }
  }
  if (!any) return { roots, errors, multiple };
  for (let i = 0; i < m; i++) {
    if (!touching[i]) continue;
    const z = raw[i];
    const t = taylorAt(c, z);
    const s0 = absTaylorAt(c, cabs(z))[0];
    const level = K * EPS * s0;
    let r = Infinity;
    for (let j = 1; j <= n; j++) {
      const tj = Math.hypot(t.re[j], t.im[j]);
      if (tj > 0) r = Math.min(r, (level / tj) ** (1 / j));
    }
    rho[i] = r;
    errors[i] = Math.min(errors[i], r);
  }
  // 2. Groups: connected components of overlapping discs.
  const group = new Array<number>(m).fill(-1);
  let groups = 0;
  for (let i = 0; i < m; i++) {
    if (group[i] >= 0) continue;
    const stack = [i];
    group[i] = groups;
    while (stack.length) {
      const a = stack.pop()!;
      for (let b = 0; b < m; b++) {
        if (group[b] >= 0) continue;
        if (Math.hypot(raw[a].re - raw[b].re, raw[a].im - raw[b].im) <= rho[a] + rho[b]) {
          group[b] = groups;
          stack.push(b);
        }
      }
    }
    groups++;
  }
  // 3. Each group seeds a candidate multiple root: grown to every raw root inside the
  //    pseudozero radius of its centre, then validated (and shrunk while it fails).
  const taken = new Array<boolean>(m).fill(false);
  const conjOf = (i: number) => {
    for (let j = 0; j < m; j++) if (raw[j].re === raw[i].re && raw[j].im === -raw[i].im) return j;
    return -1;
  };
  /** Records a validated m-fold root at `centre` for the given raw roots (and the mirror for a complex one). */
  const assign = (centre: Complex, members: number[], self: boolean, error: number): boolean => {
    const lower = self ? [] : members.map(conjOf);
    if (!self && lower.some((j) => j < 0 || taken[j] || members.includes(j))) return false;
    for (const i of members) {
      roots[i] = centre;
      errors[i] = error;
      taken[i] = true;
    }
    multiple.push({ center: centre, multiplicity: members.length, members: members.map((i) => raw[i]) });
    if (!self) {
      const conj = cx(centre.re, -centre.im);
      for (const j of lower) {
        roots[j] = conj;
        errors[j] = error;
        taken[j] = true;
      }
      multiple.push({ center: conj, multiplicity: lower.length, members: lower.map((j) => raw[j]) });
    }
    return true;
  };
  for (let g = 0; g < groups; g++) {
    const seed: number[] = [];
    for (let i = 0; i < m; i++) if (group[i] === g && !taken[i]) seed.push(i);
    if (seed.length < 2) continue;
    const straddles = seed.some((i) => raw[i].im === 0 || group[conjOf(i)] === g);
    if (!straddles && raw[seed[0]].im < 0) continue; // the mirror of an upper group: handled with it
    const attempts: { start: number[]; self: boolean }[] = straddles
      ? [
          { start: seed, self: true },
          { start: seed.filter((i) => raw[i].im > 0), self: false },
        ]
      : [{ start: seed, self: false }];
    for (const { start, self } of attempts) {
      if (start.length < 2) continue;
      const found = growAndValidate(c, raw, start, self, taken, K);
      if (found && assign(found.centre, found.members, self, found.error)) break;
    }
  }
  // 4. Groups still unexplained may hold several multiple roots whose rounding circles overlap
  //    ((s + 1)^20·(s² + s + 4)^10): an m-fold root is a simple root of p^(m−1), so the roots of
  //    the derivatives inside the group are the candidate centres, largest m first.
  for (let g = 0; g < groups; g++) {
    const free: number[] = [];
    for (let i = 0; i < m; i++) if (group[i] === g && !taken[i]) free.push(i);
    if (free.length < 3) continue;
    if (!free.some((i) => raw[i].im >= 0)) continue;
    derivativeCandidates(c, raw, free, taken, K, assign);
  }
  return { roots, errors, multiple };
}

/** Step 4 above, for one group of free raw roots. */
function derivativeCandidates(
  c: readonly number[],
  raw: readonly Complex[],
  free: number[],
  taken: boolean[],
  K: number,
  assign: (centre: Complex, members: number[], self: boolean, error: number) => boolean,
): void {
  const n = c.length - 1;
  let mre = 0;
  let mim = 0;
  for (const i of free) {
    mre += raw[i].re;
    mim += raw[i].im;
  }
  mre /= free.length;
  mim /= free.length;
  let reach = 0;
  for (const i of free) reach = Math.max(reach, Math.hypot(raw[i].re - mre, raw[i].im - mim));
  reach = 1.5 * reach + 1e-12 * (1 + Math.hypot(mre, mim));
  const derivs: number[][] = [c.slice()];
  for (let j = 1; j < n; j++) derivs.push(P.derivative(derivs[j - 1]));
  for (let mult = Math.min(free.length, n - 1); mult >= 2; mult--) {
    const q = derivs[mult - 1];
    if (q.length < 2) continue;
    let cands: Complex[];
    try {
      cands = q.length === 2 ? [cx(-q[0] / q[1])] : companionEigenvalues(q, 'derivative of the polynomial');
    } catch {
      continue;
    }
    for (const z0 of cands) {
      const left = free.filter((i) => !taken[i]);
      if (left.length < mult) break;
      if (z0.im < 0 || Math.hypot(z0.re - mre, z0.im - mim) > reach) continue;
      const self = Math.abs(z0.im) <= 1e-6 * reach;
      const centre = refineCentre(c, self ? cx(z0.re) : z0, mult, reach);
      if (!centre) continue;
      const verdict = multipleRootAt(c, centre, mult, K);
      if (!verdict) continue;
      // The m free raw roots nearest the centre (upper-half ones for a complex centre).
      const pool = left.filter((i) => self || raw[i].im > 0);
      if (pool.length < mult) continue;
      pool.sort(
        (a, b) => Math.hypot(raw[a].re - centre.re, raw[a].im - centre.im) - Math.hypot(raw[b].re - centre.re, raw[b].im - centre.im),
      );
      let members = pool.slice(0, mult);
      if (self) {
        // Keep a real group closed under conjugation: swap in missing mirrors where possible.
        members = closeUnderConjugation(raw, members, pool, mult);
        if (members.length !== mult) continue;
      }
      assign(centre, members, self, verdict.error);
    }
  }
}

/** A set of `mult` indices from `pool` that contains the mirror of each complex member, or []. */
function closeUnderConjugation(raw: readonly Complex[], first: number[], pool: number[], mult: number): number[] {
  const out: number[] = [];
  for (const i of pool) {
    if (out.length >= mult) break;
    if (out.includes(i)) continue;
    if (raw[i].im === 0) {
      out.push(i);
      continue;
    }
    const j = pool.find((q) => q !== i && !out.includes(q) && raw[q].re === raw[i].re && raw[q].im === -raw[i].im);
    if (j === undefined || out.length + 2 > mult) continue;
    out.push(i, j);
  }
  return out.length === mult && first.length === mult ? out : [];
}

/**
 * Grows a seed group to all free raw roots within 3× the pseudozero radius
 * (K·eps·S_0(c)/|t_m(c)|)^(1/m) of its mean c, then validates it as one m-fold root; while it
 * fails, the member farthest from the mean is dropped. `self`: the group straddles the real axis
 * (its centre is real and it holds conjugate pairs); otherwise only upper-half roots are taken.
 */
function growAndValidate(
  c: readonly number[],
  raw: readonly Complex[],
  seed: number[],
  self: boolean,
  taken: readonly boolean[],
  K: number,
): { centre: Complex; members: number[]; error: number } | null {
  const meanOf = (set: number[]) => {
    let re = 0;
    let im = 0;
    for (const i of set) {
      re += raw[i].re;
      im += raw[i].im;
    }
    return cx(re / set.length, self ? 0 : im / set.length);
  };
  const degree = c.length - 1;
  let set = seed.slice();
  let reach = 0; // how far the centre may lie from the mean: the pseudozero radius
  for (let it = 0; it < 6; it++) {
    const mean = meanOf(set);
    const mult = set.length;
    const t = taylorAt(c, mean);
    const tm = Math.hypot(t.re[mult], t.im[mult]);
    const s0 = absTaylorAt(c, cabs(mean))[0];
    if (!(tm > 0)) break;
    const radius = 3 * ((K * EPS * s0) / tm) ** (1 / mult);
    reach = Math.max(reach, radius);
    const next: number[] = [];
    for (let i = 0; i < raw.length; i++) {
      if (taken[i] || (!self && !(raw[i].im > 0))) continue;
      if (set.includes(i) || Math.hypot(raw[i].re - mean.re, raw[i].im - mean.im) <= radius) next.push(i);
    }
    if (next.length === set.length || next.length > degree) break;
    set = next;
  }
  while (set.length >= 2) {
    const mean = meanOf(set);
    let spread = 0;
    let far = 0;
    set.forEach((i, q) => {
      const d = Math.hypot(raw[i].re - mean.re, raw[i].im - mean.im);
      if (d > spread) {
        spread = d;
        far = q;
      }
    });
    const centre = refineCentre(c, mean, set.length, Math.max(2 * spread, reach));
    const verdict = centre ? multipleRootAt(c, centre, set.length, K) : null;
    if (centre && verdict) return { centre, members: set, error: verdict.error };
    set = set.filter((_, q) => q !== far);
  }
  return null;
}

/** Newton on p^(m−1) from the mean (a simple root there); null when it moves farther than `reach`. */
function refineCentre(c: readonly number[], z0: Complex, mult: number, reach: number): Complex | null {
  let z = z0;
  const real = z0.im === 0;
  let best = Infinity;
  for (let it = 0; it < 12; it++) {
    const t = taylorAt(c, z);
    // p^(m−1)/(m−1)! = t_(m−1), its derivative = m·t_m.
    const fr = t.re[mult - 1];
    const fi = t.im[mult - 1];
    const dr = mult * t.re[mult];
    const di = mult * t.im[mult];
    const f = Math.hypot(fr, fi);
    if (!(f < best)) break;
    best = f;
    const dd = dr * dr + di * di;
    if (dd === 0 || f === 0) break;
    const sr = (fr * dr + fi * di) / dd;
    const si = (fi * dr - fr * di) / dd;
    z = cx(z.re - sr, real ? 0 : z.im - si);
    if (Math.hypot(sr, si) <= 2 * EPS * cabs(z)) break;
  }
  if (Math.hypot(z.re - z0.re, z.im - z0.im) > reach + 4 * EPS * (1 + cabs(z0))) return null;
  return z;
}

/**
 * Is p within rounding of a polynomial with an m-fold root at c, of multiplicity exactly m?
 * Returns the error estimate of c, or null.
 */
function multipleRootAt(c: readonly number[], z: Complex, mult: number, K: number): { error: number } | null {
  const t = taylorAt(c, z);
  const s = absTaylorAt(c, cabs(z));
  for (let j = 0; j < mult; j++) {
    if (Math.hypot(t.re[j], t.im[j]) > K * EPS * s[j]) return null;
  }
  const tm = Math.hypot(t.re[mult], t.im[mult]);
  if (!(tm > 50 * K * EPS * s[mult])) return null;
  return { error: (K * EPS * s[mult - 1]) / (mult * tm) };
}
