// Simulation speed: the exact engine against odex on the positioning-axis demo (its 10 s run and
// the editor's run), the compiled model's overhead against the same equations written by hand on
// the same solver, and cost growth with states and simulated time.
import { positioningAxis, type BlockKind, type ParamValue } from '@loopwright/graph';
import { compileModel, simulate, type SimResult, type SimulateOptions } from '@loopwright/sim';
import { buildDiagram, clearLadders } from '@loopwright/sim/testing';
import { actuatorsOf, automaticEnd, runSettings } from '@loopwright/study';
import { Solver } from 'odex';
import { type BenchResult, bench, fitExponent, ratio, record, report, section } from './harness.ts';

function chain(n: number) {
  const blocks: [string, BlockKind, Record<string, ParamValue>?][] = [['r', 'source', { shape: 'step', amplitude: 1 }]];
  const wires: string[] = [];
  let prev = 'r';
  for (let i = 0; i < n; i++) {
    // time constants spread over one decade, so no state is trivially fast
    blocks.push([`lag${i}`, 'first-order-lag', { k: 1, tau: 0.05 * (1 + (9 * i) / Math.max(1, n - 1)) }]);
    wires.push(`${prev} -> lag${i}`);
    prev = `lag${i}`;
  }
  blocks.push(['y', 'probe']);
  wires.push(`${prev} -> y`);
  return buildDiagram(blocks, wires);
}

// PI kp(1 + 1/(ti s)) around k wn²/(s² + 2ζ wn s + wn²) with a first-order lag in the feedback path
const kp = 1.2;
const ti = 1.5;
const wn = 2;
const zeta = 0.4;
const tauH = 0.2;
const loop = buildDiagram(
  [
    ['r', 'source', { shape: 'sinusoid', amplitude: 1, omega: 1.3 }],
    ['e', 'summing-junction', { signs: '+-' }],
    ['c', 'pid', { form: 'ideal', kp, ti, td: 0 }],
    ['p', 'second-order', { k: 1, wn, zeta }],
    ['h', 'first-order-lag', { k: 1, tau: tauH }],
    ['y', 'probe'],
  ],
  ['r -> e.in1', 'h -> e.in2', 'e -> c', 'c -> p', 'p -> h', 'p -> y'],
);

/** The same loop as one hand-written right-hand side, integrated by odex with the same options and output grid. */
function handWritten(until: number, outputStep: number, rtol: number, atol: number): number[] {
  const s = new Solver(4);
  s.denseOutput = true;
  s.relativeTolerance = rtol;
  s.absoluteTolerance = atol;
  s.stabilityCheckCount = 0;
  const dy = [0, 0, 0, 0];
  // states: integral of e; plant position and velocity; feedback lag output
  const f = (t: number, x: number[]) => {
    const e = Math.sin(1.3 * t) - x[3];
    const u = kp * e + x[0];
    dy[0] = (kp / ti) * e;
    dy[1] = x[2];
    dy[2] = wn * wn * u - 2 * zeta * wn * x[2] - wn * wn * x[1];
    dy[3] = (x[1] - x[3]) / tauH;
    return dy;
  };
  const out: number[] = [];
  let k = 0;
  s.solve(f, 0, [0, 0, 0, 0], until, (nr, _xo, x, y, dense) => {
    if (nr === 1) {
      out.push(y[1]);
      k = 1;
      return;
    }
    while (k * outputStep <= x + 1e-12) {
      out.push(k * outputStep < x ? dense!(1, k * outputStep) : y[1]);
      k++;
    }
  });
  return out;
}

/**
 * Two workloads timed in alternation (a, b, a, b, …), so that load on a shared machine falls on
 * both alike; medians of each.
 */
