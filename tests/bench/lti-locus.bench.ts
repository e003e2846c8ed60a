// Root locus and margins speed. Medians and ratios from this one run (DEVELOPERS.md: compare
// ratios, not absolute times).
import { eigs } from 'mathjs';
import { type Complex, cx, loopMargins, poly, rootLocus, tfFromCoefficients } from '@loopwright/lti';
import { bench, fitExponent, ratio, record, report, section } from './harness.ts';

/** A loop with n poles and m zeros spread over two decades, some complex (our own test plant). */
function plant(n: number, m: number): { num: number[]; den: number[] } {
  const poles: Complex[] = [cx(0)];
  for (let i = 1; poles.length < n; i++) {
    const r = -0.5 * 1.35 ** i;
    if (i % 3 === 0 && poles.length + 2 <= n) poles.push(cx(r, 0.6 * -r), cx(r, -0.6 * -r));
    else poles.push(cx(r));
  }
  const zeros: Complex[] = [];
  for (let i = 0; zeros.length < m; i++) {
    const r = -0.8 * 1.5 ** i;
    if (i % 2 === 1 && zeros.length + 2 <= m) zeros.push(cx(r, 0.4 * -r), cx(r, -0.4 * -r));
    else zeros.push(cx(r));
  }
  return { num: poly.fromRoots(zeros), den: poly.fromRoots(poles) };
}

/** Baseline: roots of D + kN at each gain, one by one, as mathjs eigs of the companion matrix. */
function baseline(num: number[], den: number[], gains: readonly number[]): number[] {
  const failed: number[] = [];
  for (const k of gains) {
    const c = poly.add(den, poly.scale(num, k));
    const n = c.length - 1;
    const a: number[][] = [];
    for (let i = 0; i < n; i++) a.push(new Array<number>(n).fill(0));
    for (let j = 0; j < n; j++) a[0][j] = -c[n - 1 - j] / c[n];
    for (let i = 1; i < n; i++) a[i][i - 1] = 1;
    // Diagonal balancing (powers of 2) first, which mathjs' QR needs to converge on these.
    for (let sweep = 0; sweep < 50; sweep++) {
      let changed = false;
      for (let i = 0; i < n; i++) {
        let col = 0;
        let row = 0;
        for (let j = 0; j < n; j++)
          if (j !== i) {
            col += Math.abs(a[j][i]);
            row += Math.abs(a[i][j]);
          }
        if (col === 0 || row === 0) continue;
        const f = 2 ** Math.round(Math.log2(Math.sqrt(row / col)));
        if (f === 1) continue;
        changed = true;
        for (let j = 0; j < n; j++) {
          a[i][j] /= f;
          a[j][i] *= f;
        }
      }
      if (!changed) break;
    }
    try {
      eigs(a, { eigenvectors: false });
    } catch {
      failed.push(k); // mathjs does not always converge on companion matrices
    }
  }
  return failed;
}

export async function run(): Promise<void> {
  section('lti: root locus and margins');
  const { num, den } = plant(10, 4);
  const once = rootLocus(num, den, { samples: 400 });
  const special = once.breakaways.length + once.crossings.length;
  record('locus-10-4.gains', once.gains.length, 'count');
  record('locus-10-4.breakaways', once.breakaways.length, 'count');
  record('locus-10-4.crossings', once.crossings.length, 'count');
  console.log(
    `  10-pole, 4-zero loop: ${once.gains.length} traced gains (400 base + adaptive), ${special} special points (breakaways ${once.breakaways.length}, crossings ${once.crossings.length})`,
  );
  const fast = bench('locus 10 poles / 4 zeros, ≥ 400 gains + special points', () => rootLocus(num, den, { samples: 400 }), {
    minRuns: 15,
    minMs: 500,
  });
  report(fast, 15);
  let failed: number[] = [];
  const slow = bench('baseline: same gains one by one, mathjs eigs', () => (failed = baseline(num, den, once.gains)), {
    minRuns: 3,
    minMs: 0,
    warmup: 1,
  });
  report(slow);
  ratio('baseline / locus', slow, fast, { atLeast: 10 });
  if (failed.length) {
    // mathjs gives up (after its iteration limit) at some gains, which inflates the baseline:
    // also time it on only the gains where it converges, and compare per gain.
    console.log(
      `  (mathjs eigs did not converge at ${record('baseline.failed-gains', failed.length, 'count')} of ${once.gains.length} gains)`,
    );
    const bad = new Set(failed);
    const good = once.gains.filter((k) => !bad.has(k));
    if (good.length) {
      const fair = bench(`baseline on the ${good.length} converging gains only`, () => baseline(num, den, good), {
        minRuns: 5,
        minMs: 0,
        warmup: 1,
      });
      report(fair, undefined, 'baseline-converging-gains');
      const perGain = { ...fair, median: (fair.median / good.length) * once.gains.length };
      ratio('baseline (converging gains, per gain) / locus', perGain, fast, { atLeast: 10 });
    }
  }

  const dl = plant(10, 2);
  // Gain set so the loop crosses over near 1 rad/s (a working loop, not a near-open one).
  const L = tfFromCoefficients(poly.scale(dl.num, 20), dl.den, 0.3);
  const mr = loopMargins(L);
  record('margins-loop.gain-margin', mr.gainMargin ?? NaN, 'ratio');
  record('margins-loop.phase-margin', mr.phaseMarginDeg ?? NaN, 'deg');
  record('margins-loop.phase-crossovers', mr.phaseCrossovers.length, 'count');
  record('margins-loop.pade-order', mr.padeOrder ?? NaN, 'order');
  console.log(
    `  margins loop: GM ${mr.gainMargin?.toFixed(4)}, PM ${mr.phaseMarginDeg?.toFixed(2)}°, ${mr.phaseCrossovers.length} phase crossovers, Padé ${mr.padeOrder}`,
  );
  report(
    bench('margins, 10th-order loop with dead time', () => loopMargins(L), { minRuns: 30, minMs: 500 }),
    5,
  );

  const sizes = [5, 10, 20, 40];
  const medians: number[] = [];
  for (const n of sizes) {
    const p = plant(n, Math.floor(n / 3));
    const r = bench(`locus growth: n = ${n}, m = ${Math.floor(n / 3)}, 400 base gains`, () => rootLocus(p.num, p.den, { samples: 400 }), {
      minRuns: n >= 40 ? 3 : 8,
      minMs: n >= 40 ? 0 : 300,
      warmup: 1,
    });
    report(r);
    medians.push(r.median);
  }
  console.log(
    `  fitted cost exponent (time ∝ n^p): p = ${record('locus-growth.exponent', fitExponent(sizes, medians), 'exponent').toFixed(2)}`,
  );
}
