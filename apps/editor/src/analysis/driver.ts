/**
 * The analysis driver: watches the document and the analysis UI state, and whenever the inputs
 * of a result change, sends the study requests for it to the engine worker. What to compute —
 * which sweep, which cut, how long a run — is decided by @loopwright/study; the driver only
 * says what the views on screen need. Results land in the results store. The slider's live
 * value travels as a held value, so moving it never touches the document (nor its undo history).
 */
import type { Diagram } from '@loopwright/graph';
import {
  engineText,
  fingerprintText,
  resolveSweep,
  type CheckData,
  type FrequencyData,
  type LiveValue,
  type LocusData,
  type LoopsData,
  type Part,
  type PolesData,
  type ResolvedSweep,
  type ResponseResult,
  type SampledCutData,
  type StudyRequest,
  type StudyResult,
} from '@loopwright/study';
import { useDiagramStore } from '../store/diagram-store.ts';
import { sampleTimeSet } from '../store/graph-bridge.ts';
import { useAnalysisStore } from './analysis-store.ts';
import { resultsComplete, useResultsStore, type AnalysisResult, type ResultsState } from './results-store.ts';
import { EngineClient, type WorkerLike } from '../worker/engine-client.ts';
import { CHANNELS, type Channel } from '../worker/protocol.ts';

export interface AnalysisInputs {
  diagram: Diagram;
  sweep: ResolvedSweep;
  /** The swept target's value in force (live slider value, else the document's). */
  live: LiveValue | null;
  /** The cut the user picked in the Frequency view (null: the study's default). */
  cutId: string | null;
}

/** The inputs the views are computed from, as they stand now. */
export function currentInputs(): AnalysisInputs {
  const diagram = useDiagramStore.getState().diagram;
  const ui = useAnalysisStore.getState();
  const sweep = resolveSweep(diagram, { key: ui.sweepKey, liveValue: ui.liveValue, ranges: ui.ranges });
  return { diagram, sweep, live: sweep.live, cutId: ui.cutId };
}

/** The study requests of each channel for the views that need them. */
export function channelStudies(inp: AnalysisInputs, opts: { frequency: boolean; opposite: boolean }): Record<Channel, StudyRequest[]> {
  const { live } = inp;
  const { choice, range, value } = inp.sweep;
  const analysis: StudyRequest[] = [];
  if (choice && range && Number.isFinite(value)) analysis.push({ kind: 'locus', target: choice.target, value, range, opposite: opts.opposite });
  analysis.push({ kind: 'poles', live });
  if (opts.frequency) analysis.push({ kind: 'cut', cut: inp.cutId, live, fallback: true });
  // A loop with a sampled controller is also read at its sampler (exact pulse transfer function):
  // the Frequency and Loops views show its margins, the Locus pane its z-plane locus.
  if (hasSampledBlock(inp.diagram)) analysis.push({ kind: 'sampled-cut', cut: inp.cutId, live, fallback: true, locus: true });
  return {
    check: [{ kind: 'check' }],
    analysis,
    // with sampled blocks, each cut's loop is also read at its sampler (Loops view)
    loops: [{ kind: 'loops', live }, ...(hasSampledBlock(inp.diagram) ? inp.diagram.cuts.map((c): StudyRequest => ({ kind: 'sampled-cut', cut: c.id, live })) : [])],
    // A live preview: 5 s of wall time at most (a run that needs more says so).
    response: [{ kind: 'run', live, linearOverlay: true, maxWallMs: 5000 }],
  };
}

/** Whether any block has a sample time set (only then is the sampled reading asked for). */
function hasSampledBlock(d: Diagram): boolean {
  return d.blocks.some((b) => sampleTimeSet(b.params.sampleTime));
}

