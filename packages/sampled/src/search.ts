/**
 * Small bracketed searches on a frequency interval [a, b] (ω in rad/s, linear in ω: on the unit
 * circle the interesting range is bounded by the Nyquist frequency).
 */

/** A zero of f inside [a, b] where f(a) and f(b) differ in sign: bisection to full precision. */
export function bisectRoot(a: number, b: number, f: (x: number) => number): number {
  let lo = a;
  let hi = b;
  let flo = f(lo);
  if (flo === 0) return lo;
  const fhi = f(hi);
  if (fhi === 0) return hi;
  for (let i = 0; i < 200; i++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break;
    const fm = f(mid);
    if (fm === 0) return mid;
    if (fm > 0 === flo > 0) {
      lo = mid;
      flo = fm;
    } else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * Maximum of a unimodal f on [a, b] by golden-section search, to a bracket of 1e-10 relative:
 * near a smooth maximum the value is then exact to ~1e-20 relative (it is flat to second order).
 */
export function goldenSectionMax(a: number, b: number, f: (x: number) => number): { x: number; value: number } {
  const r = (Math.sqrt(5) - 1) / 2;
  let lo = a;
  let hi = b;
  let x1 = hi - r * (hi - lo);
  let x2 = lo + r * (hi - lo);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let i = 0; i < 120 && hi - lo > 1e-10 * Math.abs(hi); i++) {
    if (f1 >= f2) {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi - r * (hi - lo);
      f1 = f(x1);
    } else {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + r * (hi - lo);
      f2 = f(x2);
    }
  }
  const fa = f(a);
  const fb = f(b);
  let best = f1 >= f2 ? { x: x1, value: f1 } : { x: x2, value: f2 };
  if (fa > best.value) best = { x: a, value: fa };
  if (fb > best.value) best = { x: b, value: fb };
  return best;
}
