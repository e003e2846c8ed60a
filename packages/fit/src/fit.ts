import { InputError } from '@loopwright/lti';
import { leastSquares, normalMatrix, sumOfSquares, symmetricInverse } from './least-squares.ts';
import { type ProcessModel, type ProcessModelKind, PROCESS_MODEL_KINDS, lagCount, modelExpression, processModel } from './process-model.ts';
import { type InputInterpolation, INPUT_INTERPOLATIONS, type SampledInput, unitResponse } from './response.ts';
import { studentTQuantile } from './student-t.ts';
import { type TestLog, checkTestLog } from './test-log.ts';
import { type TwoPointEstimate, rampAsymptote, twoPointEstimate } from './two-point.ts';

/**
 * Fitting a process model to a test log by nonlinear least squares on the response to the
 * input actually recorded (response.ts: exact for the stated interpolation between samples),
 * in deviations from the initial steady state.
 *
 * - Operating point: the input's mean over the samples before it first moves (by more than
 *   2 % of its largest excursion; at least the first sample); the output's initial steady
 *   state is a fitted parameter (started at its pre-step mean), so its uncertainty enters the
 *   intervals. A caller who knows the operating point gives it, and it is then held.
 * - Start: the two-point method (FOPDT/SOPDT) or the ramp asymptote (IPDT) when the input is a
 *   step with a lasting change, and the best point of a coarse grid over lags and dead time
 *   (gain by linear least squares there); SOPDT also starts from the FOPDT fit with the second
 *   lag taken out of its dead time and lag. Each start gets a short Levenberg–Marquardt round,
 *   the best is carried to convergence. A start given by the caller replaces these.
 * - Parameters are searched as gain, ln τ (lags stay positive) and θ ≥ 0, scaled to order one.
 * - Intervals: p̂ ± t(1 − α/2, N − p)·√diag(s²·(JᵀJ)⁻¹), s² = SSE/(N − p), J the Jacobian of
 *   the model in (K, τ…, θ) at the optimum; cut at 0 for lags and dead time. They are
 *   linearised and assume independent residuals, so correlated residuals make them too
 *   narrow: the fit warns when the lag-one correlation of the residuals is high.
 * - nrmse = √(SSE/N) / (max y − min y): the RMS error as a fraction of the output's range.
 */
export interface FitOptions {
  model: ProcessModelKind;
  /** The input between samples (default 'linear'; 'hold' for a digital controller's output). */
  between?: InputInterpolation;
  /** Start the search here instead of the automatic starts. */
  start?: ProcessModel;
  /** Confidence level of the intervals (default 0.95). */
  confidence?: number;
  /** Iteration cap of each Levenberg–Marquardt run (default 400). */
  maxIterations?: number;
  /**
   * The initial steady state, when known (e.g. a log that starts with the step): deviations are
   * taken from it and the process is at rest there before the first sample. By default it is
   * read from the samples before the input first moves.
   */
  operatingPoint?: { input: number; output: number };
}

export type Interval = [number, number] | null;

export interface ParameterEstimate {
  name: 'gain' | 'timeConstant1' | 'timeConstant2' | 'deadTime' | 'initialOutput';
  value: number;
  standardError: number | null;
  interval: Interval;
}

export interface ProcessFit {
  model: ProcessModel;
  /** The model as an expression the editor accepts, e.g. `2*exp(-1.5*s)/(5*s+1)`. */
  expression: string;
  parameters: ParameterEstimate[];
  intervals: { gain: Interval; timeConstants: Interval[]; deadTime: Interval };
  confidence: number;
  nrmse: number;
  rmse: number;
  sse: number;
  samples: number;
  degreesOfFreedom: number;
  /**
   * The initial steady state (absolute units) the deviations are taken from: the input's mean
   * over the `samples` before it first moved, the output fitted with the model (or both as
   * given by the caller, samples 0).
   */
  operatingPoint: { input: number; output: number; samples: number };
  between: InputInterpolation;
  /** The log's times, the measured and fitted outputs (absolute units) and residuals (measured − fitted). */
  time: number[];
  measured: number[];
  fitted: number[];
  residuals: number[];
  /** Lag-one autocorrelation of the residuals (near 0 for white residuals). */
  residualCorrelation: number;
  start: { method: 'two-point' | 'asymptote' | 'grid' | 'first-order fit' | 'given'; model: ProcessModel };
  twoPoint: TwoPointEstimate | null;
  iterations: number;
  converged: boolean;
  warnings: string[];
}

