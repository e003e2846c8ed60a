/**
 * Simulation runs of a diagram: the run's settings (end time from the request, else the
 * diagram's simulation settings, else long enough for the slowest closed-loop mode to
 * settle; tolerances likewise), the actuators (blocks whose catalogue spec says they limit
 * their output), the traces, the linear model's overlay, and the figures per probe and per
 * actuator.
 */
import { blockSpec, closedLoopPoles, isBlockKind, resolveParams, type Diagram } from '@loopwright/graph';
import { compileModel, simulate, type CompiledModel, type SimResult } from '@loopwright/sim';
import { InputError } from '@loopwright/lti';
import { Lru, cached } from './cache.ts';
import { registerCache } from './caches.ts';
import { engineText } from './fingerprint.ts';
import { without } from './split.ts';
import { engineParameterName, withLiveValue } from './sweep-target.ts';
import type { ActuatorInfo, LiveValue, MetricsRow, ProbeFigures, ResponseResult, RunSettings, RunTrace } from './types.ts';
import { assertAnalysable } from './validate.ts';

/** Integrator tolerances when neither the request nor the diagram gives them (the simulator's own defaults). */
export const DEFAULT_RTOL = 1e-6;
export const DEFAULT_ATOL = 1e-9;
/** Output points per run when no output step is given. */
export const OUTPUT_POINTS = 1000;
/** Wall-time budget of one run when the caller gives none, ms. */
export const DEFAULT_RUN_MS = 10_000;

export interface RunRequest {
  overrides?: Record<string, number>;
  live?: LiveValue | null;
  /** End time in s: overrides the diagram's simulation.end (null/absent: the diagram's, else automatic). */
  until?: number | null;
  rtol?: number;
  atol?: number;
  /** Output grid spacing in s (default until/1000; event times are added). */
  step?: number;
  maxSteps?: number;
  maxWallMs?: number;
  /** 'as-drawn' (default) with every nonlinearity, or 'linear' alone. */
  model?: 'as-drawn' | 'linear';
  /** Also run the linear model (an overlay under the as-drawn run). */
  linearOverlay?: boolean;
  /** Wires recorded besides the probes and the actuators: ids, or 'all'. */
  wires?: string[] | 'all';
  /** Probes shown (overrides the diagram's simulation.probes). */
  probes?: string[] | 'all';
}

/** What a caller gives besides plain data: cancellation polled during a run, and a deadline. */
export interface RunContext {
  isCancelled?: () => boolean;
  /** performance.now() (ms) by which the study must end; a run stops there with status 'budget'. */
  deadline?: number;
  /** Called with the fraction done (0..1) as the work goes on, at most about every 1 %. */
  onProgress?: (fraction: number) => void;
}

const clock = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

