/**
 * The analysis driver: watches the document and the analysis UI state, and whenever the inputs
 * of a result change, asks the engine worker for it. Results land in the results store. The
 * slider's live value travels as a parameter override, so moving it never touches the
 * document (nor its undo history).
 */
import type { Diagram } from '@loopwright/graph';
import { useDiagramStore } from '../store/diagram-store.ts';
import { useAnalysisStore } from './analysis-store.ts';
import { useResultsStore, type ResultsState } from './results-store.ts';
import {
  asSweepDiagram,
  documentValue,
  engineParameterName,
  preferredChoice,
  sweepChoices,
  type SweepChoice,
} from './sweep.ts';
import { EngineClient, type WorkerLike } from '../worker/engine-client.ts';
import type { Channel, LocusData, SweepSpec } from '../worker/protocol.ts';

export interface AnalysisInputs {
  diagram: Diagram;
  engineDiagram: Diagram;
  choice: SweepChoice | null;
  sweep: SweepSpec | null;
  overrides: Record<string, number>;
  cutId: string | null;
  until: number | null;
}

/** The inputs the views are computed from, as they stand now. */
export function currentInputs(): AnalysisInputs {
  const diagram = useDiagramStore.getState().diagram;
  const ui = useAnalysisStore.getState();
  const choices = sweepChoices(diagram);
  const choice = choices.find((c) => c.key === ui.sweepKey) ?? preferredChoice(diagram, choices);
  const engineDiagram = choice ? asSweepDiagram(diagram, choice.target) : diagram;
  const value = ui.liveValue ?? (choice ? documentValue(diagram, choice.target) : Number.NaN);
  const range = choice ? ui.ranges[choice.key] ?? choice.range : null;
  const sweep: SweepSpec | null =
    choice && range && Number.isFinite(value)
      ? { parameter: engineParameterName(choice.target), value, negative: ui.negativeLocus, min: range.min, max: range.max }
      : null;
  const cutId =
    ui.cutId && (diagram.cuts.some((c) => c.id === ui.cutId) || ui.cutId.startsWith('auto:'))
      ? ui.cutId
      : diagram.cuts.find((c) => c.id === diagram.view.activeCut)?.id ?? diagram.cuts[0]?.id ?? null;
  const until = ui.simulationEnd ?? diagram.simulation?.end ?? null;
  return { diagram, engineDiagram, choice, sweep, overrides: sweep ? { [sweep.parameter]: sweep.value } : {}, cutId, until };
}

/** What the engine sees of a diagram: not the layout, title or view settings. */
export function analysisKey(d: Diagram): string {
  return JSON.stringify({
    parameters: d.parameters,
    blocks: d.blocks.map((b) => [b.id, b.kind, b.params]),
    wires: d.wires,
    cuts: d.cuts,
  });
}

/** Identity of a locus: its defining polynomials (exact) or its sampled points' ends. */
function locusSignature(l: LocusData): string {
  const ends = (bs: LocusData['branches'] | null) => (bs ?? []).map((b) => [b.re.length, b.re[0], b.im[0], b.re[b.re.length - 1], b.im[b.im.length - 1]]);
  return JSON.stringify([l.mode, l.parameter, l.negative, l.n0, l.d0, ends(l.branches), ends(l.rangeBranches), ends(l.negativeBranches)]);
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
  const sentKey: Record<Channel, string> = { analysis: '', loops: '', response: '' };
  const genOf: Record<Channel, Map<number, number>> = { analysis: new Map(), loops: new Map(), response: new Map() };

  const off = engine.onReply((reply) => {
    const ch = reply.channel;
    const gen = genOf[ch].get(reply.id) ?? 0;
    genOf[ch].delete(reply.id);
    const s = useResultsStore.getState();
    const patch: Partial<ResultsState> = {
      held: { ...s.held, [ch]: gen },
      arrivedAt: { ...s.arrivedAt, [ch]: performance.now() },
      errors: { ...s.errors, [ch]: reply.ok ? null : reply.error },
    };
    if (reply.ok) {
      if (reply.channel === 'analysis') {
        // The locus does not change while the slider moves: keep the same object so that the
        // Locus chart's base option (thousands of points) is not rebuilt on every step.
        const prev = s.analysis?.locus;
        const next = reply.result.locus;
        if (prev?.ok && next?.ok && locusSignature(prev.value) === locusSignature(next.value)) reply.result.locus = prev;
        patch.analysis = reply.result;
        patch.computeMs = { ...s.computeMs, analysis: reply.result.elapsedMs };
      } else if (reply.channel === 'loops') {
        patch.loops = reply.result.loops;
        patch.computeMs = { ...s.computeMs, loops: reply.result.elapsedMs };
      } else {
        patch.response = reply.result;
        patch.computeMs = { ...s.computeMs, response: reply.result.elapsedMs };
      }
    }
    useResultsStore.setState(patch);
  });

  const update = () => {
    const inp = currentInputs();
    // Only what a view on screen (or a pin / report in progress) shows is computed: the Locus
    // is always on screen; the others follow their tab.
    const ui = useAnalysisStore.getState();
    const all = ui.needAll > 0 || ui.view === 'compare';
    const needed: Record<Channel, boolean> = {
      analysis: true,
      loops: all || ui.view === 'loops',
      response: all || ui.view === 'response' || ui.view === 'locus',
    };
    const withFrequency = all || ui.view === 'frequency';
    const base = analysisKey(inp.engineDiagram);
    const keys: Record<Channel, string> = {
      analysis: JSON.stringify([base, inp.sweep, inp.cutId, withFrequency]),
      loops: JSON.stringify([base, inp.overrides]),
      response: JSON.stringify([base, inp.overrides, inp.until]),
    };
    const changed = (Object.keys(keys) as Channel[]).filter((c) => needed[c] && keys[c] !== sentKey[c]);
    if (changed.length === 0) return;
    const rs = useResultsStore.getState();
    const gen = rs.generation + 1;
    // A channel whose inputs did not change keeps the generation it was last asked for.
    const wanted = { ...rs.wanted };
    for (const c of changed) wanted[c] = gen;
    useResultsStore.setState({ generation: gen, generationAt: performance.now(), wanted });
    for (const c of changed) {
      sentKey[c] = keys[c];
      const id =
        c === 'analysis'
          ? engine.send({ channel: 'analysis', diagram: inp.engineDiagram, sweep: inp.sweep, cutId: inp.cutId, frequency: withFrequency })
          : c === 'loops'
            ? engine.send({ channel: 'loops', diagram: inp.engineDiagram, overrides: inp.overrides })
            : engine.send({ channel: 'response', diagram: inp.engineDiagram, overrides: inp.overrides, until: inp.until });
      genOf[c].set(id, gen);
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
      const done = () => {
        const s = useResultsStore.getState();
        return s.held.analysis === s.wanted.analysis && s.held.loops === s.wanted.loops && s.held.response === s.wanted.response && s.loops !== null && s.response !== null;
      };
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
