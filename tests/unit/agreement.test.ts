/**
 * One engine: the command line's --json path and the editor worker's compute entry give the
 * same numbers for the same diagram — the demos and three scenarios of our own (a three-loop
 * cascade with dead times, a loop with a feedforward, a reverse-acting loop swept over negative
 * gains), the design report included; and `loopwright fit` / `loopwright tune` against the requests of the editor's Test
 * log and Tune views. The worker side sends exactly the study requests the editor's driver builds; the
 * study caches are cleared between the two sides so that each computes afresh.
 */
import { describe, expect, it } from 'vitest';
import { demoDiagrams, emptyDiagram, serializeDiagram, type Diagram } from '@loopwright/graph';
import { supplyValveBumpCsv } from '@loopwright/fit';
import {
  clearCaches,
  engineParameterName,
  resolveSweep,
  runStudies,
  type FitData,
  type StudyRequest,
  type TuneData,
  type LocusData,
  type LoopsData,
  type Part,
  type ResponseResult,
  type StudyResult,
  type CheckData,
  type ClosedLoopData,
  type ReportData,
} from '@loopwright/study';
import { main, type CliIo } from '@loopwright/cli/testing';
import {
  computeReply,
  channelStudies,
  reportRequest,
  fitStudyRequests,
  tuneStudyRequest,
  type AnalysisInputs,
  type Channel,
  type TuneOptions,
} from '@loopwright/editor/testing';
import { coolingReverseActing, furnaceCascade, tankFeedforward } from '@loopwright/study/testing';

async function cli(argv: string[], file: string): Promise<Record<string, any>> {
  let out = '';
  let err = '';
  const io: CliIo = {
    stdout: (s) => void (out += s),
    stderr: (s) => void (err += s),
    readFile: async () => file,
    writeFile: async () => {},
  };
  const code = await main(argv, io);
  expect(code, `${argv.join(' ')}: ${err}`).toBe(0);
  return JSON.parse(out);
}

/** The worker's answer to the requests the driver sends for the diagram as loaded (no UI choices made). */
function worker(d: Diagram, channel: Channel): StudyResult['value'][] {
  const sweep = resolveSweep(d, { key: null, liveValue: null });
  const inp: AnalysisInputs = { diagram: d, sweep, live: sweep.live, cutId: null, closedLoop: null };
  const studies = channelStudies(inp, { frequency: true, opposite: false })[channel];
  const reply = computeReply({ channel, id: 1, diagram: d, studies });
  if (!reply.ok) throw new Error(reply.error);
  return reply.results.map((r: Part<StudyResult>) => {
    if (!r.ok) throw new Error(r.error);
    return r.value.value;
  });
}

