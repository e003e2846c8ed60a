/** Complex numbers as plain immutable records; small and allocation-light for hot loops. */
export interface Complex {
  readonly re: number;
  readonly im: number;
}

export const cx = (re: number, im = 0): Complex => ({ re, im });
export const ZERO: Complex = cx(0, 0);
export const ONE: Complex = cx(1, 0);

export const cadd = (a: Complex, b: Complex): Complex => cx(a.re + b.re, a.im + b.im);
export const csub = (a: Complex, b: Complex): Complex => cx(a.re - b.re, a.im - b.im);
export const cmul = (a: Complex, b: Complex): Complex => cx(a.re * b.re - a.im * b.im, a.re * b.im + a.im * b.re);
export const cscale = (a: Complex, k: number): Complex => cx(a.re * k, a.im * k);
export const cneg = (a: Complex): Complex => cx(-a.re, -a.im);
export const cconj = (a: Complex): Complex => cx(a.re, -a.im);
export const cabs = (a: Complex): number => Math.hypot(a.re, a.im);
export const carg = (a: Complex): number => Math.atan2(a.im, a.re);

/** Division by Smith's method (avoids overflow for large components). */
export function cdiv(a: Complex, b: Complex): Complex {
  if (Math.abs(b.re) >= Math.abs(b.im)) {
    const r = b.im / b.re;
    const d = b.re + b.im * r;
    return cx((a.re + a.im * r) / d, (a.im - a.re * r) / d);
  }
  const r = b.re / b.im;
  const d = b.re * r + b.im;
  return cx((a.re * r + a.im) / d, (a.im * r - a.re) / d);
}

export const cexp = (a: Complex): Complex => {
  const m = Math.exp(a.re);
  return cx(m * Math.cos(a.im), m * Math.sin(a.im));
};

export function csqrt(a: Complex): Complex {
  const r = cabs(a);
  if (r === 0) return ZERO;
  const re = Math.sqrt((r + a.re) / 2);
  const im = Math.sqrt((r - a.re) / 2);
  return cx(re, a.im < 0 ? -im : im);
}

/** Sorts roots for stable output: by real part, then imaginary part (negative first). */
export function compareComplex(a: Complex, b: Complex): number {
  return a.re - b.re || a.im - b.im;
}