/** Iterations each automatic start gets before the best one is carried on. */
const SCREEN_ITERATIONS = 8;

type LogData = Pick<TestLog, 'time' | 'input' | 'output'> & Partial<Pick<TestLog, 'rows' | 'columns'>>;

interface Prepared {
  t: Float64Array; // time − time[0]
  t0: number;
  span: number;
  dtMin: number;
  input: SampledInput; // scaled input deviations v/vs
  w: Float64Array; // scaled output deviations (y − y0)/ys
  vs: number;
  ys: number;
  u0: number;
  y0: number;
  baseline: number;
  moveIndex: number;
}

function prepare(log: LogData, between: InputInterpolation, given?: { input: number; output: number }): Prepared {
  const n = log.time.length;
  const u = log.input;
  const y = log.output;
  const ref = given ? given.input : u[0];
  let excursion = 0;
  for (let i = 0; i < n; i++) excursion = Math.max(excursion, Math.abs(u[i] - ref));
  let m = given ? 0 : 1;
  while (m < n && Math.abs(u[m] - ref) <= 0.02 * excursion) m++;
  let u0 = 0;
  let y0 = 0;
  if (given) {
    u0 = given.input;
    y0 = given.output;
  } else {
    for (let i = 0; i < m; i++) {
      u0 += u[i];
      y0 += y[i];
    }
    u0 /= m;
    y0 /= m;
  }
  const t0 = log.time[0];
  const t = Float64Array.from(log.time, (x) => x - t0);
  let vs = 0;
  let ys = 0;
  for (let i = 0; i < n; i++) {
    vs = Math.max(vs, Math.abs(u[i] - u0));
    ys = Math.max(ys, Math.abs(y[i] - y0));
  }
  let dtMin = Infinity;
  for (let i = 1; i < n; i++) dtMin = Math.min(dtMin, t[i] - t[i - 1]);
  return {
    t,
    t0,
    span: t[n - 1],
    dtMin,
    input: { time: t, value: Float64Array.from(u, (x) => (x - u0) / vs), between },
    w: Float64Array.from(y, (x) => (x - y0) / ys),
    vs,
    ys,
    u0,
    y0,
    baseline: given ? 0 : m,
    moveIndex: m,
  };
}

/**
 * Search-space parameters [K̂, ln τ…, θ/span, b̂] with K̂ = K·vs/ys and, unless the operating
 * point was given, b̂ = the initial output's offset from the pre-step mean over ys: the initial
 * steady state is estimated with the model (a mean of a few pre-step samples alone would carry
 * its noise into the gain, outside the intervals).
 */
interface Space {
  kind: ProcessModelKind;
  lags: number;
  offset: boolean;
  toVector(m: ProcessModel, bias?: number): number[];
  fromVector(p: readonly number[]): { model: ProcessModel; bias: number };
  unit(p: readonly number[]): Float64Array;
  min: number[];
  max: number[];
}

function space(kind: ProcessModelKind, d: Prepared, offset: boolean): Space {
  const nl = lagCount(kind);
  const lnMin = Math.log(1e-4 * d.dtMin);
  const lnMax = Math.log(1e3 * Math.max(d.span, d.dtMin));
  const extra = offset ? 1 : 0;
  return {
    kind,
    lags: nl,
    offset,
    toVector: (m, bias = 0) => [
      (m.gain * d.vs) / d.ys,
      ...m.timeConstants.map(Math.log),
      m.deadTime / d.span,
      ...(offset ? [bias / d.ys] : []),
    ],
    fromVector: (p) => ({
      model: processModel(kind, (p[0] * d.ys) / d.vs, p.slice(1, 1 + nl).map(Math.exp), p[1 + nl] * d.span),
      bias: offset ? p[2 + nl] * d.ys : 0,
    }),
    unit: (p) => unitResponse(kind, p.slice(1, 1 + nl).map(Math.exp), p[1 + nl] * d.span, d.input),
    min: [-1e6, ...new Array<number>(nl).fill(lnMin), 0, ...new Array<number>(extra).fill(-1e6)],
    max: [1e6, ...new Array<number>(nl).fill(lnMax), 1, ...new Array<number>(extra).fill(1e6)],
  };
}

