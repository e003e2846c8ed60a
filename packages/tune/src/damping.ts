import {
  type Complex,
  InputError,
  type MarginFigures,
  cdiv,
  cx,
  loopMargins,
  marginFigures,
  poly,
  polyRoots,
  rational,
  relativeDegree,
  transfer,
} from '@loopwright/lti';

/**
 * The gain for a target damping on an exact root locus. For the characteristic equation
 * D0(s) + k·N0(s) = 0 (ascending polynomials; a sweep of one gain in any diagram has this
 * form), the closed-loop poles of damping ζ lie on the ray s = r·w, w = −ζ + j√(1 − ζ²), r > 0.
 * A point of that ray is on the locus where k = −D0(s)/N0(s) is real, i.e. where
 * Im(D0(rw)·conj(N0(rw))) = 0: a real polynomial in r, whose positive roots give every gain at
 * which some branch crosses the ray (exact up to polynomial root finding). A crossing is
 * dominant when no other closed-loop pole at that gain lies to its right (it is the slowest
 * mode). `gain` is the smallest k > 0 with a dominant crossing.
 * (Damping lines and the angle/magnitude conditions: Ogata, Sec. 6-2; Nise, Ch. 8 (from memory).)
 */
export interface DampingCrossing {
  gain: number;
  /** The pole on the ζ line (upper half-plane; its conjugate is also a pole). */
  pole: Complex;
  naturalFrequency: number;
  dominant: boolean;
  poles: Complex[];
}

export interface DampingResult {
  zeta: number;
  /** The smallest k > 0 at which the dominant poles have damping ζ; null if none. */
  gain: number | null;
  crossing: DampingCrossing | null;
  /** Every crossing of the ζ line with k > 0, ascending k. */
  crossings: DampingCrossing[];
  /** Margins of the loop k·N0/D0 at that gain (the loop opened at the swept gain), when proper. */
  predicted: MarginFigures | null;
}

export function gainForDamping(num: readonly number[], den: readonly number[], zeta: number): DampingResult {
  if (!(zeta >= 0 && zeta < 1)) throw new InputError(`damping ζ must lie in [0, 1), got ${zeta}`, { field: 'zeta' });
  const N = poly.validatePoly(num, 'N0(s)');
  const D = poly.validatePoly(den, 'D0(s)');
  if (N.length === 0) throw new InputError('N0(s) is zero: the gain does not enter the characteristic equation', { field: 'num' });
  if (D.length === 0) throw new InputError('D0(s) is zero', { field: 'den' });
  const w = cx(-zeta, Math.sqrt(1 - zeta * zeta));
  // Coefficients of D0(rw), N0(rw) in r: d_i·w^i.
  const powers: Complex[] = [cx(1)];
  for (let i = 1; i < Math.max(N.length, D.length); i++) {
    const p = powers[i - 1];
    powers.push(cx(p.re * w.re - p.im * w.im, p.re * w.im + p.im * w.re));
  }
  const dw = D.map((c, i) => cx(c * powers[i].re, c * powers[i].im));
  const nw = N.map((c, i) => cx(c * powers[i].re, c * powers[i].im));
  // Im(Σ dw_i r^i · Σ conj(nw_j) r^j) = Σ_k r^k Σ_(i+j=k) Im(dw_i·conj(nw_j)).
  const im = new Array<number>(D.length + N.length - 1).fill(0);
  const size = new Array<number>(D.length + N.length - 1).fill(0);
  for (let i = 0; i < dw.length; i++) {
    for (let j = 0; j < nw.length; j++) {
      im[i + j] += dw[i].im * nw[j].re - dw[i].re * nw[j].im;
      size[i + j] += Math.abs(dw[i].im * nw[j].re) + Math.abs(dw[i].re * nw[j].im);
    }
  }
  // A coefficient that is round-off of terms cancelling exactly is zero. The test is per
  // coefficient, against the size of the terms summed into it: coefficients of a diagram's
  // polynomial span many decades (fast and slow loops), so one threshold for all would drop
  // the high powers that decide the large roots.
  const cleaned = poly.trim(im.map((c, k) => (Math.abs(c) <= 1e-12 * size[k] ? 0 : c)));
  const crossings: DampingCrossing[] = [];
  if (cleaned.length > 1) {
    // Roots r = 0 (from a factor r^m) are the origin, not a point with damping ζ.
    for (const root of polyRoots(cleaned)) {
      if (Math.abs(root.im) > 1e-7 * Math.max(1, Math.abs(root.re)) || !(root.re > 0)) continue;
      const r = root.re;
      const s = cx(r * w.re, r * w.im);
      const kc = cdiv(poly.evalComplex(D, s), poly.evalComplex(N, s));
      const k = -kc.re;
      if (!(k > 0) || !Number.isFinite(k) || Math.abs(kc.im) > 1e-6 * Math.abs(kc.re)) continue;
      const poles = polyRoots(poly.add(D, poly.scale(N, k)));
      const rightmost = Math.max(...poles.map((p) => p.re));
      const dominant = s.re >= rightmost - 1e-6 * Math.max(1, Math.abs(s.re));
      crossings.push({ gain: k, pole: s, naturalFrequency: r, dominant, poles });
    }
  }
  crossings.sort((a, b) => a.gain - b.gain);
  const crossing = crossings.find((c) => c.dominant) ?? null;
  let predicted: MarginFigures | null = null;
  if (crossing) {
    const L = rational(poly.scale(N, crossing.gain), D);
    if (relativeDegree(L) >= 0) predicted = marginFigures(loopMargins(transfer(L)));
  }
  return { zeta, gain: crossing ? crossing.gain : null, crossing, crossings, predicted };
}
