// The study engine as the editor drives it: a slider step (locus cached, poles and L at the
// cut at the new value), a cold locus, the findings of an edit, a run of each demo, the design report.
import { bench, ratio, report, section } from './harness.ts';
import { demoDiagrams } from '@loopwright/graph';
import { clearCaches, resolveSweep, runStudies, runStudy, type StudyRequest } from '@loopwright/study';

export function run(): void {
  section('study engine (what the editor worker runs)');
  for (const demo of demoDiagrams) {
    const d = demo.diagram;
    const sweep = resolveSweep(d, { key: null, liveValue: null });
    const target = sweep.choice!.target;
    const range = sweep.range!;
    let i = 0;
    // Values stepping through the slider range, as a drag does.
    const at = () => range.min * (range.max / range.min) ** ((i++ % 50) / 50);
    const step = () => {
      const value = at();
      const live = { target, value };
      const reqs: StudyRequest[] = [
        { kind: 'locus', target, value, range },
        { kind: 'poles', live },
        { kind: 'cut', cut: null, live },
      ];
      for (const r of runStudies(d, reqs)) if (!r.ok) throw new Error(r.error);
    };
    const s = bench(`${demo.id}: slider step (locus cached; poles, L at the cut)`, step, { minRuns: 30 });
    report(s, 50);
    const cold = bench(
      `${demo.id}: locus from scratch (caches cleared)`,
      () => {
        clearCaches();
        runStudy(d, { kind: 'locus', target, range });
      },
      { minRuns: 5, minMs: 200 },
    );
    report(cold);
    ratio(`${demo.id}: cold locus / slider step`, cold, s);
    report(
      bench(
        `${demo.id}: findings of an edit (caches cleared)`,
        () => {
          clearCaches();
          runStudy(d, { kind: 'check' });
        },
        { minRuns: 10, minMs: 200 },
      ),
    );
    report(bench(`${demo.id}: loops table`, () => runStudy(d, { kind: 'loops', live: sweep.live }), { minRuns: 5, minMs: 200 }));
    const runOnly = bench(
      `${demo.id}: run with linear overlay (diagram settings)`,
      () => runStudy(d, { kind: 'run', live: sweep.live, linearOverlay: true }),
      { minRuns: 3, minMs: 100, warmup: 1 },
    );
    report(runOnly);
    // The design report: every part computed (findings, locus, poles, loops with each loop's
    // frequency data, a run) and the HTML with its SVG charts written; cold, as the CLI runs it.
    const rep = bench(
      `${demo.id}: design report (caches cleared)`,
      () => {
        clearCaches();
        runStudy(d, { kind: 'report', generatedAt: 'bench' });
      },
      { minRuns: 3, minMs: 100, warmup: 1 },
    );
    report(rep, undefined, `${demo.id}-report`);
    ratio(`${demo.id}: design report / run with overlay`, rep, runOnly, undefined, `${demo.id}-report-vs-run`);
  }
}