/** Jacobian columns in the search space: ∂/∂K̂ and ∂/∂b̂ exactly, lags and θ by central differences (forward at θ = 0). */
function searchJacobian(s: Space, p: readonly number[]): Float64Array[] {
  const r = s.unit(p);
  const cols: Float64Array[] = [r];
  const n = r.length;
  const theta = 1 + s.lags;
  for (let j = 1; j <= theta; j++) {
    const h = j === theta ? 1e-7 : 1e-6;
    const up = [...p];
    const dn = [...p];
    up[j] += h;
    dn[j] = j === theta ? Math.max(0, p[j] - h) : p[j] - h;
    const ru = s.unit(up);
    const rd = s.unit(dn);
    const width = up[j] - dn[j];
    const col = new Float64Array(n);
    for (let i = 0; i < n; i++) col[i] = (p[0] * (ru[i] - rd[i])) / width;
    cols.push(col);
  }
  if (s.offset) cols.push(new Float64Array(n).fill(1));
  return cols;
}

/** Gain (and offset) by linear least squares on a unit response: y ≈ k·r (+ b). */
function linearGain(r: ArrayLike<number>, w: ArrayLike<number>, offset: boolean): { k: number; b: number; sse: number } | null {
  const n = r.length;
  let sr = 0;
  let sw = 0;
  let rr = 0;
  let rw = 0;
  let ww = 0;
  for (let i = 0; i < n; i++) {
    sr += r[i];
    sw += w[i];
    rr += r[i] * r[i];
    rw += r[i] * w[i];
    ww += w[i] * w[i];
  }
  if (!offset) return rr > 0 && rw !== 0 ? { k: rw / rr, b: 0, sse: ww - (rw * rw) / rr } : null;
  const det = n * rr - sr * sr;
  if (!(det > 1e-12 * n * rr)) return null;
  const k = (n * rw - sr * sw) / det;
  const b = (sw - k * sr) / n;
  return { k, b, sse: ww - k * rw - b * sw };
}

function fitFrom(s: Space, d: Prepared, start: number[], maxIterations: number) {
  const p0 = start.map((v, i) => Math.min(s.max[i], Math.max(s.min[i], v)));
  // Gain and offset are linear: start them at their least-squares values for these dynamics.
  const lin = linearGain(s.unit(p0), d.w, s.offset);
  if (lin) {
    p0[0] = lin.k;
    if (s.offset) p0[p0.length - 1] = lin.b;
  }
  const bIndex = s.offset ? p0.length - 1 : -1;
  return leastSquares({
    y: d.w,
    model: (p) => {
      const r = s.unit(p);
      const b = bIndex >= 0 ? p[bIndex] : 0;
      return r.map((v) => p[0] * v + b);
    },
    jacobian: (p) => searchJacobian(s, p),
    start: p0,
    min: s.min,
    max: s.max,
    maxIterations,
  });
}

/** The best point of a coarse grid over lags and dead time, gain (and offset) by linear least squares. */
function gridStart(kind: ProcessModelKind, d: Prepared, offset: boolean): ProcessModel {
  const taus: number[] = [];
  const lo = Math.max(d.dtMin, d.span / 1000);
  for (let i = 0; i < 9; i++) taus.push(lo * (d.span / lo) ** (i / 8));
  const thetas = [0];
  for (let i = 0; i < 7; i++) thetas.push(d.dtMin * (d.span / 2 / d.dtMin) ** (i / 6));
  let best: { sse: number; m: ProcessModel } | null = null;
  const lagSets: number[][] = kind === 'ipdt' ? [[]] : kind === 'fopdt' ? taus.map((t) => [t]) : taus.map((t) => [t, t / 4]);
  for (const lags of lagSets) {
    for (const theta of thetas) {
      const lin = linearGain(unitResponse(kind, lags, theta, d.input), d.w, offset);
      if (!lin || lin.k === 0) continue;
      if (!best || lin.sse < best.sse) best = { sse: lin.sse, m: processModel(kind, (lin.k * d.ys) / d.vs, lags, theta) };
    }
  }
  if (!best) throw new InputError('fit: the model cannot respond to this input within the log (no start found)', { field: 'input' });
  return best.m;
}

interface StepShape {
  stepTime: number;
  stepSize: number; // scaled
}

