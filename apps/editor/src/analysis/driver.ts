/**
 * The analysis driver: watches the document and the analysis UI state, and whenever the inputs
 * of a result change, sends the study requests for it to the engine worker. What to compute —
 * which sweep, which cut, how long a run — is decided by @loopwright/study; the driver only
 * says what the views on screen need. Results land in the results store. The slider's live
 * value travels as a held value, so moving it never touches the document (nor its undo history).
 * Each channel's computation in progress is shown (with the worker's progress) and can be
 * cancelled; a cancelled channel holds no result until the user asks again or its inputs change.
 */
import type { Diagram, SignalRef } from '@loopwright/graph';
import {
  engineText,
  fingerprintText,
  locusIdentity,
  resolveSweep,
  type CheckData,
  type ClosedLoopData,
  type FrequencyData,
  type LiveValue,
  type LocusData,
  type LoopsData,
  type Part,
  type PolesData,
  type ReportData,
  type ResolvedSweep,
  type ResponseResult,
  type SampledCutData,
  type StudyRequest,
  type StudyResult,
} from '@loopwright/study';
import { useDiagramStore } from '../store/diagram-store.ts';
import { sampleTimeSet } from '../store/graph-bridge.ts';
import { useAnalysisStore } from './analysis-store.ts';
import { resultsComplete, useResultsStore, type AnalysisResult, type PinnedRun, type ResultsState } from './results-store.ts';
import { CANCELLED, EngineClient, type WorkerLike } from '../worker/engine-client.ts';
import { CHANNELS, type Channel, type EngineReply, type ViewChannel } from '../worker/protocol.ts';
import type { AnalysisSnapshot } from './snapshot.ts';
import { ReplyBatch } from './reply-batch.ts';

/**
 * How long a reply may wait for the rest of its generation, and how quick a channel must be to
 * be waited for (ms). A slider step's run takes 5–10 ms; with the machine busy, 30–50 ms. At
 * 40 ms such a step flipped to applying its replies one by one, and the extra render competed
 * with the run still computing: the slow steps got slower. Runs longer than this still never
 * hold up the locus markers.
 */
const COALESCE_MS = 80;

export interface AnalysisInputs {
  diagram: Diagram;
  sweep: ResolvedSweep;
  /** The swept target's value in force (live slider value, else the document's). */
  live: LiveValue | null;
  /** The cut the user picked in the Frequency view (null: the study's default). */
  cutId: string | null;
  /** The Closed loop view's points (null when the diagram has none to offer). */
  closedLoop: { from: SignalRef; to: SignalRef } | null;
}

/** A point written "block:ID" / "wire:ID" as a SignalRef, when it still names something in the diagram. */
export function refOf(d: Diagram, text: string | null): SignalRef | null {
  const m = text ? /^(block|wire):(.+)$/.exec(text) : null;
  if (!m) return null;
  if (m[1] === 'block') return d.blocks.some((b) => b.id === m[2]) ? { block: m[2] } : null;
  return d.wires.some((w) => w.id === m[2]) ? { wire: m[2] } : null;
}

/** The Closed loop view's points: the ones picked, else the first source and the first probe. */
export function closedLoopPoints(d: Diagram, from: string | null, to: string | null): { from: SignalRef; to: SignalRef } | null {
  const firstOf = (kind: string) => d.blocks.find((b) => b.kind === kind)?.id;
  const f = refOf(d, from) ?? (firstOf('source') ? { block: firstOf('source')! } : null);
  const t = refOf(d, to) ?? (firstOf('probe') ? { block: firstOf('probe')! } : null);
  return f && t ? { from: f, to: t } : null;
}

/** The inputs the views are computed from, as they stand now. */
export function currentInputs(): AnalysisInputs {
  const diagram = useDiagramStore.getState().diagram;
  const ui = useAnalysisStore.getState();
  const sweep = resolveSweep(diagram, { key: ui.sweepKey, liveValue: ui.liveValue, ranges: ui.ranges });
  return { diagram, sweep, live: sweep.live, cutId: ui.cutId, closedLoop: closedLoopPoints(diagram, ui.closedLoopFrom, ui.closedLoopTo) };
}

