// lti core: polynomial roots and expression parsing.
import { bench, ratio, report, section } from './harness.ts';
import { cx, parseTransferFunction, poly, polyRoots } from '@loopwright/lti';

export function run(): void {
  section('lti core: roots and parsing');
  // A 20th-order polynomial with well-separated real and complex roots (a typical multi-loop
  // characteristic polynomial size).
  const roots = [];
  for (let k = 1; k <= 5; k++) roots.push(cx(-k), cx(-k * 0.7, k * 0.9), cx(-k * 0.7, -k * 0.9), cx(-0.3 * k - 6));
  const p20 = poly.fromRoots(roots);
  const p10 = poly.fromRoots([...roots.slice(0, 8), cx(-9), cx(-10)]);
  const r20 = bench('polyRoots, degree 20', () => polyRoots(p20), { minRuns: 200, minMs: 400 });
  report(r20, 0.5);
  const r10 = bench('polyRoots, degree 10', () => polyRoots(p10), { minRuns: 200, minMs: 300 });
  report(r10);
  ratio('degree 20 / degree 10', r20, r10);

  const params = { Kp: 2.5, Ti: 0.8, K: 3, T: 0.25 };
  const samples = ['Kp*(1 + 1/(Ti*s)) * 4/(s*(0.25*s+1))', '2*exp(-0.5*s)/(3*s+1)', 'K*exp(-T*s)*(s+1)/((s+2)*(s^2 + 0.8*s + 4))'];
  for (const text of samples) report(bench(`parse ${text}`, () => parseTransferFunction(text, params), { minRuns: 200, minMs: 300 }));
}
