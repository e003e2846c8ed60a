// High-order loci and margins with dead time (issue 10 items 1, 2 and 7): the cases that once
// hung or crashed, timed. Medians from this one run; compare ratios, not absolute times.
import { cutMargins, positioningAxis } from '@loopwright/graph';
import { cx, loopMargins, parseTransferFunction, poly, rootLocus } from '@loopwright/lti';
import { runStudy } from '@loopwright/study';
import { bench, ratio, record, report, section } from './harness.ts';

export async function run(): Promise<void> {
  section('lti: high-order loci and margins with dead time');
  for (const n of [20, 40, 60]) {
    const den = poly.pow([1, 1], n);
    const L = rootLocus([1], den);
    record(`locus-order-${n}.gains`, L.gains.length, 'count');
    report(
      bench(`locus 1/(s+1)^${n}, default samples`, () => rootLocus([1], den), { minRuns: 3, minMs: 0, warmup: 1 }),
      undefined,
      `locus-order-${n}`,
    );
  }
  const thirty = poly.fromRoots(Array.from({ length: 30 }, (_, i) => cx(-0.1 * 1.3 ** i)));
  report(
    bench('locus, 30 distinct poles (geometric spread)', () => rootLocus([1], thirty), { minRuns: 3, minMs: 0, warmup: 1 }),
    undefined,
    'locus-30-poles',
  );

  const plain = parseTransferFunction('4/(s+1)^3');
  const base = bench('margins 4/(s+1)^3 (no dead time, reference)', () => loopMargins(plain), { minRuns: 20, minMs: 300 });
  report(base, undefined, 'margins-rational');
  for (const [key, text] of [
    ['margins-2exp', '2*exp(-s)'],
    ['margins-lead-exp', '(s+1)/(s+2)*exp(-s)'],
    ['margins-exp-1e5', 'exp(-1e5*s)/(s+1)'],
    ['margins-exp-1e308', 'exp(-1e308*s)/(s+1)'],
  ]) {
    const tf = parseTransferFunction(text);
    const m = loopMargins(tf);
    record(`${key}.listed-crossovers`, m.phaseCrossovers.length, 'count');
    const r = bench(`margins ${text}`, () => loopMargins(tf), { minRuns: 5, minMs: 200, warmup: 1 });
    report(r, undefined, key);
    ratio(`${text} / 4/(s+1)^3`, r, base, undefined, key);
  }

  // The positioning axis's last cut, whose loop (every other loop closed) holds the encoder dead
  // times inside other loops: every dead time exact (the diagram solved at s = jω), against the
  // same loop's Padé approximant as a rational function.
  const cut = positioningAxis.cuts[positioningAxis.cuts.length - 1];
  const exact = bench(`exact cut margins, positioning axis (${cut.id})`, () => cutMargins(positioningAxis, cut.wire), {
    minRuns: 3,
    minMs: 0,
    warmup: 1,
  });
  report(exact, undefined, 'cut-exact');
  const approximant = cutMargins(positioningAxis, cut.wire).loop.reduction.tf;
  const pade = bench('same loop, Padé approximant as a rational loop', () => loopMargins(approximant), {
    minRuns: 5,
    minMs: 200,
    warmup: 1,
  });
  report(pade, undefined, 'cut-pade');
  ratio('exact cut / Padé approximant', exact, pade, undefined, 'cut-exact-vs-pade');
  const slow = { ...positioningAxis, parameters: positioningAxis.parameters.map((p) => (p.name === 'T_enc' ? { ...p, value: 59 } : p)) };
  report(
    bench(
      'loops study, positioning axis with T_enc = 59 s',
      () => runStudy(slow, { kind: 'loops', overrides: { T_enc: 59 + Math.random() * 1e-9 } }),
      { minRuns: 2, minMs: 0, warmup: 0 },
    ),
    undefined,
    'loops-axis-tenc-59',
  );
}