/** The study requests of each channel for the views that need them. */
export function channelStudies(
  inp: AnalysisInputs,
  opts: { frequency: boolean; opposite: boolean; closedLoop?: boolean },
): Record<Exclude<ViewChannel, 'pinned'>, StudyRequest[]> {
  const { live } = inp;
  const { choice, range, value } = inp.sweep;
  const analysis: StudyRequest[] = [];
  if (choice && range && Number.isFinite(value))
    analysis.push({ kind: 'locus', target: choice.target, value, range, opposite: opts.opposite });
  analysis.push({ kind: 'poles', live });
  if (opts.frequency) analysis.push({ kind: 'cut', cut: inp.cutId, live, fallback: true });
  // A loop with a sampled controller is also read at its sampler (exact pulse transfer function):
  // the Frequency and Loops views show its margins, the Locus pane its z-plane locus.
  if (hasSampledBlock(inp.diagram)) analysis.push({ kind: 'sampled-cut', cut: inp.cutId, live, fallback: true, locus: true });
  return {
    check: [{ kind: 'check' }],
    analysis,
    // with sampled blocks, each cut's loop is also read at its sampler (Loops view)
    loops: [
      { kind: 'loops', live },
      ...(hasSampledBlock(inp.diagram) ? inp.diagram.cuts.map((c): StudyRequest => ({ kind: 'sampled-cut', cut: c.id, live })) : []),
    ],
    // A live preview: 5 s of wall time at most (a run that needs more says so).
    response: [{ kind: 'run', live, linearOverlay: true, maxWallMs: 5000 }],
    'closed-loop':
      opts.closedLoop && inp.closedLoop
        ? [{ kind: 'closed-loop', from: inp.closedLoop.from, to: inp.closedLoop.to, live, bode: true, step: true }]
        : [],
  };
}

/**
 * The pinned design's run under the current settings: its own diagram and held value, with the
 * current run's end time (whatever decided it) and tolerances, so that both runs have one length.
 */
export function pinnedRunStudy(pinned: AnalysisSnapshot, current: ResponseResult): { diagram: Diagram; study: StudyRequest } {
  return {
    diagram: pinned.diagram,
    study: {
      kind: 'run',
      live: pinned.live,
      until: current.settings.until,
      rtol: current.settings.rtol,
      atol: current.settings.atol,
      maxWallMs: 5000,
    },
  };
}

/** Whether any block has a sample time set (only then is the sampled reading asked for). */
function hasSampledBlock(d: Diagram): boolean {
  return d.blocks.some((b) => sampleTimeSet(b.params.sampleTime));
}

/** Identity of a locus: its defining polynomials (exact) or its sampled points' ends. */
function locusSignature(l: LocusData): string {
  const ends = (bs: LocusData['branches'] | null) =>
    (bs ?? []).map((b) => [b.re.length, b.re[0], b.im[0], b.re[b.re.length - 1], b.im[b.im.length - 1]]);
  return JSON.stringify([l.mode, l.target, l.direction, l.n0, l.d0, ends(l.branches), ends(l.rangeBranches), ends(l.oppositeBranches)]);
}

/** The identity of the locus asked for on this diagram (null: none asked, or not one to keep). */
function locusKeyFor(d: Diagram, studies: StudyRequest[]): string | null {
  const r = studies.find((x) => x.kind === 'locus');
  if (!r || r.kind !== 'locus') return null;
  try {
    return `${engineText(d)}|${locusIdentity(d, r)}`;
  } catch {
    return null; // a request the study refuses: sent as it is, to come back with its error
  }
}

/** The analysis channel's parts, by kind. */
function analysisOf(studies: StudyRequest[], results: Part<StudyResult>[], elapsedMs: number): AnalysisResult {
  const byKind = (kind: StudyRequest['kind']) => {
    const i = studies.findIndex((s) => s.kind === kind);
    return i < 0 ? null : results[i];
  };
  const unwrap = <T>(p: Part<StudyResult> | null): Part<T> | null =>
    p === null ? null : p.ok ? { ok: true, value: p.value.value as T } : p;
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
  return new Worker(new URL('../worker/engine.worker.ts', import.meta.url), {
    type: 'module',
    name: 'loopwright-engine',
  }) as unknown as WorkerLike;
}

/** The shared engine client (one worker per channel, created on first use). */
export function engineClient(): EngineClient {
  client ??= new EngineClient(makeWorker);
  return client;
}

const isViewChannel = (c: Channel): c is ViewChannel => (CHANNELS as readonly string[]).includes(c);

