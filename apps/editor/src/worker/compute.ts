/**
 * What the engine worker computes, as plain functions (unit-tested in node without a worker).
 * Heavy, slider-independent work is cached: the locus of a sweep does not depend on the swept
 * value, and a compiled simulation model does not depend on parameter values.
 */
import {
  affineSplit,
  analyseLoops,
  closedLoopPoles,
  compiledOf,
  feedbackWires,
  loopAtCut,
  resolveParams,
  sweepLocus,
  type Diagram,
  type LoopsReport,
} from '@loopwright/graph';
import {
  defaultFrequencyGrid,
  frequencyResponse,
  loopMargins,
  marginFigures,
  poly,
  polyRoots,
  rootLocus,
  type Complex,
  type LoopMargins,
  type RootLocus,
  type TransferFunction,
} from '@loopwright/lti';
import { compileModel, simulate, type CompiledModel, type SimResult } from '@loopwright/sim';
import type {
  ActuatorInfo,
  AnalysisRequest,
  AnalysisResult,
  Cx,
  FrequencyData,
  LocusBranch,
  LocusData,
  LoopsData,
  LoopsRequest,
  LoopsResult,
  MarginsData,
  MetricsRow,
  Part,
  ResponseRequest,
  ResponseResult,
  SimRun,
  SweepSpec,
} from './protocol.ts';

const now = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

function part<T>(fn: () => T): Part<T> {
  try {
    return { ok: true, value: fn() };
  } catch (e) {
    return { ok: false, error: e instanceof Error ? e.message : String(e) };
  }
}

const plain = (c: Complex): Cx => ({ re: c.re, im: c.im });

/** Small LRU caches keyed by strings. */
class Lru<V> {
  private readonly map = new Map<string, V>();
  constructor(private readonly size: number) {}
  get(key: string): V | undefined {
    const v = this.map.get(key);
    if (v !== undefined) {
      this.map.delete(key);
      this.map.set(key, v);
    }
    return v;
  }
  set(key: string, v: V): void {
    this.map.delete(key);
    this.map.set(key, v);
    while (this.map.size > this.size) this.map.delete(this.map.keys().next().value as string);
  }
}

/** The diagram as the engine sees it, with one parameter's value left out. */
function engineKey(d: Diagram, without?: string): string {
  return JSON.stringify({
    parameters: d.parameters.map((p) => (p.name === without ? { ...p, value: null } : p)),
    sweeps: d.sweeps,
    blocks: d.blocks.map((b) => [b.id, b.kind, b.params]),
    wires: d.wires,
  });
}

const locusCache = new Lru<LocusData>(12);
const modelCache = new Lru<CompiledModel>(6);

function branchesOf(br: { s: Complex; k: number }[][]): LocusBranch[] {
  return br.map((b) => ({ re: b.map((p) => p.s.re), im: b.map((p) => p.s.im), k: b.map((p) => p.k) }));
}