/** Equal up to round-off (1e-9 relative to the larger magnitude); null and non-finite alike (JSON has no Infinity). */
function same(a: unknown, b: unknown, path = '$'): void {
  if (typeof a === 'number' || typeof b === 'number' || a === null || b === null) {
    const x = typeof a === 'number' && Number.isFinite(a) ? a : null;
    const y = typeof b === 'number' && Number.isFinite(b) ? b : null;
    if (x === null || y === null) return void expect(x, path).toBe(y);
    expect(Math.abs(x - y) <= 1e-9 * Math.max(1, Math.abs(x), Math.abs(y)), `${path}: ${x} vs ${y}`).toBe(true);
    return;
  }
  if (Array.isArray(a) || Array.isArray(b)) {
    expect(Array.isArray(a) && Array.isArray(b) && a.length === b.length, `${path}: lengths`).toBe(true);
    (a as unknown[]).forEach((v, i) => same(v, (b as unknown[])[i], `${path}[${i}]`));
    return;
  }
  if (typeof a === 'object' && typeof b === 'object') {
    const keys = new Set([...Object.keys(a as object), ...Object.keys(b as object)]);
    for (const k of keys) same((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`);
    return;
  }
  expect(a, path).toEqual(b);
}

const pairs = (cs: { re: number; im: number }[]) => cs.map((c) => [c.re, c.im]);

const diagrams: [string, Diagram][] = [
  ...demoDiagrams.map((x) => [x.id, x.diagram] as [string, Diagram]),
  ['three-loop cascade with dead times', furnaceCascade()],
  ['feedforward', tankFeedforward()],
  ['negative-gain sweep', coolingReverseActing()],
];

describe('the command line and the editor worker agree', () => {
  it('the scenarios are what they claim: three nested loops with dead times, a feedforward path, a negative gain swept', () => {
    const f = furnaceCascade();
    expect(f.cuts).toHaveLength(3);
    expect(f.blocks.filter((b) => typeof b.params.expression === 'string' && /exp\(/.test(b.params.expression)).length).toBe(3);
    expect(tankFeedforward().wires.some((w) => w.from.block === 'inflow' && w.to.block === 'ff')).toBe(true);
    const c = coolingReverseActing();
    expect(resolveSweep(c, { key: null, liveValue: null }).value).toBeLessThan(0);
  });

  for (const [name, d] of diagrams) {
    describe(name, () => {
      const file = serializeDiagram(d);
      const sweep = resolveSweep(d, { key: null, liveValue: null });
      const param = engineParameterName(sweep.choice!.target);
      const source = d.blocks.find((b) => b.kind === 'source')!.id;
      const probe = d.blocks.find((b) => b.kind === 'probe')!.id;

      it('check: the same findings', async () => {
        clearCaches();
        const c = await cli(['check', 'd.loop.json', '--json'], file);
        clearCaches();
        const [w] = worker(d, 'check') as [CheckData];
        same(c.findings, w.findings);
        same(c.counts, w.counts);
      });

      it('loops: every row, both readings, open-loop RHP poles, separations, every real-vs-ideal pair, closed-loop poles', async () => {
        clearCaches();
        const c = await cli(['loops', 'd.loop.json', '--json'], file);
        clearCaches();
        const [w] = worker(d, 'loops') as [LoopsData];
        expect(c.cuts.map((x: { cut: string }) => x.cut)).toEqual(w.rows.map((r) => r.cutId));
        c.cuts.forEach((row: Record<string, any>, i: number) => {
          const r = w.rows[i];
          same(row.margins, r.margins, `${r.cutId}.margins`);
          same(row.numeratorAscending, r.loop.num);
          same(row.denominatorAscending, r.loop.den);
          expect(row.openLoopRhpPoles).toBe(r.openLoopRhpPoles);
          if (r.alone) {
            same(row.alone.margins, r.alone.margins, `${r.cutId}.alone`);
            expect(row.alone.opened).toEqual(r.alone.opened);
            expect(row.alone.openLoopRhpPoles).toBe(r.alone.openLoopRhpPoles);
          }
        });
        same(c.separations, w.separations);
        same(
          c.outerVsIdeal.map((o: Record<string, unknown>) => [o.outer, o.inner, o.real, o.ideal]),
          w.outerVsIdeal.map((o) => [o.outer, o.inner, o.realMargins, o.idealMargins]),
        );
        same(c.closedLoopPoles, pairs(w.closedLoopPoles));
        expect(c.closedLoopPoleOrigin).toEqual(w.closedLoopPoleOrigin);
        expect(c.names).toEqual(w.names);
        expect(c.cuts.map((x: { label: string; advice: unknown }) => [x.label, x.advice])).toEqual(w.rows.map((r) => [r.label, r.advice]));
        expect(c.stable).toBe(w.stable);
      });

      it(`locus of ${param}: the same mode, direction, geometry and branches`, async () => {
        clearCaches();
        const c = await cli(['locus', 'd.loop.json', '--sweep', sweep.choice!.key, '--json'], file);
        clearCaches();
        const [L] = worker(d, 'analysis') as [LocusData];
        expect(c.mode).toBe(L.mode);
        expect(c.negative).toBe(L.direction === 'negative');
        same(c.poles, pairs(L.poles));
        same(c.zeros, L.mode === 'exact' ? pairs(L.zeros) : c.zeros);
        same(
          c.breakaway,
          L.breakaways.map((b) => ({ s: [b.s.re, b.s.im], gain: b.gain })),
        );
        same(c.crossings, L.crossings);
        if (L.mode === 'exact') {
          same(c.fixedPoles, pairs(L.fixedPoles));
          same(c.numeratorAscending, L.n0);
          same(c.denominatorAscending, L.d0);
        }
        same(
          c.branches,
          L.branches.map((b) => b.re.map((re, i) => [re, b.im[i], b.k[i]])),
        );
      });

      it(`closed loop from ${source} to ${probe}: the same transfer function, poles and Padé marks, step and Bode (the Closed loop view's request)`, async () => {
        clearCaches();
        const c = await cli(['reduce', 'd.loop.json', '--from', source, '--to', probe, '--bode', '--step', '--json'], file);
        clearCaches();
        const inp: AnalysisInputs = {
          diagram: d,
          sweep,
          live: sweep.live,
          cutId: null,
          closedLoop: { from: { block: source }, to: { block: probe } },
        };
        const studies = channelStudies(inp, { frequency: false, opposite: false, closedLoop: true })['closed-loop'];
        const reply = computeReply({ channel: 'closed-loop', id: 1, diagram: d, studies });
        expect(reply.ok).toBe(true);
        const part = reply.ok ? reply.results[0] : null;
        const w = (part?.ok ? part.value.value : null) as ClosedLoopData;
        same(c.numeratorAscending, w.transfer.num);
        same(c.denominatorAscending, w.transfer.den);
        same(c.delay, w.transfer.delay);
        same(c.poles, pairs(w.poles));
        expect(c.poleOrigin).toEqual(w.poleOrigin);
        same(c.step, w.step);
        same(c.bode, w.bode);
      });

      it("report: the command line writes the bytes the editor's Report button gets from its worker", async () => {
        clearCaches();
        let html = '';
        const io: CliIo = { stdout: (t) => void (html += t), stderr: () => {}, readFile: async () => file, writeFile: async () => {} };
        expect(await main(['report', 'd.loop.json', '--out', '-', '--date', 'agreement'], io)).toBe(0);
        clearCaches();
        const inp: AnalysisInputs = { diagram: d, sweep, live: sweep.live, cutId: null, closedLoop: null };
        const reply = computeReply({ channel: 'report', id: 1, diagram: d, studies: [reportRequest(inp, 'agreement')] });
        const part = reply.ok ? reply.results[0] : null;
        expect(part?.ok).toBe(true);
        expect(html).toBe(part?.ok ? (part.value.value as ReportData).html : '');
      });

      it('simulation: the same settings, traces and figures', async () => {
        clearCaches();
        const c = await cli(['simulate', 'd.loop.json', '--json'], file);
        clearCaches();
        const [w] = worker(d, 'response') as [ResponseResult];
        expect(c.status).toBe(w.run.status);
        same(c.settings, w.settings);
        same(c.time, w.run.time);
        for (const p of w.probes) same(c.traces[p.id], w.run.traces[p.id], `traces.${p.id}`);
        same(c.metrics, w.run.probeFigures);
        same(c.actuators, w.run.actuatorFigures);
      });
    });
  }
});

