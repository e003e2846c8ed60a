/**
 * Numbers in readouts, tables and the report: 4 significant digits, exponent form outside
 * 1e-3..1e5 ("4.500e5", read back by Number), "—" for none, "∞" for an unbounded value. The editor's readouts use the same.
 */
export function fmt(v: number | null | undefined, digits = 4): string {
  if (v === null || v === undefined || Number.isNaN(v)) return '—';
  if (v === Infinity) return '∞';
  if (v === -Infinity) return '−∞';
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) return v.toExponential(digits - 1).replace('e+', 'e');
  return String(Number(v.toPrecision(digits)));
}

/** A complex number as "a ± jb" (the real part alone on the real axis). */
export function fmtS(re: number, im: number, digits = 4): string {
  return im === 0 ? fmt(re, digits) : `${fmt(re, digits)} ${im < 0 ? '−' : '+'} j${fmt(Math.abs(im), digits)}`;
}

/** Damping ratio and natural frequency of a pole s (ζ = −Re s/|s|, ωn = |s|). */
export function dampingOf(s: { re: number; im: number }): { zeta: number; omegaN: number } {
  const omegaN = Math.hypot(s.re, s.im);
  return { zeta: omegaN > 0 ? -s.re / omegaN : 1, omegaN };
}