/** Clears a channel's busy mark, or sets it for a request just sent. */
function markBusy(ch: Channel, on: boolean): void {
  const s = useResultsStore.getState();
  useResultsStore.setState({ busy: { ...s.busy, [ch]: on ? { since: performance.now(), fraction: null, kind: null } : null } });
}

/** Stops a channel's computation (the progress bar's Cancel). */
export function cancelChannel(ch: Channel): void {
  engineClient().cancel(ch);
}

/** Asks again for a channel whose computation was cancelled (set by the running driver). */
let retry: ((ch: ViewChannel) => void) | null = null;
export function computeAgain(ch: ViewChannel): void {
  retry?.(ch);
}

/** What a result of each channel becomes in the store when it is cancelled or fails as a whole. */
function clearedResult(ch: ViewChannel, error: string): Partial<ResultsState> {
  switch (ch) {
    case 'analysis':
      return { analysis: null };
    case 'loops':
      return { loops: { ok: false, error, reason: 'input', at: null } };
    case 'response':
      return { response: null };
    case 'closed-loop':
      return { closedLoop: { ok: false, error, reason: 'input', at: null } };
    case 'pinned':
      return { pinnedRun: { ok: false, error } };
    default:
      return {};
  }
}

/**
 * Starts watching; returns the function that stops. Idempotent per call site: each start
 * subscribes once and sends the current inputs immediately.
 */