function benchPair(
  nameA: string,
  a: () => unknown,
  nameB: string,
  b: () => unknown,
  rounds: number,
  warmup = 2,
): [BenchResult, BenchResult] {
  for (let i = 0; i < warmup; i++) {
    a();
    b();
  }
  const ta: number[] = [];
  const tb: number[] = [];
  for (let i = 0; i < rounds; i++) {
    let t0 = performance.now();
    a();
    ta.push(performance.now() - t0);
    t0 = performance.now();
    b();
    tb.push(performance.now() - t0);
  }
  const summary = (name: string, ts: number[]): BenchResult => {
    ts.sort((x, y) => x - y);
    const q = (f: number) => ts[Math.min(ts.length - 1, Math.floor(f * ts.length))];
    return { name, runs: ts.length, median: q(0.5), p95: q(0.95), min: ts[0] };
  };
  return [summary(nameA, ta), summary(nameB, tb)];
}

/** Largest difference of two runs' traces at their common output times, relative to each trace's range. */
function maxRelDiff(a: SimResult, b: SimResult): number {
  const at = new Map(b.time.map((t, i) => [t, i]));
  let worst = 0;
  for (const key of Object.keys(a.traces)) {
    const ya = a.traces[key];
    const yb = b.traces[key];
    let lo = Infinity;
    let hi = -Infinity;
    for (const v of yb) {
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
    const range = hi - lo || 1;
    a.time.forEach((t, i) => {
      const j = at.get(t);
      if (j !== undefined) worst = Math.max(worst, Math.abs(ya[i] - yb[j]) / range);
    });
  }
  return worst;
}

export async function run(): Promise<void> {
  const axis = compileModel(positioningAxis);

  section('sim: exact engine against odex — positioning-axis demo, 10 s simulated (saturation, dead time), rtol 1e-6');
  const axisOpts: SimulateOptions = { until: 10, rtol: 1e-6 };
  const ex = simulate(axis, { ...axisOpts, engine: 'exact' });
  const od = simulate(axis, { ...axisOpts, engine: 'odex' });
  const diff = record('axis10s.maxRelDiff', maxRelDiff(ex, od), 'fraction of range');
  record('axis10s.exactSteps', ex.stats.steps, 'count');
  record('axis10s.odexSteps', od.stats.accepted, 'count');
  console.log(
    `  (exact: ${ex.status}, ${ex.stats.steps} steps, ${ex.stats.exact?.modes} modes, ${ex.stats.exact?.jumps} quiescence jumps; ` +
      `odex: ${od.status}, ${od.stats.accepted} steps, ${od.stats.evaluations} evaluations; ${ex.events.length} events)`,
  );
  console.log(
    `  largest trace difference, relative to each trace's range: ${diff.toExponential(2)}  (target ≤ 1e-6: ${diff <= 1e-6 ? 'met' : 'MISSED'})`,
  );
  const [bex, bod] = benchPair(
    'exact engine, axis 10 s',
    // each run from scratch: no exponentials kept from the run before (the bench repeats one run)
    () => {
      clearLadders();
      return simulate(axis, { ...axisOpts, engine: 'exact' });
    },
    'odex, axis 10 s',
    () => simulate(axis, { ...axisOpts, engine: 'odex' }),
    9,
  );
  record('axis10s.ms', bex.median, 'ms');
  record('axis10s.odexMs', bod.median, 'ms');
  report(bex);
  report(bod);
  record('axis10s.speedup', ratio('odex / exact', bod, bex, { atLeast: 8 }, 'axis10s.odex-over-exact'), 'ratio');

  // The editor's run of the demo: the as-drawn run and its linear overlay, the actuators' wires
  // recorded (as study's responseStudy does), on each engine.
  const wires = actuatorsOf(positioningAxis).map((a) => a.key.slice(5));
  type Settings = { until: number; rtol: number; atol: number; outputStep: number };
  const editorPair = (set: Settings, engine: 'exact' | 'odex') => {
    const common: SimulateOptions = { ...set, wires, maxWallMs: 5000, engine };
    return () => {
      clearLadders(); // the overlay may share the as-drawn run's exponentials, as in the editor, but not the repetition before
      simulate(axis, common);
      simulate(axis, { ...common, linear: true });
    };
  };
  const compare = (key: string, title: string, set: Settings, atLeast?: number) => {
    section(title);
    const [ex, od] = benchPair('exact engine', editorPair(set, 'exact'), 'odex', editorPair(set, 'odex'), 15);
    record(`${key}.ms`, ex.median, 'ms');
    record(`${key}.odexMs`, od.median, 'ms');
    report(ex, undefined, `${key}.exact`);
    report(od, undefined, `${key}.odex`);
    record(
      `${key}.speedup`,
      ratio('odex / exact', od, ex, atLeast === undefined ? undefined : { atLeast }, `${key}.odex-over-exact`),
      'ratio',
    );
  };
  // the settings this figure was defined with: the automatic end, rtol 1e-4, atol 1e-7, until/500
  const autoEnd = automaticEnd(positioningAxis);
  const brief = { rtol: 1e-4, atol: 1e-7 };
  compare(
    'editorRun',
    `sim: the editor's run of the demo (automatic end ${autoEnd} s, rtol 1e-4, atol 1e-7, output step until/500; as drawn + linear overlay)`,
    { until: autoEnd, ...brief, outputStep: autoEnd / 500 },
    4,
  );
  // what the editor runs today: the diagram's own simulation settings through study (end 0.3 s, defaults otherwise)
  const now = runSettings(positioningAxis);
  compare(
    'editorRunNow',
    `sim: the editor's run as study sets it today (end ${now.until} s from the diagram, rtol ${now.rtol}, atol ${now.atol}, output step ${now.outputStep} s)`,
    { until: now.until, rtol: now.rtol, atol: now.atol, outputStep: now.outputStep },
  );
  compare('editorRunShort', `sim: the diagram's ${now.until} s at the tolerances above (rtol 1e-4, atol 1e-7, output step until/500)`, {
    until: now.until,
    ...brief,
    outputStep: now.until / 500,
  });

  section('sim: compiled model on odex vs the same equations hand-written on the same solver');
  const model = compileModel(loop);
  const opts: SimulateOptions = { until: 20, outputStep: 0.02, rtol: 1e-8, atol: 1e-10, engine: 'odex' };
  const a = simulate(model, opts);
  const b = handWritten(20, 0.02, 1e-8, 1e-10);
  let hd = 0;
  for (let i = 0; i < b.length; i++) hd = Math.max(hd, Math.abs(a.traces.y[i] - b[i]));
  console.log(`  (same grid: ${a.time.length} vs ${b.length} points, max difference ${hd.toExponential(2)})`);
  const [compiled, hand] = benchPair(
    'compiled PI loop on odex, 20 s',
    () => simulate(model, opts),
    'hand-written RHS, same loop',
    () => handWritten(20, 0.02, 1e-8, 1e-10),
    40,
  );
  report(compiled);
  report(hand);
  ratio('compiled / hand-written', compiled, hand, { atMost: 2 });
  const exactLoop = bench('the same loop on the exact engine', () => simulate(model, { ...opts, engine: 'exact' }), { minRuns: 20 });
  report(exactLoop);

  section('sim: cost growth with states (chains of first-order lags, 10 s; auto engine: exact up to 119 states)');
  const ns = [10, 50, 200];
  const perN = ns.map((n) => {
    const m = compileModel(chain(n));
    const engine = simulate(m, { until: 10 }).engine;
    const r = bench(`chain of ${n} lags (${engine})`, () => simulate(m, { until: 10 }), { minRuns: 5, minMs: 300, warmup: 1 });
    report(r);
    return r.median;
  });
  console.log(`  fitted exponent (cost ∝ states^k): k = ${fitExponent(ns, perN).toFixed(2)}`);

  section('sim: cost growth with simulated time (PI loop, sinusoidal reference, fixed output step)');
  const ts = [10, 40, 160];
  const perT = ts.map((T) => {
    const r = bench(`PI loop, ${T} s`, () => simulate(model, { until: T, outputStep: 0.05 }), { minRuns: 5, minMs: 300, warmup: 1 });
    report(r);
    return r.median;
  });
  console.log(`  fitted exponent (cost ∝ time^k): k = ${fitExponent(ts, perT).toFixed(2)}`);
}
