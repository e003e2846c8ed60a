// graph analysis: closed-loop forms, cuts, exact sweeps, and cost growth with nested loops.
import { bench, fitExponent, record, report, section } from './harness.ts';
import { analyseLoops, closedLoop, compiledOf, demoDiagrams, loopAtCut, sweepLocus } from '@loopwright/graph';
// Test builders (not public API): a cascade of N nested loops.
import { nestedChain } from '@loopwright/graph/testing';

/** Mean CPU time per run (user + system, ms): on a shared machine wall time also counts other people's work. */
function cpuMs(fn: () => unknown, runs: number): number {
  fn();
  const u = process.cpuUsage();
  for (let i = 0; i < runs; i++) fn();
  const du = process.cpuUsage(u);
  return (du.user + du.system) / 1000 / runs;
}

export function run(): void {
  section('graph analysis');
  const d = demoDiagrams.find((x) => x.id === 'positioning-axis')!.diagram;
  const sources = d.blocks.filter((b) => b.kind === 'source').map((b) => b.id);
  const probes = d.blocks.filter((b) => b.kind === 'probe').map((b) => b.id);
  const allForms = () => {
    // One linear model per run (parameters resolved, expressions parsed), then every form.
    const c = compiledOf(d);
    for (const from of sources) for (const to of probes) closedLoop(c, { block: from }, { block: to });
    for (const cut of d.cuts) loopAtCut(c, cut.wire);
  };
  report(
    bench(`positioning axis: ${sources.length * probes.length} closed-loop forms + ${d.cuts.length} cuts' L(s)`, allForms, { minRuns: 30 }),
    10,
    'positioning-axis-all-forms',
  );
  console.log(`  (same, mean CPU time per run: ${record('positioning-axis-all-forms.cpu', cpuMs(allForms, 30), 'ms').toFixed(2)} ms)`);
  const locus = () => sweepLocus(d, 'Kp_pos');
  report(bench('positioning axis: exact locus of Kp_pos (whole diagram)', locus, { minRuns: 20 }), 25);
  console.log(
    `  (same, mean CPU time per run: ${record('positioning-axis-exact-locus-of-kp-pos-whole-diagram.cpu', cpuMs(locus, 20), 'ms').toFixed(2)} ms)`,
  );
  report(bench('positioning axis: loops report (cuts, margins, separations, ideal inner)', () => analyseLoops(d), { minRuns: 10 }));

  const ns = [2, 4, 8, 16];
  const times: number[] = [];
  for (const n of ns) {
    const g = compiledOf(nestedChain(n));
    const cuts = [...Array(n).keys()].map((i) => `fb${i + 1}`);
    const r = bench(
      `nested chain of ${n} loops: r → y and every cut`,
      () => {
        closedLoop(g, { block: 'r' }, { block: 'y' });
        for (const w of cuts) loopAtCut(g, w);
      },
      { minRuns: 10, minMs: 200 },
    );
    report(r);
    times.push(r.median);
  }
  console.log(
    `  fitted cost exponent over N = ${ns.join(', ')}: time ∝ N^${record('nested-chain.exponent', fitExponent(ns, times), 'exponent').toFixed(2)}`,
  );
}