export function startAnalysisDriver(): () => void {
  const engine = engineClient();
  const sentKey = Object.fromEntries(CHANNELS.map((c) => [c, ''])) as Record<ViewChannel, string>;
  const genOf = Object.fromEntries(CHANNELS.map((c) => [c, new Map<number, number>()])) as Record<ViewChannel, Map<number, number>>;
  const studiesOf = Object.fromEntries(CHANNELS.map((c) => [c, new Map<number, StudyRequest[]>()])) as Record<
    ViewChannel,
    Map<number, StudyRequest[]>
  >;

  const offProgress = engine.onProgress((p) => {
    const s = useResultsStore.getState();
    const busy = s.busy[p.channel];
    if (!busy) return;
    const { part, parts, fraction, kind } = p.progress;
    useResultsStore.setState({
      busy: { ...s.busy, [p.channel]: { ...busy, kind, fraction: (part + (fraction ?? 0)) / Math.max(1, parts) } },
    });
  });

  // The locus of a drag is computed once: a step whose locus has the identity of the one held
  // leaves it out of the analysis request (locusIdentity), which spares the worker its reply and
  // the page the reading of thousands of points per step.
  let heldLocus: string | null = null;
  /** The locus identity each analysis request in flight asked for. */
  const locusKeyOf = new Map<number, string | null>();

  // Replies of one generation are applied together when the rest is expected soon (reply-batch.ts).
  const batch = new ReplyBatch<ResultsState>(useResultsStore.getState, (p) => useResultsStore.setState(p), COALESCE_MS);
  /** The newest generation each channel has answered (held replies included). */
  const answered = Object.fromEntries(CHANNELS.map((c) => [c, 0])) as Record<ViewChannel, number>;

  const off = engine.onReply((reply: EngineReply) => {
    const ch = reply.channel;
    if (!isViewChannel(ch)) return; // the report's reply goes to its own caller
    const gen = genOf[ch].get(reply.id) ?? 0;
    const studies = studiesOf[ch].get(reply.id) ?? [];
    genOf[ch].delete(reply.id);
    studiesOf[ch].delete(reply.id);
    answered[ch] = Math.max(answered[ch], gen);
    if (ch === 'analysis') {
      // the locus this reply leaves held: its own when it carried one, none when it failed
      const i = studies.findIndex((x) => x.kind === 'locus');
      if (i >= 0) heldLocus = reply.ok && reply.results[i]?.ok ? (locusKeyOf.get(reply.id) ?? null) : null;
      else if (!reply.ok) heldLocus = null;
      for (const id of locusKeyOf.keys()) if (id <= reply.id) locusKeyOf.delete(id); // older ones were superseded
    }
    const arrivedAt = performance.now();
    const now = useResultsStore.getState();
    // another channel of this generation still computing, whose last computation was quick
    const wait = CHANNELS.some(
      (c) =>
        c !== ch &&
        now.wanted[c] === gen &&
        answered[c] < gen &&
        now.busy[c] !== null &&
        now.computeMs[c] > 0 &&
        now.computeMs[c] < COALESCE_MS,
    );
    batch.add((s) => replyPatch(s, ch, gen, studies, reply, arrivedAt), wait);
  });

  function replyPatch(
    s: ResultsState,
    ch: ViewChannel,
    gen: number,
    studies: StudyRequest[],
    reply: EngineReply,
    arrivedAt: number,
  ): Partial<ResultsState> {
    const patch: Partial<ResultsState> = {
      held: { ...s.held, [ch]: gen },
      arrivedAt: { ...s.arrivedAt, [ch]: arrivedAt },
      busy: { ...s.busy, [ch]: null },
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
        if (!studies.some((x) => x.kind === 'locus'))
          next.locus = prev ?? null; // left out: the one held stands
        else if (prev?.ok && next.locus?.ok && locusSignature(prev.value) === locusSignature(next.locus.value)) next.locus = prev;
        patch.analysis = next;
      } else if (ch === 'loops') {
        patch.loops = first.ok ? { ok: true, value: first.value.value as LoopsData } : first;
        patch.sampledLoops = reply.results.slice(1).flatMap((r) => (r.ok && r.value.value ? [r.value.value as SampledCutData] : []));
      } else if (ch === 'check') {
        patch.check = first.ok ? (first.value.value as CheckData) : null;
        if (!first.ok) error = first.error;
      } else if (ch === 'closed-loop') {
        patch.closedLoop = first === undefined ? null : first.ok ? { ok: true, value: first.value.value as ClosedLoopData } : first;
      } else if (ch === 'pinned') {
        patch.pinnedRun = pinnedRunOf(first);
      } else {
        // A run that could not start leaves no old traces drawn under its error.
        patch.response = first.ok ? (first.value.value as ResponseResult) : null;
        if (!first.ok) error = first.error;
      }
    } else {
      // Cancelled, or the worker failed: nothing old stays drawn as if it were current.
      Object.assign(patch, clearedResult(ch, reply.error));
    }
    patch.errors = { ...s.errors, [ch]: error };
    return patch;
  }

  const update = () => {
    const inp = currentInputs();
    // Only what a view on screen (or a pin / report in progress) shows is computed: the Locus
    // and the findings always; the others follow their tab.
    const ui = useAnalysisStore.getState();
    const all = ui.needAll > 0 || ui.view === 'compare';
    const rs0 = useResultsStore.getState();
    const needed: Record<ViewChannel, boolean> = {
      check: true,
      analysis: true,
      loops: all || ui.view === 'loops',
      response: all || ui.view === 'response' || ui.view === 'locus',
      'closed-loop': ui.view === 'closed-loop',
      // The pinned design, re-run once the current run's settings are known.
      pinned: ui.pinned !== null && rs0.response !== null,
    };
    const studies = channelStudies(inp, {
      frequency: all || ui.view === 'frequency',
      opposite: ui.negativeLocus,
      closedLoop: needed['closed-loop'],
    });
    // What each channel's results depend on: findings on everything; a run on the simulation
    // settings but not on which probes are shown; the analyses on neither.
    const d = inp.diagram;
    const run = { ...(d.simulation ?? {}), probes: undefined };
    const pinned = ui.pinned && rs0.response ? pinnedRunStudy(ui.pinned, rs0.response) : null;
    const diagrams: Record<ViewChannel, Diagram> = {
      check: d,
      analysis: d,
      loops: d,
      response: d,
      'closed-loop': d,
      pinned: pinned?.diagram ?? d,
    };
    const requests: Record<ViewChannel, StudyRequest[]> = { ...studies, pinned: pinned ? [pinned.study] : [] };
    const locusKey = locusKeyFor(d, studies.analysis);
    if (locusKey !== null && locusKey === heldLocus && rs0.analysis?.locus?.ok)
      requests.analysis = studies.analysis.filter((x) => x.kind !== 'locus');
    const base: Record<ViewChannel, string> = {
      check: fingerprintText(d),
      analysis: engineText(d),
      loops: engineText(d),
      response: `${engineText(d)}|${JSON.stringify(run)}`,
      'closed-loop': engineText(d),
      pinned: pinned ? `${ui.pinned!.takenAt}|${engineText(pinned.diagram)}` : '',
    };
    const keys = Object.fromEntries(CHANNELS.map((c) => [c, `${base[c]}|${JSON.stringify(requests[c])}`])) as Record<ViewChannel, string>;
    const changed = CHANNELS.filter((c) => needed[c] && requests[c].length > 0 && keys[c] !== sentKey[c]);
    if (changed.length === 0) return;
    const rs = useResultsStore.getState();
    const gen = rs.generation + 1;
    // A channel whose inputs did not change keeps the generation it was last asked for.
    const wanted = { ...rs.wanted };
    for (const c of changed) wanted[c] = gen;
    useResultsStore.setState({ generation: gen, generationAt: performance.now(), wanted });
    for (const c of changed) {
      sentKey[c] = keys[c];
      const id = engine.send({ channel: c, diagram: diagrams[c], studies: requests[c] });
      genOf[c].set(id, gen);
      studiesOf[c].set(id, requests[c]);
      if (c === 'analysis' && requests.analysis.some((x) => x.kind === 'locus')) locusKeyOf.set(id, locusKey);
      markBusy(c, true);
    }
  };
  retry = (ch) => {
    sentKey[ch] = '';
    update();
  };

  // The diagram's own sweep choice (Parameters panel "Sweep") takes over from the sweep bar's.
  let activeSweep = useDiagramStore.getState().diagram.view.activeSweep;
  const offActive = useDiagramStore.subscribe((st) => {
    if (st.diagram.view.activeSweep !== activeSweep) {
      activeSweep = st.diagram.view.activeSweep;
      useAnalysisStore.getState().setSweepKey(null);
    }
  });
  // Unpinning clears the re-run; a new current run (other settings) re-runs the pinned design.
  let pinnedSeen = useAnalysisStore.getState().pinned;
  const offPinned = useAnalysisStore.subscribe((st) => {
    if (st.pinned === pinnedSeen) return;
    pinnedSeen = st.pinned;
    sentKey.pinned = '';
    useResultsStore.setState({ pinnedRun: null });
  });
  let responseSeen = useResultsStore.getState().response;
  const offResponse = useResultsStore.subscribe((st) => {
    if (st.response === responseSeen) return;
    responseSeen = st.response;
    if (useAnalysisStore.getState().pinned) update();
  });
  const offDiagram = useDiagramStore.subscribe(update);
  const offUi = useAnalysisStore.subscribe(update);
  update();
  return () => {
    off();
    batch.dispose();
    offProgress();
    offActive();
    offPinned();
    offResponse();
    offDiagram();
    offUi();
    retry = null;
  };
}

