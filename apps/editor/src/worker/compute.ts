/**
 * What the engine worker computes, as plain functions (unit-tested in node without a worker).
 * Heavy, slider-independent work is cached: the locus of a sweep does not depend on the swept
 * value, and a compiled simulation model does not depend on parameter values.
 */
import {
  analyseLoops,
  closedLoopPoles,
  resolveParams,
  sweepLocus,
  type Diagram,
  type LoopsReport,
} from '@loopwright/graph';
import { defaultFrequencyGrid, frequencyResponse, loopMargins, rootLocus, type Complex, type LoopMargins, type RootLocus, type TransferFunction } from '@loopwright/lti';
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
  MarginsData,
  MetricsRow,
  Part,
  ResponseRequest,
  ResponseResult,
  SimRun,
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

function locusData(d: Diagram, parameter: string, value: number, negative: boolean): LocusData {
  const key = `${parameter}|${negative}|${engineKey(d, parameter)}`;
  const hit = locusCache.get(key);
  if (hit) return hit;
  // The locus does not depend on the swept value; compute it at the document value so that
  // the cache holds across slider moves.
  const sw = sweepLocus(d, parameter, {});
  let out: LocusData;
  if (sw.mode === 'exact') {
    const L: RootLocus = sw.locus;
    let neg: LocusBranch[] | null = null;
    if (negative) neg = branchesOf(rootLocus(sw.n0, sw.d0, { negative: true }).branches);
    out = {
      mode: 'exact',
      parameter,
      negative,
      branches: branchesOf(L.branches),
      negativeBranches: neg,
      poles: L.poles.map(plain),
      zeros: L.zeros.map(plain),
      asymptotes: L.asymptotes.centroid === null ? null : { centroid: L.asymptotes.centroid, anglesDeg: [...L.asymptotes.anglesDeg] },
      breakaways: L.breakaways.map((b) => ({ s: plain(b.s), gain: b.gain })),
      crossings: L.crossings.map((c) => ({ omega: c.omega, gain: c.gain })),
      n0: [...sw.n0],
      d0: [...sw.d0],
    };
  } else {
    const first = sw.branches.map((b) => b[0]?.s).filter((s): s is Complex => Boolean(s));
    out = {
      mode: 'sampled',
      parameter,
      negative: false,
      branches: branchesOf(sw.branches),
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
  void value;
  locusCache.set(key, out);
  return out;
}

export function marginsData(m: LoopMargins): MarginsData {
  return {
    gainMargin: m.gainMargin,
    gainMarginDb: m.gainMarginDb,
    phaseCrossover: m.phaseCrossover,
    lowerGainMargin: m.lowerGainMargin,
    lowerGainMarginDb: m.lowerGainMarginDb,
    phaseMarginDeg: m.phaseMarginDeg,
    gainCrossover: m.gainCrossover,
    delayMargin: m.delayMargin,
    peakSensitivity: m.peakSensitivity,
    peakSensitivityFrequency: m.peakSensitivityFrequency,
    peakComplementary: m.peakComplementary,
    bandwidth: m.bandwidth,
    closedLoopStable: m.closedLoopStable,
    gainCrossovers: [...m.gainCrossovers],
    phaseCrossovers: [...m.phaseCrossovers],
  };
}

/** Frequency data of L at one cut of the report (the first cut when none is asked for). */
function frequencyAt(rep: LoopsReport, cutId: string | null): FrequencyData | null {
  const cut = rep.cuts.find((c) => c.cut === cutId) ?? (cutId === null ? rep.cuts[0] : undefined);
  if (!cut) {
    if (cutId === null) return null;
    const note = rep.notes.find((n) => n.includes(cutId));
    throw new Error(note ?? `cut ${cutId}: no loop to analyse`);
  }
  const L = cut.loop;
  const margins = cut.margins;
  // The grid spans the loop's own corner frequencies; the crossovers are added exactly.
  let omega = defaultFrequencyGrid(L, 60);
  const extra = [...margins.gainCrossovers, ...margins.phaseCrossovers].filter((w) => w > 0 && Number.isFinite(w));
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
    cutId: cut.cut,
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
  const overrides = req.sweep ? { [req.sweep.parameter]: req.sweep.value } : {};
  const locus = req.sweep ? part(() => locusData(d, req.sweep!.parameter, req.sweep!.value, req.sweep!.negative)) : null;
  const report = part(() => analyseLoops(d, overrides));
  // The report already holds the closed-loop poles and every cut's loop: reuse them.
  const poles: Part<Cx[]> = report.ok ? { ok: true, value: report.value.closedLoopPoles.map(plain) } : part(() => closedLoopPoles(d, overrides).map(plain));
  const frequency: Part<FrequencyData> | null = report.ok
    ? (() => {
        const f = part(() => frequencyAt(report.value, req.cutId));
        return f.ok && f.value === null ? null : (f as Part<FrequencyData>);
      })()
    : { ok: false, error: report.error };
  const loops: Part<LoopsData> = report.ok ? part(() => loopsFromReport(report.value)) : report;
  return { locus, poles, frequency, loops, elapsedMs: now() - t0 };
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
  const common = { until, overrides: req.overrides, wires, maxWallMs: 5000, outputStep: until / 600, isCancelled };
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