function locusData(d: Diagram, sweep: SweepSpec): LocusData {
  const { parameter, negative } = sweep;
  const key = `${parameter}|${negative}|${sweep.min}|${sweep.max}|${engineKey(d, parameter)}`;
  const hit = locusCache.get(key);
  if (hit) return hit;
  // The locus does not depend on the swept value (only on everything else), so it is cached
  // across slider moves. Exact when the characteristic polynomial is affine in the parameter.
  const split = affineSplit(d, parameter, {});
  let out: LocusData;
  if (split && !poly.isZero(split.n0) && !poly.isZero(split.d0)) {
    const { n0, d0 } = split;
    // The whole locus (out to the zeros and asymptotes) for the geometry, and the slider's
    // part again, densely, for hit-testing, framing and the current-pole track.
    const L: RootLocus = rootLocus(n0, d0);
    let rangeBranches: LocusBranch[] | null = null;
    const lo = Math.min(Math.abs(sweep.min), Math.abs(sweep.max));
    const hi = Math.max(Math.abs(sweep.min), Math.abs(sweep.max));
    const sameSign = sweep.min * sweep.max > 0;
    if (hi > 0 && Number.isFinite(hi)) {
      rangeBranches = branchesOf(
        rootLocus(n0, d0, { negative: sweep.max < 0, kMin: sameSign ? lo : 0, kMax: hi, samples: 240 }).branches,
      );
    }
    const neg = negative ? branchesOf(rootLocus(n0, d0, { negative: true }).branches) : null;
    out = {
      mode: 'exact',
      parameter,
      negative,
      branches: branchesOf(L.branches),
      rangeBranches,
      negativeBranches: neg,
      poles: L.poles.map(plain),
      zeros: L.zeros.map(plain),
      asymptotes: L.asymptotes.centroid === null ? null : { centroid: L.asymptotes.centroid, anglesDeg: [...L.asymptotes.anglesDeg] },
      breakaways: L.breakaways.map((b) => ({ s: plain(b.s), gain: b.gain })),
      crossings: L.crossings.map((c) => ({ omega: c.omega, gain: c.gain })),
      n0: [...n0],
      d0: [...d0],
    };
  } else {
    const sw = sweepLocus(d, parameter, {});
    const branches = sw.mode === 'sampled' ? sw.branches : sw.locus.branches;
    const first = branches.map((b) => b[0]?.s).filter((s): s is Complex => Boolean(s));
    out = {
      mode: 'sampled',
      parameter,
      negative: false,
      branches: branchesOf(branches),
      rangeBranches: null,
      negativeBranches: null,
      // A sampled locus starts where the range starts; those are its "open-loop" ends.
      poles: first.map(plain),
      zeros: [],
      asymptotes: null,
      breakaways: [],
      crossings: [],
      n0: null,
      d0: null,
    };
  }
  locusCache.set(key, out);
  return out;
}

export const marginsData: (m: LoopMargins) => MarginsData = marginFigures;

/** The cut the Frequency view opens: the one asked for, else the first cut, else a proposed one. */
function cutFor(d: Diagram, cutId: string | null, overrides: Record<string, number>): { id: string; wire: string; label: string } | null {
  const cut = d.cuts.find((c) => c.id === cutId) ?? (cutId === null || cutId.startsWith('auto:') ? undefined : null);
  if (cut) return { id: cut.id, wire: cut.wire, label: cut.label ?? cut.wire };
  if (cut === null) throw new Error(`cut ${cutId} is not in the diagram`);
  if (cutId === null && d.cuts.length > 0) return { id: d.cuts[0].id, wire: d.cuts[0].wire, label: d.cuts[0].label ?? d.cuts[0].wire };
  const wire = cutId?.startsWith('auto:') ? cutId.slice(5) : feedbackWires(compiledOf(d, overrides))[0];
  return wire ? { id: `auto:${wire}`, wire, label: wire } : null;
}

/** Frequency data of L at a cut (with every other loop closed), margins marked. */
function frequencyAt(d: Diagram, cutId: string | null, overrides: Record<string, number>): FrequencyData | null {
  const cut = cutFor(d, cutId, overrides);
  if (!cut) return null;
  const L = loopAtCut(d, cut.wire, overrides);
  const margins = loopMargins(L);
  // Two decades above the highest gain crossover (and past the phase crossover the gain margin
  // is read at) are enough: beyond, a dead time only winds the phase round and round.
  let omega = defaultFrequencyGrid(L, 60);
  const wc = margins.gainCrossovers.filter((w) => w > 0 && Number.isFinite(w));
  if (wc.length > 0) {
    const hi = Math.max(100 * Math.max(...wc), 3 * (margins.phaseCrossover ?? 0), 3 * (margins.peakSensitivityFrequency ?? 0));
    const clipped = omega.filter((w) => w <= hi);
    if (clipped.length > 20) omega = clipped;
  }
  const top = omega[omega.length - 1];
  const extra = [...margins.gainCrossovers, ...margins.phaseCrossovers].filter((w) => w > 0 && Number.isFinite(w) && w <= top);
  if (extra.length) omega = [...omega, ...extra].sort((x, y) => x - y);
  const fr = frequencyResponse(L, omega);
  const sensDb: number[] = [];
  const compDb: number[] = [];
  for (let i = 0; i < fr.omega.length; i++) {
    const one = Math.hypot(1 + fr.re[i], fr.im[i]);
    const l = Math.hypot(fr.re[i], fr.im[i]);
    sensDb.push(-20 * Math.log10(one));
    compDb.push(20 * Math.log10(l / one));
  }
  return {
    cutId: cut.id,
    wire: cut.wire,
    label: cut.label,
    omega: fr.omega,
    magDb: fr.magDb,
    phaseDeg: fr.phaseDeg,
    re: fr.re,
    im: fr.im,
    sensDb,
    compDb,
    margins: marginsData(margins),
  };
}