/** The pinned re-run as Compare uses it: a run cut short is refused, like a run that failed. */
function pinnedRunOf(p: Part<StudyResult> | undefined): PinnedRun | null {
  if (!p) return null;
  if (!p.ok) return { ok: false, error: p.error };
  const r = p.value.value as ResponseResult;
  if (r.run.status !== 'ok') return { ok: false, error: `its run stopped at t = ${r.run.timeReached} s: ${r.run.message}` };
  return { ok: true, value: r };
}

/**
 * Resolves once every result is computed for the current inputs and drawn (hidden views
 * included): for pinning, which needs everything at once.
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

/** The report request for what the views show: the sweep in force, its held value and range. */
export function reportRequest(inp: AnalysisInputs, generatedAt: string): StudyRequest {
  const { choice, range } = inp.sweep;
  return { kind: 'report', sweep: choice?.key ?? null, live: inp.live, range: range ?? null, generatedAt };
}

/**
 * The design report of the current inputs (sweep, live value, range), computed in the worker
 * by the study's report — the same code `loopwright report` runs. Rejects with the reason when
 * it fails or is cancelled.
 */
export function requestReport(): Promise<ReportData> {
  const engine = engineClient();
  const inp = currentInputs();
  const study = reportRequest(inp, new Date().toISOString());
  return new Promise<ReportData>((resolve, reject) => {
    const id = engine.send({ channel: 'report', diagram: inp.diagram, studies: [study] });
    markBusy('report', true);
    const off = engine.onReply((r) => {
      if (r.channel !== 'report' || r.id !== id) return;
      off();
      markBusy('report', false);
      if (!r.ok) return reject(new Error(r.cancelled ? CANCELLED : r.error));
      const part = r.results[0];
      if (!part.ok) return reject(new Error(part.error));
      resolve(part.value.value as ReportData);
    });
  });
}