/** A lasting step in the input: the first move and the final input level (scaled), or null for a pulse. */
function stepShape(d: Prepared): StepShape | null {
  const n = d.t.length;
  const tail = Math.max(3, Math.ceil(0.05 * n));
  let s = 0;
  for (let i = n - tail; i < n; i++) s += d.input.value[i];
  const final = s / tail;
  if (Math.abs(final) < 0.2) return null; // the input returned (a pulse): no two-point reading
  const m = Math.min(d.moveIndex, n - 1);
  const stepTime = d.input.between === 'hold' || m === 0 ? d.t[m] : 0.5 * (d.t[m - 1] + d.t[m]);
  return { stepTime, stepSize: final };
}

function classicalStart(
  kind: ProcessModelKind,
  d: Prepared,
): { model: ProcessModel; twoPoint: TwoPointEstimate | null; method: 'two-point' | 'asymptote' } | null {
  const step = stepShape(d);
  if (!step) return null;
  try {
    if (kind === 'ipdt') {
      const from = step.stepTime + 0.5 * (d.span - step.stepTime);
      const a = rampAsymptote(d.t, d.w, from);
      const k = (a.slope / step.stepSize) * (d.ys / d.vs);
      const theta = Math.max(0, a.zeroCrossing - step.stepTime);
      if (!Number.isFinite(k) || k === 0) return null;
      return { model: processModel('ipdt', k, [], Math.min(theta, d.span)), twoPoint: null, method: 'asymptote' };
    }
    const tp = twoPointEstimate(d.t, d.w, { stepTime: step.stepTime, stepSize: step.stepSize });
    const estimate: TwoPointEstimate = {
      ...tp,
      gain: (tp.gain * d.ys) / d.vs,
      stepSize: tp.stepSize * d.vs,
      finalChange: tp.finalChange * d.ys,
      stepTime: tp.stepTime + d.t0,
    };
    const tau = Math.max(tp.timeConstant, d.dtMin);
    const theta = Math.min(Math.max(0, tp.deadTime), d.span);
    const lags = kind === 'fopdt' ? [tau] : [tau, Math.max(tau / 4, d.dtMin)];
    return { model: processModel(kind, estimate.gain, lags, theta), twoPoint: estimate, method: 'two-point' };
  } catch (e) {
    if (e instanceof InputError) return null;
    throw e;
  }
}

/** Lag-one autocorrelation of a series about its mean. */
function lagOneCorrelation(r: readonly number[]): number {
  const n = r.length;
  const mean = r.reduce((a, b) => a + b, 0) / n;
  let num = 0;
  let den = 0;
  for (let i = 0; i < n; i++) {
    den += (r[i] - mean) ** 2;
    if (i > 0) num += (r[i] - mean) * (r[i - 1] - mean);
  }
  return den > 0 ? num / den : 0;
}