/** Bode data of a loop on a grid that covers its corners. */
function bodeOf(L: TransferFunction, omega?: number[]) {
  const fr = frequencyResponse(L, omega ?? defaultFrequencyGrid(L, 40));
  return fr;
}

/** The loops report in the shape the Loops view draws. */
export function loopsFromReport(rep: LoopsReport): LoopsData {
  return {
    rows: rep.cuts.map((c) => ({
      cutId: c.cut,
      wire: c.wire,
      label: c.label,
      auto: c.auto,
      stable: c.stable,
      blocks: [...c.blocks],
      margins: marginsData(c.margins),
      alone: c.alone.opened.length ? { margins: marginsData(c.alone.margins), opened: [...c.alone.opened] } : null,
    })),
    separations: rep.separations.map((s) => ({ inner: s.inner, outer: s.outer, ratio: s.ratio, basis: s.basis, flag: s.flag, note: s.note })),
    outerVsIdeal: rep.outerVsIdeal.map((o) => {
      const outerCut = rep.cuts.find((c) => c.cut === o.outer);
      const ideal = bodeOf(o.idealLoop);
      const real = outerCut ? bodeOf(outerCut.loop, ideal.omega) : null;
      return {
        outer: o.outer,
        inner: o.inner,
        omega: ideal.omega,
        realMagDb: real?.magDb ?? [],
        realPhaseDeg: real?.phaseDeg ?? [],
        idealMagDb: ideal.magDb,
        idealPhaseDeg: ideal.phaseDeg,
        realMargins: marginsData(o.real),
        idealMargins: marginsData(o.ideal),
      };
    }),
    stable: rep.stable,
    notes: [...rep.notes],
  };
}

export function computeAnalysis(req: AnalysisRequest): AnalysisResult {
  const t0 = now();
  const d = req.diagram;
  const sweep = req.sweep;
  const overrides = sweep ? { [sweep.parameter]: sweep.value } : {};
  const locus = sweep ? part(() => locusData(d, sweep)) : null;
  // On an exact locus the closed-loop poles are the roots of D0 + k·N0: the same polynomial
  // the whole-diagram reduction gives, without redoing the reduction on every slider move.
  const exact = locus?.ok && locus.value.mode === 'exact' && locus.value.n0 && locus.value.d0 ? locus.value : null;
  const poles = exact
    ? part(() => polyRoots(poly.add(exact.d0!, poly.scale(exact.n0!, sweep!.value))).map(plain))
    : part(() => closedLoopPoles(d, overrides).map(plain));
  const freq = req.frequency ? part(() => frequencyAt(d, req.cutId, overrides)) : null;
  const frequency: Part<FrequencyData> | null = !freq || (freq.ok && freq.value === null) ? null : (freq as Part<FrequencyData>);
  return { locus, poles, frequency, elapsedMs: now() - t0 };
}

export function computeLoops(req: LoopsRequest): LoopsResult {
  const t0 = now();
  const loops = part(() => loopsFromReport(analyseLoops(req.diagram, req.overrides)));
  return { loops, elapsedMs: now() - t0 };
}

// ---------------------------------------------------------------- response

function modelFor(d: Diagram): CompiledModel {
  const key = engineKey(d);
  let m = modelCache.get(key);
  if (!m) {
    m = compileModel(d);
    modelCache.set(key, m);
  }
  return m;
}