const models = registerCache(new Lru<CompiledModel>(6));
const finiteOrNull = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** A run length long enough to see the slowest closed-loop mode settle (and the sources act), on a 1-2-5 grid. */
export function automaticEnd(d: Diagram, overrides: Record<string, number> = {}): number {
  let slowest = Infinity;
  try {
    for (const p of closedLoopPoles(d, overrides)) {
      const a = Math.abs(p.re);
      if (p.re < 0 && a > 1e-9) slowest = Math.min(slowest, a);
    }
  } catch {
    // no linear model (e.g. an algebraic loop): fall back to the default below
  }
  let start = 0;
  for (const b of d.blocks) {
    if (b.kind === 'source' && typeof b.params.start === 'number') start = Math.max(start, b.params.start);
  }
  const settle = Number.isFinite(slowest) ? 6 / slowest : 10;
  const end = start + Math.min(Math.max(settle, 1), 2000);
  const e = Math.floor(Math.log10(end));
  const f = end / 10 ** e;
  return (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * 10 ** e;
}

/** The settings a run uses: the request's, else the diagram's, else the engine's choice. */
export function runSettings(d: Diagram, req: RunRequest = {}, overrides: Record<string, number> = {}): RunSettings {
  const sim = d.simulation ?? {};
  let until: number;
  let untilFrom: RunSettings['untilFrom'];
  if (req.until !== undefined && req.until !== null) {
    until = req.until;
    untilFrom = 'request';
  } else if (sim.end !== undefined) {
    until = sim.end;
    untilFrom = 'diagram';
  } else {
    until = automaticEnd(d, overrides);
    untilFrom = 'automatic';
  }
  if (!(until > 0) || !Number.isFinite(until))
    throw new InputError(`simulation end time: ${until} must be a finite number of seconds above 0`, { field: 'until' });
  return {
    until,
    untilFrom,
    rtol: req.rtol ?? sim.rtol ?? DEFAULT_RTOL,
    atol: req.atol ?? sim.atol ?? DEFAULT_ATOL,
    outputStep: req.step ?? until / OUTPUT_POINTS,
    maxSteps: req.maxSteps ?? null,
  };
}

/**
 * Probes a run shows: the asked list, else the diagram's simulation.probes, else every probe
 * (diagram order). An asked id that is not a probe is an InputError; one left in the diagram's
 * settings after its block went is dropped (check warns about it).
 */
export function shownProbes(d: Diagram, asked?: string[] | 'all'): string[] {
  const all = d.blocks.filter((b) => b.kind === 'probe').map((b) => b.id);
  if (asked === 'all') return all;
  if (asked) {
    for (const id of asked)
      if (!all.includes(id))
        throw new InputError(`probe "${id}" is not a probe block of the diagram (probes: ${all.join(', ') || 'none'})`, {
          field: 'probes',
        });
    return all.filter((id) => asked.includes(id));
  }
  const want = d.simulation?.probes;
  return want ? all.filter((id) => want.includes(id)) : all;
}

/** Blocks whose catalogue spec says they limit their output, with the wire leaving each and the limits in force. */
export function actuatorsOf(d: Diagram, overrides: Record<string, number> = {}): ActuatorInfo[] {
  const out: ActuatorInfo[] = [];
  for (const b of d.blocks) {
    const spec = isBlockKind(b.kind) ? blockSpec(b.kind).actuator : undefined;
    if (!spec) continue;
    const wire = d.wires.find((w) => w.from.block === b.id);
    if (!wire) continue;
    let lower: number | null = null;
    let upper: number | null = null;
    try {
      const p = resolveParams(d, b, overrides) as Record<string, unknown>;
      if (spec.lower) lower = finiteOrNull(p[spec.lower]);
      if (spec.upper) upper = finiteOrNull(p[spec.upper]);
    } catch {
      continue;
    }
    if (spec.onlyWithLimits && lower === null && upper === null) continue;
    out.push({ key: `wire:${wire.id}`, block: b.id, label: `${b.label ?? b.id} output`, lower, upper });
  }
  return out;
}

/** A probe's unit as its field holds it (null: none given). */
const probeUnit = (u: unknown): string | null => (typeof u === 'string' && u.trim() !== '' ? u.trim() : null);

/**
 * The panels a response is drawn in (small multiples on one time axis): probes of one unit
 * share a panel and its axis, in the order of their first probe; a probe without a unit has a
 * panel of its own. `shown`: the probe ids shown, in order.
 */
export function responsePanels(
  probes: readonly { id: string; label: string; unit: string | null }[],
  shown: readonly string[],
): { unit: string | null; probes: string[] }[] {
  const out: { unit: string | null; probes: string[] }[] = [];
  for (const id of shown) {
    const p = probes.find((x) => x.id === id);
    if (!p) continue;
    const same = p.unit === null ? undefined : out.find((g) => g.unit === p.unit);
    if (same) same.probes.push(id);
    else out.push({ unit: p.unit, probes: [id] });
  }
  return out;
}

function modelOf(d: Diagram): CompiledModel {
  return cached(models, engineText(d), () => compileModel(d));
}

function traceOf(r: SimResult): RunTrace {
  const probeFigures: Record<string, ProbeFigures | null> = {};
  for (const [id, m] of Object.entries(r.metrics)) {
    probeFigures[id] = m
      ? {
          riseTime: finiteOrNull(m.riseTime),
          overshootPct: finiteOrNull(m.overshootPct),
          peakTime: finiteOrNull(m.peakTime),
          peak: finiteOrNull(m.peak),
          settlingTime: finiteOrNull(m.settlingTime),
          steadyState: finiteOrNull(m.steadyState),
          steadyStateError: finiteOrNull(m.steadyStateError),
          undershootPct: finiteOrNull(m.undershootPct),
          iae: finiteOrNull(m.iae),
          ise: finiteOrNull(m.ise),
        }
      : null;
  }
  const actuatorFigures: RunTrace['actuatorFigures'] = {};
  for (const [id, a] of Object.entries(r.actuators))
    actuatorFigures[id] = { timeInSaturation: a.timeInSaturation, peakEffort: a.peakEffort, limitHits: a.limitHits };
  return {
    time: r.time,
    traces: r.traces,
    status: r.status,
    message: r.message,
    timeReached: r.timeReached,
    events: r.events.map((e) => ({ time: e.time, kind: e.kind, block: e.block })),
    stats: { ...r.stats },
    probeFigures,
    actuatorFigures,
  };
}

function metricsRows(d: Diagram, r: RunTrace, actuators: ActuatorInfo[]): MetricsRow[] {
  const none = { timeInSaturation: null, peakEffort: null, limitHits: null };
  const rows: MetricsRow[] = [];
  for (const b of d.blocks) {
    if (b.kind !== 'probe') continue;
    const m = r.probeFigures[b.id];
    rows.push({
      probe: b.id,
      label: b.label ?? b.id,
      riseTime: m?.riseTime ?? null,
      overshootPct: m?.overshootPct ?? null,
      peakTime: m?.peakTime ?? null,
      peak: m?.peak ?? null,
      settlingTime: m?.settlingTime ?? null,
      steadyState: m?.steadyState ?? null,
      steadyStateError: m?.steadyStateError ?? null,
      iae: m?.iae ?? null,
      ...none,
    });
  }
  for (const a of actuators) {
    const f = r.actuatorFigures[a.block];
    if (!f) continue;
    rows.push({
      probe: a.key,
      label: a.label,
      riseTime: null,
      overshootPct: null,
      peakTime: null,
      peak: null,
      settlingTime: null,
      steadyState: null,
      steadyStateError: null,
      iae: null,
      timeInSaturation: f.timeInSaturation,
      peakEffort: f.peakEffort,
      limitHits: f.limitHits,
    });
  }
  return rows;
}

export function responseStudy(d: Diagram, req: RunRequest = {}, ctx: RunContext = {}): ResponseResult {
  const { diagram, overrides } = withLiveValue(d, req.overrides ?? {}, req.live);
  assertAnalysable(diagram, req.live ? without(overrides, engineParameterName(req.live.target)) : overrides, ctx.deadline);
  const settings = runSettings(diagram, req, overrides);
  const shown = shownProbes(diagram, req.probes);
  const actuators = actuatorsOf(diagram, overrides);
  const extra = req.wires === 'all' ? ('all' as const) : [...new Set([...(req.wires ?? []), ...actuators.map((a) => a.key.slice(5))])];
  const model = modelOf(diagram);
  const common = {
    until: settings.until,
    overrides,
    wires: extra,
    rtol: settings.rtol,
    atol: settings.atol,
    outputStep: settings.outputStep,
    // The run's own budget, shortened to what the caller's deadline leaves (half each when an overlay follows).
    maxWallMs: Math.max(
      1,
      Math.min(
        req.maxWallMs ?? DEFAULT_RUN_MS,
        ctx.deadline !== undefined ? (ctx.deadline - clock()) / (req.linearOverlay ? 2 : 1) : Infinity,
      ),
    ),
    ...(settings.maxSteps !== null ? { maxSteps: settings.maxSteps } : {}),
    isCancelled: ctx.isCancelled,
  };
  const linearOnly = req.model === 'linear';
  const overlay = !linearOnly && req.linearOverlay === true;
  // Progress: the run as drawn, then the linear overlay, each its share of the whole.
  const share = (from: number, size: number) => (ctx.onProgress ? { onProgress: (f: number) => ctx.onProgress!(from + size * f) } : {});
  const run = traceOf(simulate(model, { ...common, linear: linearOnly, ...share(0, overlay ? 0.5 : 1) }));
  // The overlay is drawn, never measured: no figures, so its run locates no turning points either.
  const linear = overlay ? traceOf(simulate(model, { ...common, linear: true, metricsFor: [], ...share(0.5, 0.5) })) : null;
  return {
    run,
    model: linearOnly ? 'linear' : 'as-drawn',
    linear,
    probes: diagram.blocks
      .filter((b) => b.kind === 'probe')
      .map((b) => ({ id: b.id, label: b.label ?? b.id, unit: probeUnit(b.params.unit) })),
    shownProbes: shown,
    actuators,
    metrics: metricsRows(diagram, run, actuators),
    settings,
    until: settings.until,
  };
}