export function fitProcessModel(log: LogData, options: FitOptions): ProcessFit {
  const kind = options.model;
  if (!PROCESS_MODEL_KINDS.includes(kind))
    throw new InputError(`model: '${String(kind)}' is not one of ${PROCESS_MODEL_KINDS.join(', ')}`, { field: 'model' });
  const between = options.between ?? 'linear';
  if (!INPUT_INTERPOLATIONS.includes(between))
    throw new InputError(`input between samples: '${String(between)}' is not one of ${INPUT_INTERPOLATIONS.join(', ')}`, {
      field: 'between',
    });
  const confidence = options.confidence ?? 0.95;
  if (!(confidence > 0 && confidence < 1))
    throw new InputError(`confidence must lie between 0 and 1, got ${confidence}`, { field: 'confidence' });
  const maxIterations = options.maxIterations ?? 400;
  if (!Number.isInteger(maxIterations) || maxIterations < 1)
    throw new InputError(`maxIterations must be a whole number ≥ 1, got ${maxIterations}`, { field: 'maxIterations' });
  const given = options.operatingPoint;
  if (given && !(Number.isFinite(given.input) && Number.isFinite(given.output))) {
    throw new InputError(`operating point: input and output must be finite numbers, got ${given.input} and ${given.output}`, {
      field: 'operatingPoint',
    });
  }
  const columns = log.columns ?? { time: 'time', input: 'input', output: 'output' };
  checkTestLog({ rows: null, ...log, columns }, given);
  if (options.start && options.start.kind !== kind)
    throw new InputError(`start: a ${options.start.kind} model cannot start a ${kind} fit`, { field: 'start' });

  const d = prepare(log, between, given);
  const s = space(kind, d, !given);
  const starts: { method: ProcessFit['start']['method']; vector: number[] }[] = [];
  const add = (method: ProcessFit['start']['method'], m: ProcessModel) => starts.push({ method, vector: s.toVector(m) });
  let twoPoint: TwoPointEstimate | null = null;
  if (options.start) {
    const g = options.start;
    add('given', processModel(kind, g.gain, g.timeConstants, g.deadTime));
  } else {
    const classical = classicalStart(kind, d);
    if (classical) {
      twoPoint = classical.twoPoint;
      add(classical.method, classical.model);
    }
    if (kind === 'sopdt') {
      const first = fitProcessModel(log, { model: 'fopdt', between, maxIterations, operatingPoint: given });
      const [tau] = first.model.timeConstants;
      const theta = first.model.deadTime;
      for (const tau2 of [theta, 0.3 * tau, 0.1 * tau]) {
        if (!(tau2 > 0)) continue;
        const lag1 = Math.max(tau - tau2 / 2, 1.5 * tau2);
        add('first-order fit', processModel('sopdt', first.model.gain, [lag1, tau2], Math.max(0, theta - tau2 / 2)));
      }
    }
    add('grid', gridStart(kind, d, s.offset));
  }

  // Screen every start with one short round, then carry the best one to convergence.
  let best: { result: ReturnType<typeof fitFrom>; start: (typeof starts)[number] } | null = null;
  for (const st of starts) {
    const result = fitFrom(s, d, st.vector, starts.length > 1 ? SCREEN_ITERATIONS : maxIterations);
    if (!best || result.sse < best.result.sse) best = { result, start: st };
  }
  if (starts.length > 1 && !best!.result.converged) {
    const more = fitFrom(s, d, best!.result.p, maxIterations);
    best = { result: { ...more, iterations: more.iterations + best!.result.iterations }, start: best!.start };
  }
  const { result, start } = best!;
  return summarise(log, d, s, result, { method: start.method, model: s.fromVector(start.vector).model }, twoPoint, confidence, between);
}

function summarise(
  log: LogData,
  d: Prepared,
  s: Space,
  result: { p: number[]; sse: number; iterations: number; converged: boolean },
  start: ProcessFit['start'],
  twoPoint: TwoPointEstimate | null,
  confidence: number,
  between: InputInterpolation,
): ProcessFit {
  const { model, bias } = s.fromVector(result.p);
  const n = log.time.length;
  const lags = [...model.timeConstants];
  const y0 = d.y0 + bias;
  // Response and Jacobian in natural parameters (K, τ…, θ[, initial output]), original units.
  const raw: SampledInput = { ...d.input, value: Array.from(d.input.value, (v) => v * d.vs) };
  const unitAt = (ls: number[], theta: number) => unitResponse(model.kind, ls, theta, raw);
  const r = unitAt(lags, model.deadTime);
  const fitted = Array.from(r, (v) => y0 + model.gain * v);
  const residuals = fitted.map((f, i) => log.output[i] - f);
  const sse = sumOfSquares(log.output, fitted);
  const cols: Float64Array[] = [r];
  for (let j = 0; j < lags.length; j++) {
    const h = 1e-6 * lags[j];
    const up = [...lags];
    const dn = [...lags];
    up[j] += h;
    dn[j] -= h;
    const ru = unitAt(up, model.deadTime);
    const rd = unitAt(dn, model.deadTime);
    cols.push(ru.map((v, i) => (model.gain * (v - rd[i])) / (2 * h)));
  }
  {
    const h = 1e-7 * Math.max(d.span, d.dtMin);
    const lo = Math.max(0, model.deadTime - h);
    const ru = unitAt(lags, model.deadTime + h);
    const rd = unitAt(lags, lo);
    cols.push(ru.map((v, i) => (model.gain * (v - rd[i])) / (model.deadTime + h - lo)));
  }
  if (s.offset) cols.push(new Float64Array(n).fill(1));
  const p = cols.length;
  const dof = n - p;
  const inv = dof > 0 ? symmetricInverse(normalMatrix(cols)) : null;
  const s2 = dof > 0 ? sse / dof : NaN;
  const tq = dof > 0 ? studentTQuantile(0.5 + confidence / 2, dof) : NaN;
  const values = [model.gain, ...lags, model.deadTime, ...(s.offset ? [y0] : [])];
  const names: ParameterEstimate['name'][] = [
    'gain',
    ...lags.map((_, j) => (j === 0 ? 'timeConstant1' : 'timeConstant2') as ParameterEstimate['name']),
    'deadTime',
    ...(s.offset ? (['initialOutput'] as const) : []),
  ];
  // Lags and dead time cannot be negative: their intervals are cut at 0.
  const parameters: ParameterEstimate[] = values.map((value, j) => {
    const se = inv && Number.isFinite(s2) ? Math.sqrt(Math.max(0, s2 * inv[j][j])) : null;
    const positive = names[j] !== 'gain' && names[j] !== 'initialOutput';
    const lower = (x: number) => (positive ? Math.max(0, x) : x);
    return { name: names[j], value, standardError: se, interval: se === null ? null : [lower(value - tq * se), value + tq * se] };
  });
  let ymin = Infinity;
  let ymax = -Infinity;
  for (const v of log.output) {
    ymin = Math.min(ymin, v);
    ymax = Math.max(ymax, v);
  }
  const rmse = Math.sqrt(sse / n);
  const residualCorrelation = lagOneCorrelation(residuals);
  const warnings = fitWarnings(model, parameters, d, residualCorrelation, result.converged, s.lags);
  return {
    model,
    expression: modelExpression(model),
    parameters,
    intervals: {
      gain: parameters[0].interval,
      timeConstants: parameters.slice(1, 1 + lags.length).map((q) => q.interval),
      deadTime: parameters[1 + lags.length].interval,
    },
    confidence,
    nrmse: rmse / (ymax - ymin),
    rmse,
    sse,
    samples: n,
    degreesOfFreedom: dof,
    operatingPoint: { input: d.u0, output: y0, samples: d.baseline },
    between,
    time: [...log.time],
    measured: [...log.output],
    fitted,
    residuals,
    residualCorrelation,
    start,
    twoPoint,
    iterations: result.iterations,
    converged: result.converged,
    warnings,
  };
}