/** Identity of a locus: its defining polynomials (exact) or its sampled points' ends. */
function locusSignature(l: LocusData): string {
  const ends = (bs: LocusData['branches'] | null) => (bs ?? []).map((b) => [b.re.length, b.re[0], b.im[0], b.re[b.re.length - 1], b.im[b.im.length - 1]]);
  return JSON.stringify([l.mode, l.target, l.direction, l.n0, l.d0, ends(l.branches), ends(l.rangeBranches), ends(l.oppositeBranches)]);
}

/** The analysis channel's parts, by kind. */
function analysisOf(studies: StudyRequest[], results: Part<StudyResult>[], elapsedMs: number): AnalysisResult {
  const byKind = (kind: StudyRequest['kind']) => {
    const i = studies.findIndex((s) => s.kind === kind);
    return i < 0 ? null : results[i];
  };
  const unwrap = <T>(p: Part<StudyResult> | null): Part<T> | null => (p === null ? null : p.ok ? { ok: true, value: p.value.value as T } : p);
  const locus = unwrap<LocusData>(byKind('locus'));
  const poles = unwrap<PolesData>(byKind('poles'))!;
  const cut = unwrap<FrequencyData | null>(byKind('cut'));
  // A diagram with no loop has nothing to show in the Frequency view: no part, no error.
  const frequency = !cut || (cut.ok && cut.value === null) ? null : (cut as AnalysisResult['frequency']);
  const sampledPart = unwrap<SampledCutData | null>(byKind('sampled-cut'));
  const sampled = !sampledPart || (sampledPart.ok && sampledPart.value === null) ? null : (sampledPart as AnalysisResult['sampled']);
  return { locus, poles, frequency, sampled, elapsedMs };
}

let client: EngineClient | null = null;

function makeWorker(): WorkerLike {
  return new Worker(new URL('../worker/engine.worker.ts', import.meta.url), { type: 'module', name: 'loopwright-engine' }) as unknown as WorkerLike;
}

/** The shared engine client (one worker per channel, created on first use). */
export function engineClient(): EngineClient {
  client ??= new EngineClient(makeWorker);
  return client;
}

/**
 * Starts watching; returns the function that stops. Idempotent per call site: each start
 * subscribes once and sends the current inputs immediately.
 */
