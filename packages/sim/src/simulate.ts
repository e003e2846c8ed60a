import { InputError, type ResponseMetrics } from '@loopwright/lti';
import { buildRun } from './build.ts';
import { Budget } from './budget.ts';
import type { CompiledModel } from './compile.ts';
import { chooseEngine } from './engine-choice.ts';
import { probeMetrics } from './metrics.ts';
import { runSegments } from './loop.ts';
import { fmt, resolveOptions } from './options.ts';
import { Recorder } from './recorder.ts';
import { RunState } from './run-state.ts';
import type { SimResult, SimulateOptions } from './types.ts';

/**
 * Runs a compiled diagram from rest (zero states, zero history) to `until`: options checked
 * (options.ts), this run's network built (build.ts), the segment loop (loop.ts) driven by the
 * exact engine or odex (engine-choice.ts), figures from the recorded traces (metrics.ts).
 */
export function simulate(model: CompiledModel, opts: SimulateOptions): SimResult {
  const s = resolveOptions(opts);
  const budget = new Budget(s, opts.isCancelled, opts.onProgress);
  const built = buildRun(model, opts.overrides, s.linear);

  // what to record: every probe, and the wires asked for
  const keys: string[] = [];
  const sigIdx: number[] = [];
  for (const p of model.probes) {
    keys.push(model.blocks[p].id);
    sigIdx.push(built.blockSignal[p]);
  }
  const wireIds = opts.wires === 'all' ? model.diagram.wires.map((w) => w.id) : (opts.wires ?? []);
  for (const w of wireIds) {
    const src = model.wireSource.get(w);
    if (src === undefined) throw new InputError(`simulation option wires: unknown wire "${w}"`, { field: 'wires' });
    keys.push(`wire:${w}`);
    sigIdx.push(built.blockSignal[src]);
  }
  const metricsFor = opts.metricsFor ?? model.probes.map((p) => model.blocks[p].id);
  for (const id of metricsFor) {
    if (!keys.includes(id) || id.startsWith('wire:'))
      throw new InputError(`simulation option metricsFor: "${id}" is not a probe`, { field: 'metricsFor' });
  }

  const rec = new Recorder(keys, Int32Array.from(sigIdx), s.dt);
  const rs = new RunState(model, built, s, budget, rec);
  const engine = chooseEngine(
    rs,
    metricsFor.map((id) => keys.indexOf(id)),
  );
  runSegments(rs, engine);
  cutAtNonFinite(rec, budget);
  budget.finish();

  const traces: Record<string, number[]> = {};
  keys.forEach((key, i) => (traces[key] = rec.cols[i]));
  const metrics: Record<string, ResponseMetrics | null> = {};
  for (const id of metricsFor) {
    const col = keys.indexOf(id);
    const locate = engine.extrema?.bind(engine);
    metrics[id] = probeMetrics(rec.time, traces[id], {
      user: opts.metricsOptions,
      breaks: rec.breaks,
      ...(locate ? { extrema: (dir: number) => locate(col, dir) } : {}),
      status: budget.status,
      message: budget.message,
    });
  }
  const actuators = rs.modes.actuators(budget.reached, engine.locatedPeak?.bind(engine));
  const st = engine.stats();
  return {
    time: rec.time,
    traces,
    events: rs.modes.events,
    status: budget.status,
    message: budget.message,
    timeReached: budget.reached,
    metrics,
    actuators,
    engine: engine.name,
    stats: {
      steps: st.steps,
      accepted: st.accepted,
      rejected: st.rejected,
      evaluations: rs.net.evaluations,
      segments: rs.segments,
      wallMs: budget.elapsed(),
      ...(st.exact ? { exact: st.exact } : {}),
    },
  };
}

/**
 * A recorded signal that is no longer finite ends the run as diverged at that time, the traces
 * kept up to just before it. The engines watch the states; a loop of gains and dead times alone
 * (2·e^(−1e-9·s) in a unity loop) has none, and its signals grow through the dead-time histories.
 */
function cutAtNonFinite(rec: Recorder, budget: Budget): void {
  let first = -1;
  for (const col of rec.cols) {
    const end = first < 0 ? col.length : first;
    for (let i = 0; i < end; i++) {
      if (!Number.isFinite(col[i])) {
        first = i;
        break;
      }
    }
  }
  if (first < 0) return;
  const t = rec.time[first];
  rec.time.length = first;
  for (const col of rec.cols) col.length = first;
  budget.reached = first > 0 ? rec.time[first - 1] : 0;
  budget.stop('diverged', `the run diverged at t = ${fmt(t)} s: a signal is no longer finite`);
}
