/**
 * UI state and actions of commissioning: a test log and the models fitted to it, the tuning of
 * a loop, the cascade workflow and the damping target. Results come from @loopwright/study
 * (computed in the task worker); nothing here decides anything about a fit or a tuning. A
 * result is never the document: applying one writes the document as ONE undo step.
 */
import { create } from 'zustand';
import { emptyDiagram, type Diagram } from '@loopwright/graph';
import {
  applyControllerPatch,
  withFittedBlock,
  withFittedModel,
  type CascadeData,
  type DampingData,
  type FitData,
  type Part,
  type StudyRequest,
  type StudyResult,
  type SweepTarget,
  type TestLogData,
  type TuneData,
  demoTestLogs,
} from '@loopwright/study';
import { useDiagramStore } from '../store/diagram-store.ts';
import { useUiStore } from '../store/ui-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import { runTask } from './task-client.ts';

export type ModelKind = 'fopdt' | 'sopdt' | 'ipdt';
export type Role = 'time' | 'input' | 'output';
export type RuleId = TuneData['rule'];

export interface TuneOptions {
  rule: RuleId;
  controller: 'p' | 'pi' | 'pid';
  /** null: the rule's default. */
  tauC: number | null;
  lambda: number | null;
  msMax: number | null;
  reading: 'inner-first' | 'closed';
  /** The cut tuned (null: the document's active or first cut). */
  cut: string | null;
}

export interface CommissionState {
  log: { text: string; fileName: string } | null;
  columns: TestLogData | null;
  choice: Record<Role, string | null>;
  between: 'linear' | 'hold';
  fit: FitData | null;
  fitError: string | null;
  fitting: boolean;
  /** The model drawn and made into a block. */
  chosen: ModelKind;
  options: TuneOptions;
  tune: TuneData | null;
  tuneError: string | null;
  tuning: boolean;
  cascade: CascadeData | null;
  cascadeError: string | null;
  zeta: number;
  damping: DampingData | null;
  dampingError: string | null;
}

const initialOptions: TuneOptions = {
  rule: 'simc',
  controller: 'pi',
  tauC: null,
  lambda: null,
  msMax: null,
  reading: 'inner-first',
  cut: null,
};

export const useCommissionStore = create<CommissionState>()(() => ({
  log: null,
  columns: null,
  choice: { time: null, input: null, output: null },
  between: 'linear',
  fit: null,
  fitError: null,
  fitting: false,
  chosen: 'sopdt',
  options: initialOptions,
  tune: null,
  tuneError: null,
  tuning: false,
  cascade: null,
  cascadeError: null,
  zeta: 0.7,
  damping: null,
  dampingError: null,
}));

const set = (patch: Partial<CommissionState>) => useCommissionStore.setState(patch);
const get = () => useCommissionStore.getState();
const message = (e: unknown) => (e instanceof Error ? e.message : String(e));
const valueOf = <T>(p: Part<StudyResult> | undefined): T => {
  if (!p) throw new Error('no result');
  if (!p.ok) throw new Error(p.error);
  return p.value.value as T;
};

/** Files the editor reads as test logs rather than diagrams. */
export const isTestLogFile = (name: string): boolean => /\.(csv|tsv|txt)$/i.test(name);

// ---------------------------------------------------------------------------------- test logs

/** Opens a test log (its text and file name), shows the Test log view and fits it. */
export async function openTestLog(text: string, fileName: string): Promise<void> {
  set({ log: { text, fileName }, columns: null, choice: { time: null, input: null, output: null }, fit: null, fitError: null });
  useAnalysisStore.getState().setView('fit');
  await refit();
}

export async function openTestLogFile(file: File): Promise<void> {
  if (file.size > 20_000_000) {
    useUiStore.getState().notify({ kind: 'error', title: `Could not open ${file.name}: a test log larger than 20 MB is refused` });
    return;
  }
  await openTestLog(await file.text(), file.name);
}

export function openSampleLog(id: string): Promise<void> {
  const demo = demoTestLogs.find((d) => d.id === id);
  if (!demo) return Promise.resolve();
  return openTestLog(demo.csv(), demo.fileName);
}

export function setColumn(role: Role, name: string): Promise<void> {
  set({ choice: { ...get().choice, [role]: name } });
  return refit();
}

export function setBetween(between: 'linear' | 'hold'): Promise<void> {
  set({ between });
  return refit();
}

export const chooseModel = (chosen: ModelKind) => set({ chosen });

/** The study requests of a fit: the log's columns, and the three models fitted. */
export function fitStudyRequests(
  log: { text: string; fileName: string },
  choice: Record<Role, string | null>,
  between: 'linear' | 'hold',
): StudyRequest[] {
  const cols = Object.fromEntries(Object.entries(choice).filter(([, v]) => v !== null)) as Partial<Record<Role, string>>;
  const common = { csv: log.text, fileName: log.fileName, ...cols };
  return [
    { kind: 'test-log', ...common },
    { kind: 'fit', ...common, between },
  ];
}

/** Reads the log's columns and fits the three models (newest request wins). */
export async function refit(): Promise<void> {
  const { log, choice, between } = get();
  if (!log) return;
  set({ fitting: true });
  try {
    const parts = await runTask('fit', emptyDiagram(), fitStudyRequests(log, choice, between));
    if (!parts) return;
    let columns: TestLogData | null = null;
    try {
      columns = valueOf<TestLogData>(parts[0]);
    } catch {
      // an unreadable file: the fit's error below says why
    }
    try {
      const fit = valueOf<FitData>(parts[1]);
      const ok = fit.fits.filter((f) => f.result.ok).map((f) => f.model);
      set({ columns, fit, fitError: null, fitting: false, chosen: ok.includes(get().chosen) ? get().chosen : (ok[0] ?? get().chosen) });
    } catch (e) {
      set({ columns, fit: null, fitError: message(e), fitting: false });
    }
  } catch (e) {
    set({ fitError: message(e), fitting: false });
  }
}