/** The editor's task worker runs the studies its views ask for (runStudies, in place here). */
function editorTask(d: Diagram, studies: StudyRequest[]): StudyResult['value'][] {
  return runStudies(d, studies).map((r) => {
    if (!r.ok) throw new Error(r.error);
    return r.value.value;
  });
}

describe('fits and tunings: the command line and the editor agree', () => {
  const csv = supplyValveBumpCsv();

  it('the demo test log: every model, its intervals and NRMSE', async () => {
    clearCaches();
    const c = await cli(['fit', 'supply-valve-bump.csv', '--model', 'all', '--json'], csv);
    const [, fit] = editorTask(
      emptyDiagram(),
      fitStudyRequests({ text: csv, fileName: 'supply-valve-bump.csv' }, { time: null, input: null, output: null }, 'linear'),
    ) as [unknown, FitData];
    expect(c.fits.map((f: { model: string }) => f.model)).toEqual(fit.fits.map((f) => f.model));
    fit.fits.forEach((f, i) => {
      if (!f.result.ok) throw new Error(f.result.error);
      const j = c.fits[i];
      same(
        [j.gain, j.timeConstants, j.deadTime, j.nrmse, j.intervals, j.expression],
        [
          f.result.value.model.gain,
          f.result.value.model.timeConstants,
          f.result.value.model.deadTime,
          f.result.value.nrmse,
          f.result.value.intervals,
          f.result.value.expression,
        ],
      );
      expect(j.testLog.sha256).toBe(f.result.value.provenance.source.sha256);
    });
  });

  const cases: [string, Diagram, string, TuneOptions['rule'], TuneOptions['controller']][] = [
    ['heating cascade', demoDiagrams.find((x) => x.id === 'heating-cascade')!.diagram, 'cut-supply', 'simc', 'pi'],
    ['heating cascade', demoDiagrams.find((x) => x.id === 'heating-cascade')!.diagram, 'cut-room', 'ms', 'pi'],
    ['supply loop', demoDiagrams.find((x) => x.id === 'supply-loop')!.diagram, 'cut-supply', 'amigo', 'pid'],
    ['three-loop cascade with dead times', furnaceCascade(), 'cut-zone', 'zn-ultimate', 'pi'],
    ['three-loop cascade with dead times', furnaceCascade(), 'cut-flow', 'lambda', 'pi'],
  ];
  for (const [name, d, cut, rule, controller] of cases) {
    it(`${name}, ${cut}, ${rule} ${controller}: the same setting, model and predicted margins`, async () => {
      clearCaches();
      const c = await cli(['tune', 'd.loop.json', '--cut', cut, '--rule', rule, '--controller', controller, '--json'], serializeDiagram(d));
      clearCaches();
      const [t] = editorTask(d, [
        tuneStudyRequest({ rule, controller, cut, reading: 'inner-first', tauC: null, lambda: null, msMax: null }),
      ]) as [TuneData];
      same(c.controller, { kind: t.controller.kind, kp: t.controller.kp, ti: t.controller.ti, td: t.controller.td });
      same(c.model, t.model);
      same(c.predicted, {
        ms: t.predicted.peakSensitivity,
        gainMargin: t.predicted.gainMargin,
        phaseMarginDeg: t.predicted.phaseMarginDeg,
        delayMargin: t.predicted.delayMargin,
        gainCrossover: t.predicted.gainCrossover,
        closedLoopStable: t.predicted.closedLoopStable,
      });
      expect(c.block.id).toBe(t.block!.id);
    });
  }
});
