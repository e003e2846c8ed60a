// Simulation speed: the positioning-axis demo, the compiled model's overhead against the same
// equations written by hand on the same solver, and cost growth with states and simulated time.
import { positioningAxis, type BlockKind, type ParamValue } from '@loopwright/graph';
import { compileModel, simulate } from '@loopwright/sim';
import { Solver } from 'odex';
import { buildDiagram } from '@loopwright/sim/testing';
import { bench, fitExponent, ratio, record, report, section } from './harness.ts';

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

export async function run(): Promise<void> {
  section('sim: positioning-axis demo, 10 s simulated (saturation, dead time), rtol 1e-6');
  const axis = compileModel(positioningAxis);
  const probe = simulate(axis, { until: 10, rtol: 1e-6 });
  record('positioning-axis-10-s.steps', probe.stats.accepted, 'count');
  record('positioning-axis-10-s.evaluations', probe.stats.evaluations, 'count');
  record('positioning-axis-10-s.events', probe.events.length, 'count');
  console.log(`  (${probe.status}; ${probe.stats.accepted} steps, ${probe.stats.evaluations} evaluations, ${probe.events.length} events)`);
  report(bench('positioning axis 10 s', () => simulate(axis, { until: 10, rtol: 1e-6 }), { minRuns: 5, minMs: 500, warmup: 2 }), 30);
  report(bench('positioning axis 0.3 s (the demo\'s own run)', () => simulate(axis, { until: 0.3, rtol: 1e-6 }), { minRuns: 10 }));

  section('sim: compiled model vs the same equations hand-written on the same solver');
  const model = compileModel(loop);
  const opts = { until: 20, outputStep: 0.02, rtol: 1e-8, atol: 1e-10 };
  const a = simulate(model, opts);
  const b = handWritten(opts.until, opts.outputStep, opts.rtol, opts.atol);
  let diff = 0;
  for (let i = 0; i < b.length; i++) diff = Math.max(diff, Math.abs(a.traces.y[i] - b[i]));
  record('compiled-vs-hand-written.points', a.time.length, 'count');
  record('compiled-vs-hand-written.hand-points', b.length, 'count');
  record('compiled-vs-hand-written.max-difference', diff, 'value');
  console.log(`  (same grid: ${a.time.length} vs ${b.length} points, max difference ${diff.toExponential(2)})`);
  const compiled = bench('compiled PI loop, 20 s', () => simulate(model, opts), { minRuns: 20 });
  const hand = bench('hand-written RHS, same loop', () => handWritten(opts.until, opts.outputStep, opts.rtol, opts.atol), { minRuns: 20 });
  report(compiled);
  report(hand);
  ratio('compiled / hand-written', compiled, hand, { atMost: 2 });

  section('sim: cost growth with states (chains of first-order lags, 10 s)');
  const ns = [10, 50, 200];
  const perN = ns.map((n) => {
    const m = compileModel(chain(n));
    const r = bench(`chain of ${n} lags`, () => simulate(m, { until: 10 }), { minRuns: 5, minMs: 300, warmup: 1 });
    report(r);
    return r.median;
  });
  console.log(`  fitted exponent (cost ∝ states^k): k = ${record('chain-growth.exponent', fitExponent(ns, perN), 'exponent').toFixed(2)}`);

  section('sim: cost growth with simulated time (PI loop, sinusoidal reference, fixed output step)');
  const ts = [10, 40, 160];
  const perT = ts.map((T) => {
    const r = bench(`PI loop, ${T} s`, () => simulate(model, { until: T, outputStep: 0.05 }), { minRuns: 5, minMs: 300, warmup: 1 });
    report(r);
    return r.median;
  });
  console.log(`  fitted exponent (cost ∝ time^k): k = ${record('time-growth.exponent', fitExponent(ts, perT), 'exponent').toFixed(2)}`);
}