/** The fit of the chosen model, when it succeeded. */
export function chosenFit(s: Pick<CommissionState, 'fit' | 'chosen'> = get()) {
  const p = s.fit?.fits.find((f) => f.model === s.chosen)?.result;
  return p?.ok ? p.value : null;
}

/** A document computed from the one in the store, written as ONE undo step. */
export function commitDocument(d: Diagram, selection?: { blocks: string[]; wires: string[] }): void {
  useDiagramStore.setState(selection ? { diagram: d, selection } : { diagram: d });
}

/** The chosen fit as a new transfer-function block with its fit record. */
export function makeBlockFromFit(): string | null {
  const f = chosenFit();
  if (!f) return null;
  const { diagram, block } = withFittedBlock(useDiagramStore.getState().diagram, f.provenance);
  commitDocument(diagram, { blocks: [block], wires: [] });
  useUiStore.getState().notify({ kind: 'info', title: `Made block ${block} from the ${f.model.kind.toUpperCase()} fit` });
  return block;
}

/** The chosen fit into a block that is there (a transfer-function block, or a linear one it replaces). */
export function updateBlockFromFit(blockId: string): boolean {
  const f = chosenFit();
  if (!f) return false;
  try {
    const { diagram, notes } = withFittedModel(useDiagramStore.getState().diagram, blockId, f.provenance);
    commitDocument(diagram);
    useUiStore.getState().notify({
      kind: 'info',
      title: `Block ${blockId} holds the ${f.model.kind.toUpperCase()} fit${notes.length ? ` (${notes.join('; ')})` : ''}`,
    });
    return true;
  } catch (e) {
    useUiStore.getState().notify({ kind: 'error', title: message(e) });
    return false;
  }
}

// ---------------------------------------------------------------------------------- tuning

export const setTuneOptions = (patch: Partial<TuneOptions>) => set({ options: { ...get().options, ...patch } });

/** The rule and its options as a study request takes them (null: the rule's default). */
const ruleOptions = (o: TuneOptions) => ({
  rule: o.rule,
  controller: o.controller,
  ...(o.tauC !== null ? { tauC: o.tauC } : {}),
  ...(o.lambda !== null ? { lambda: o.lambda } : {}),
  ...(o.msMax !== null ? { msMax: o.msMax } : {}),
});
const tuneRequest = (o: TuneOptions) => ({ ...ruleOptions(o), reading: o.reading, cut: o.cut });

/** The study request of a tuning with these options (what the Tune view asks the engine). */
export const tuneStudyRequest = (o: TuneOptions): StudyRequest => ({ kind: 'tune', ...tuneRequest(o) });

/** The suggestion for the current options and document (newest request wins). */
export async function runTune(): Promise<void> {
  const o = get().options;
  set({ tuning: true });
  try {
    const parts = await runTask('tune', useDiagramStore.getState().diagram, [tuneStudyRequest(o)]);
    if (!parts) return;
    set({ tune: valueOf<TuneData>(parts[0]), tuneError: null, tuning: false });
  } catch (e) {
    set({ tune: null, tuneError: message(e), tuning: false });
  }
}

/** Writes the suggestion into its controller block (ONE undo step). */
export function applyTune(): boolean {
  const t = get().tune;
  if (!t?.apply) return false;
  commitDocument(applyControllerPatch(useDiagramStore.getState().diagram, t.apply));
  useUiStore.getState().notify({ kind: 'info', title: `Applied the ${t.rule} setting to ${t.apply.block}` });
  return true;
}

export async function runCascade(): Promise<void> {
  const o = get().options;
  set({ cascade: null, cascadeError: null });
  try {
    const parts = await runTask('cascade', useDiagramStore.getState().diagram, [{ kind: 'cascade', ...ruleOptions(o) }]);
    if (!parts) return;
    set({ cascade: valueOf<CascadeData>(parts[0]) });
  } catch (e) {
    set({ cascadeError: message(e) });
  }
}

/** Every step of the cascade written at once (ONE undo step). */
export function applyCascade(): boolean {
  const c = get().cascade;
  if (!c || c.apply.length === 0) return false;
  commitDocument(c.apply.reduce(applyControllerPatch, useDiagramStore.getState().diagram));
  set({ cascade: null });
  useUiStore.getState().notify({ kind: 'info', title: `Applied the cascade tuning to ${c.apply.map((p) => p.block).join(', ')}` });
  return true;
}

export const setZeta = (zeta: number) => set({ zeta, damping: null, dampingError: null });

export async function runDamping(target: SweepTarget): Promise<void> {
  set({ damping: null, dampingError: null });
  try {
    const parts = await runTask('damping', useDiagramStore.getState().diagram, [{ kind: 'damping', target, zeta: get().zeta }]);
    if (!parts) return;
    set({ damping: valueOf<DampingData>(parts[0]) });
  } catch (e) {
    set({ dampingError: message(e) });
  }
}

/** Sets the swept value the damping target found (ONE undo step). */
export function applyDamping(target: SweepTarget): boolean {
  const v = get().damping?.value;
  if (v === null || v === undefined) return false;
  const st = useDiagramStore.getState();
  if (target.kind === 'parameter') st.setParameterValue(target.name, v);
  else st.updateBlockParams(target.block, { k: v });
  useAnalysisStore.getState().setLiveValue(null);
  set({ damping: null });
  return true;
}