const finiteOrNull = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** Limiting blocks (saturation, PID with output limits, rate limit) and the wire leaving each. */
export function actuatorsOf(d: Diagram, overrides: Record<string, number>): ActuatorInfo[] {
  const out: ActuatorInfo[] = [];
  for (const b of d.blocks) {
    if (b.kind !== 'saturation' && b.kind !== 'pid' && b.kind !== 'rate-limit') continue;
    const wire = d.wires.find((w) => w.from.block === b.id);
    if (!wire) continue;
    let lower: number | null = null;
    let upper: number | null = null;
    try {
      const p = resolveParams(d, b, overrides) as Record<string, unknown>;
      if (b.kind === 'saturation') {
        lower = finiteOrNull(p.lower);
        upper = finiteOrNull(p.upper);
      } else if (b.kind === 'pid') {
        lower = finiteOrNull(p.umin);
        upper = finiteOrNull(p.umax);
        if (lower === null && upper === null) continue;
      }
    } catch {
      continue;
    }
    out.push({ key: `wire:${wire.id}`, block: b.id, label: `${b.label ?? b.id} output`, lower, upper });
  }
  return out;
}

/** A run length long enough to see the slowest closed-loop mode settle (and the sources act). */
export function automaticEnd(d: Diagram, overrides: Record<string, number>): number {
  let slowest = Infinity;
  try {
    for (const p of closedLoopPoles(d, overrides)) {
      const a = Math.abs(p.re);
      if (p.re < 0 && a > 1e-9) slowest = Math.min(slowest, a);
    }
  } catch {
    // an unanalysable diagram still simulates; use the default below
  }
  let start = 0;
  for (const b of d.blocks) {
    if (b.kind === 'source' && typeof b.params.start === 'number') start = Math.max(start, b.params.start);
  }
  const settle = Number.isFinite(slowest) ? 6 / slowest : 10;
  const end = start + Math.min(Math.max(settle, 1), 2000);
  // A round number: 1, 2 or 5 × 10^n.
  const e = Math.floor(Math.log10(end));
  const f = end / 10 ** e;
  return (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * 10 ** e;
}

const run = (r: SimResult): SimRun => ({ time: r.time, traces: r.traces, status: r.status, message: r.message });

function metricsRows(d: Diagram, r: SimResult, actuators: ActuatorInfo[]): MetricsRow[] {
  const rows: MetricsRow[] = [];
  for (const b of d.blocks) {
    if (b.kind !== 'probe') continue;
    const m = (r.metrics[b.id] ?? {}) as Record<string, unknown>;
    rows.push({
      probe: b.id,
      label: b.label ?? b.id,
      riseTime: finiteOrNull(m.riseTime),
      overshootPct: finiteOrNull(m.overshootPct),
      peakTime: finiteOrNull(m.peakTime),
      settlingTime: finiteOrNull(m.settlingTime),
      steadyState: finiteOrNull(m.steadyState),
      steadyStateError: finiteOrNull(m.steadyStateError),
      iae: finiteOrNull(m.iae),
      timeInSaturation: null,
      peakEffort: null,
    });
  }
  for (const a of actuators) {
    const f = r.actuators[a.block];
    if (!f) continue;
    rows.push({
      probe: a.key,
      label: a.label,
      riseTime: null,
      overshootPct: null,
      peakTime: null,
      settlingTime: null,
      steadyState: null,
      steadyStateError: null,
      iae: null,
      timeInSaturation: f.timeInSaturation,
      peakEffort: f.peakEffort,
    });
  }
  return rows;
}

export function computeResponse(req: ResponseRequest, isCancelled?: () => boolean): ResponseResult {
  const t0 = now();
  const d = req.diagram;
  const model = modelFor(d);
  const until = req.until && req.until > 0 ? req.until : automaticEnd(d, req.overrides);
  const actuators = actuatorsOf(d, req.overrides);
  const wires = actuators.map((a) => a.key.slice(5));
  // A preview for live tuning: rtol 1e-4 is well inside what the eye resolves on a chart.
  const common = { until, overrides: req.overrides, wires, maxWallMs: 5000, outputStep: until / 500, rtol: 1e-4, atol: 1e-7, isCancelled };
  const nl = simulate(model, common);
  const lin = simulate(model, { ...common, linear: true });
  return {
    nonlinear: run(nl),
    linear: run(lin),
    probes: d.blocks.filter((b) => b.kind === 'probe').map((b) => ({ id: b.id, label: b.label ?? b.id })),
    actuators,
    metrics: metricsRows(d, nl, actuators),
    until,
    elapsedMs: now() - t0,
  };
}