export function startAnalysisDriver(): () => void {
  const engine = engineClient();
  const sentKey = Object.fromEntries(CHANNELS.map((c) => [c, ''])) as Record<Channel, string>;
  const genOf = Object.fromEntries(CHANNELS.map((c) => [c, new Map<number, number>()])) as Record<Channel, Map<number, number>>;
  const studiesOf = Object.fromEntries(CHANNELS.map((c) => [c, new Map<number, StudyRequest[]>()])) as Record<Channel, Map<number, StudyRequest[]>>;

  const off = engine.onReply((reply) => {
    const ch = reply.channel;
    const gen = genOf[ch].get(reply.id) ?? 0;
    const studies = studiesOf[ch].get(reply.id) ?? [];
    genOf[ch].delete(reply.id);
    studiesOf[ch].delete(reply.id);
    const s = useResultsStore.getState();
    const patch: Partial<ResultsState> = {
      held: { ...s.held, [ch]: gen },
      arrivedAt: { ...s.arrivedAt, [ch]: performance.now() },
    };
    let error: string | null = reply.ok ? null : reply.error;
    if (reply.ok) {
      patch.computeMs = { ...s.computeMs, [ch]: reply.elapsedMs };
      const first = reply.results[0];
      if (ch === 'analysis') {
        const next = analysisOf(studies, reply.results, reply.elapsedMs);
        // The locus does not change while the slider moves: keep the same object so that the
        // Locus chart's base option (thousands of points) is not rebuilt on every step.
        const prev = s.analysis?.locus;
        if (prev?.ok && next.locus?.ok && locusSignature(prev.value) === locusSignature(next.locus.value)) next.locus = prev;
        patch.analysis = next;
      } else if (ch === 'loops') {
        patch.loops = first.ok ? { ok: true, value: first.value.value as LoopsData } : first;
        patch.sampledLoops = reply.results.slice(1).flatMap((r) => (r.ok && r.value.value ? [r.value.value as SampledCutData] : []));
      } else if (ch === 'check') {
        patch.check = first.ok ? (first.value.value as CheckData) : null;
        if (!first.ok) error = first.error;
      } else {
        // A run that could not start leaves no old traces drawn under its error.
        patch.response = first.ok ? (first.value.value as ResponseResult) : null;
        if (!first.ok) error = first.error;
      }
    } else if (ch === 'response') {
      patch.response = null;
    }
    patch.errors = { ...s.errors, [ch]: error };
    useResultsStore.setState(patch);
  });

  const update = () => {
    const inp = currentInputs();
    // Only what a view on screen (or a pin / report in progress) shows is computed: the Locus
    // and the findings always; the others follow their tab.
    const ui = useAnalysisStore.getState();
    const all = ui.needAll > 0 || ui.view === 'compare';
    const needed: Record<Channel, boolean> = {
      check: true,
      analysis: true,
      loops: all || ui.view === 'loops',
      response: all || ui.view === 'response' || ui.view === 'locus',
    };
    const studies = channelStudies(inp, { frequency: all || ui.view === 'frequency', opposite: ui.negativeLocus });
    // What each channel's results depend on: findings on everything; a run on the simulation
    // settings but not on which probes are shown; the analyses on neither.
    const d = inp.diagram;
    const run = { ...(d.simulation ?? {}), probes: undefined };
    const base: Record<Channel, string> = { check: fingerprintText(d), analysis: engineText(d), loops: engineText(d), response: `${engineText(d)}|${JSON.stringify(run)}` };
    const keys = Object.fromEntries(CHANNELS.map((c) => [c, `${base[c]}|${JSON.stringify(studies[c])}`])) as Record<Channel, string>;
    const changed = CHANNELS.filter((c) => needed[c] && keys[c] !== sentKey[c]);
    if (changed.length === 0) return;
    const rs = useResultsStore.getState();
    const gen = rs.generation + 1;
    // A channel whose inputs did not change keeps the generation it was last asked for.
    const wanted = { ...rs.wanted };
    for (const c of changed) wanted[c] = gen;
    useResultsStore.setState({ generation: gen, generationAt: performance.now(), wanted });
    for (const c of changed) {
      sentKey[c] = keys[c];
      const id = engine.send({ channel: c, diagram: inp.diagram, studies: studies[c] });
      genOf[c].set(id, gen);
      studiesOf[c].set(id, studies[c]);
    }
  };

  // The diagram's own sweep choice (Parameters panel "Sweep") takes over from the sweep bar's.
  let activeSweep = useDiagramStore.getState().diagram.view.activeSweep;
  const offActive = useDiagramStore.subscribe((st) => {
    if (st.diagram.view.activeSweep !== activeSweep) {
      activeSweep = st.diagram.view.activeSweep;
      useAnalysisStore.getState().setSweepKey(null);
    }
  });
  const offDiagram = useDiagramStore.subscribe(update);
  const offUi = useAnalysisStore.subscribe(update);
  update();
  return () => {
    off();
    offActive();
    offDiagram();
    offUi();
  };
}

/**
 * Resolves once every result is computed for the current inputs and drawn (hidden views
 * included): for pinning and the report, which need everything at once.
 */
export async function withAllResults<T>(fn: () => T, timeoutMs = 20_000): Promise<T> {
  useAnalysisStore.getState().setNeedAll(1);
  try {
    await new Promise<void>((resolve) => {
      const done = () => resultsComplete(useResultsStore.getState());
      if (done()) return resolve();
      const t = setTimeout(() => {
        off();
        resolve();
      }, timeoutMs);
      const off = useResultsStore.subscribe(() => {
        if (done()) {
          clearTimeout(t);
          off();
          resolve();
        }
      });
    });
    return fn();
  } finally {
    useAnalysisStore.getState().setNeedAll(-1);
  }
}