function fitWarnings(model: ProcessModel, ps: ParameterEstimate[], d: Prepared, rho: number, converged: boolean, nl: number): string[] {
  const w: string[] = [];
  if (!converged) w.push('the least-squares search stopped at its iteration limit before it converged');
  const gain = ps[0];
  if (gain.interval && gain.interval[0] <= 0 && gain.interval[1] >= 0) {
    w.push(
      'the gain is not distinguishable from zero: the output change is within the noise, or the output does not respond to this input',
    );
  }
  if (ps.some((q) => q.interval === null)) {
    w.push(
      nl === 2
        ? 'some parameters are not determined by the data (for two nearly equal lags, or a lag the data cannot resolve): try a first-order model'
        : 'some parameters are not determined by the data',
    );
  }
  for (const q of ps) {
    if (
      q.interval &&
      (q.name === 'gain' || q.name.startsWith('timeConstant')) &&
      (q.interval[1] - q.interval[0]) / 2 > 0.5 * Math.abs(q.value)
    ) {
      w.push(`${q.name} is poorly determined (its interval is wider than ±50 % of the value)`);
    }
  }
  if (model.deadTime === 0) w.push('the dead time sits at its lower bound 0: its interval is one-sided');
  if (model.kind !== 'ipdt') {
    const step = d.moveIndex < d.t.length ? d.t[Math.min(d.moveIndex, d.t.length - 1)] : 0;
    const settle = model.deadTime + 3 * model.timeConstants.reduce((a, b) => a + b, 0);
    if (d.span - step < settle)
      w.push('the log ends before the response has settled (less than θ + 3·Στ after the input moved): the gain is extrapolated');
  }
  if (rho > 0.5) {
    w.push(
      `the residuals are strongly correlated (lag-one correlation ${rho.toFixed(2)}): the model misses some dynamics or a disturbance acted during the test, and the intervals are too narrow`,
    );
  }
  return w;
}

/** The fields the CLI prints for a fit (`loopwright fit --json`). */
export function fitSummary(fit: ProcessFit) {
  return {
    model: fit.model.kind,
    gain: fit.model.gain,
    timeConstants: [...fit.model.timeConstants],
    deadTime: fit.model.deadTime,
    nrmse: fit.nrmse,
    intervals: fit.intervals,
    confidence: fit.confidence,
    expression: fit.expression,
    warnings: [...fit.warnings],
  };
}
