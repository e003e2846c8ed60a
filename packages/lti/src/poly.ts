import { type Complex, cx } from './complex.ts';
import { InputError, MAX_ORDER, assertFinite } from './errors.ts';

/**
 * A real polynomial as its coefficients in ASCENDING powers: p[0] + p[1]·s + p[2]·s² + …
 * This one order is used everywhere in Loopwright. The zero polynomial is [] (or [0]);
 * functions here return trimmed arrays (no trailing zeros), and never mutate their inputs.
 */
export type Poly = readonly number[];

/** Removes trailing (highest-power) coefficients whose size is at most `tol` × the largest. */
export function trim(p: Poly, tol = 0): number[] {
  let scale = 0;
  for (const c of p) scale = Math.max(scale, Math.abs(c));
  let n = p.length;
  while (n > 0 && Math.abs(p[n - 1]) <= tol * scale) n--;
  if (n > 0 && p[n - 1] === 0) n--;
  return p.slice(0, n);
}

export const degree = (p: Poly): number => trim(p).length - 1; // -1 for the zero polynomial
export const isZero = (p: Poly): boolean => trim(p).length === 0;
export const lead = (p: Poly): number => {
  const t = trim(p);
  return t.length ? t[t.length - 1] : 0;
};
export const constant = (c: number): number[] => (c === 0 ? [] : [c]);

export function add(a: Poly, b: Poly): number[] {
  const n = Math.max(a.length, b.length);
  const out = new Array<number>(n);
  for (let i = 0; i < n; i++) out[i] = (a[i] ?? 0) + (b[i] ?? 0);
  return trim(out);
}

export const scale = (a: Poly, k: number): number[] => trim(a.map((c) => c * k));
export const sub = (a: Poly, b: Poly): number[] => add(a, scale(b, -1));

export function mul(a: Poly, b: Poly): number[] {
  if (a.length === 0 || b.length === 0) return [];
  const out = new Array<number>(a.length + b.length - 1).fill(0);
  for (let i = 0; i < a.length; i++) {
    const ai = a[i];
    if (ai === 0) continue;
    for (let j = 0; j < b.length; j++) out[i + j] += ai * b[j];
  }
  return trim(out);
}

/** p^n for an integer n ≥ 0, by repeated squaring. */
export function pow(p: Poly, n: number): number[] {
  if (!Number.isInteger(n) || n < 0) throw new InputError(`polynomial power must be a whole number ≥ 0, got ${n}`);
  let result: number[] = [1];
  let base = trim(p);
  let k = n;
  while (k > 0) {
    if (k & 1) result = mul(result, base);
    k >>= 1;
    if (k) base = mul(base, base);
  }
  return result;
}

/** Polynomial long division a = q·b + r with deg r < deg b. */
export function divmod(a: Poly, b: Poly): { q: number[]; r: number[] } {
  const bt = trim(b);
  if (bt.length === 0) throw new InputError('polynomial division by zero');
  const r = trim(a).slice();
  const db = bt.length - 1;
  const lb = bt[db];
  if (r.length - 1 < db) return { q: [], r: trim(r) };
  const q = new Array<number>(r.length - db).fill(0);
  for (let k = r.length - 1 - db; k >= 0; k--) {
    const f = r[k + db] / lb;
    q[k] = f;
    for (let j = 0; j <= db; j++) r[k + j] -= f * bt[j];
    r[k + db] = 0;
  }
  return { q: trim(q), r: trim(r.slice(0, db)) };
}

/** Derivative dp/ds. */
export function derivative(p: Poly): number[] {
  const out: number[] = [];
  for (let i = 1; i < p.length; i++) out.push(i * p[i]);
  return trim(out);
}

/** Composition p(q(s)). */
export function compose(p: Poly, q: Poly): number[] {
  let out: number[] = [];
  for (let i = p.length - 1; i >= 0; i--) out = add(mul(out, q), constant(p[i]));
  return out;
}

/** Horner evaluation at a real point. */
export function evalReal(p: Poly, x: number): number {
  let v = 0;
  for (let i = p.length - 1; i >= 0; i--) v = v * x + p[i];
  return v;
}

/** Horner evaluation at a complex point. */
export function evalComplex(p: Poly, z: Complex): Complex {
  let re = 0;
  let im = 0;
  for (let i = p.length - 1; i >= 0; i--) {
    const r = re * z.re - im * z.im + p[i];
    im = re * z.im + im * z.re;
    re = r;
  }
  return cx(re, im);
}

/** The monic-or-not polynomial with the given roots (complex roots must come in conjugate pairs). */
export function fromRoots(roots: readonly Complex[], gain = 1): number[] {
  // Multiply complex coefficients, then keep the real part (imaginary parts cancel for conjugate sets).
  let re: number[] = [1];
  let im: number[] = [0];
  for (const r of roots) {
    const nre = new Array<number>(re.length + 1).fill(0);
    const nim = new Array<number>(re.length + 1).fill(0);
    for (let i = 0; i < re.length; i++) {
      // (s - r) * (re + j im)
      nre[i + 1] += re[i];
      nim[i + 1] += im[i];
      nre[i] -= r.re * re[i] - r.im * im[i];
      nim[i] -= r.re * im[i] + r.im * re[i];
    }
    re = nre;
    im = nim;
  }
  return trim(re.map((c) => c * gain));
}

/** Checks a polynomial given by a user: finite coefficients and degree ≤ MAX_ORDER. */
export function validatePoly(p: Poly, what: string): number[] {
  assertFinite(p, what);
  const t = trim(p);
  if (t.length - 1 > MAX_ORDER) {
    throw new InputError(`${what}: degree ${t.length - 1} is above the limit of ${MAX_ORDER}`, { field: what });
  }
  return t;
}

/** Converts from the highest-power-first order that people write to our ascending order. */
export const fromDescending = (c: readonly number[]): number[] => trim(c.slice().reverse());
export const toDescending = (p: Poly): number[] => trim(p).slice().reverse();

/** Readable text, highest power first: "s^3 + 3*s^2 + 2*s + 6" (round-trips through the parser). */
export function format(p: Poly, variable = 's', digits = 6): string {
  const t = trim(p);
  if (t.length === 0) return '0';
  const terms: string[] = [];
  for (let i = t.length - 1; i >= 0; i--) {
    const c = t[i];
    if (c === 0) continue;
    const mag = Math.abs(c);
    const num = Number(mag.toPrecision(digits)).toString();
    const pw = i === 0 ? '' : i === 1 ? variable : `${variable}^${i}`;
    const body = i === 0 ? num : mag === 1 ? pw : `${num}*${pw}`;
    terms.push((c < 0 ? '- ' : '+ ') + body);
  }
  const s = terms.join(' ');
  return s.startsWith('+ ') ? s.slice(2) : '-' + s.slice(2);
}
