/**
 * The editor store: the diagram document plus UI state (selection, clipboard).
 * Undo/redo (zundo) records ONLY the document and compares by value, so selection changes,
 * React Flow measurements and in-progress drags never create history entries.
 */
import { create } from 'zustand';
import { temporal } from 'zundo';
import type {
  Block,
  BlockKind,
  Diagram,
  NamedParameter,
  ParamValue,
  SimulationSettings,
  Sweep,
  ViewSettings,
  Wire,
} from './graph-bridge.ts';
import { blockSpec, defaultParams, emptyDiagram } from './graph-bridge.ts';
import { renameInExpression } from './rename.ts';
import { spliceIntoWire } from './wiring.ts';

export interface Selection {
  blocks: string[];
  wires: string[];
}

export interface Clipboard {
  blocks: Block[];
  wires: Wire[];
}

export interface DiagramState {
  diagram: Diagram;
  selection: Selection;
  clipboard: Clipboard | null;

  // ---- contract actions (shared with the analysis views) ----
  setDiagram(d: Diagram): void;
  updateBlockParams(id: string, patch: Record<string, ParamValue>): void;
  setParameterValue(name: string, value: number): void;
  addCut(wireId: string): void;
  removeCut(id: string): void;
  setView(patch: Partial<ViewSettings>): void;
  /** Simulation settings of the document (an undefined field is removed: "the engine chooses"). */
  setSimulation(patch: Partial<SimulationSettings>): void;
  addSweep(sweep: Omit<Sweep, 'id'> & { id?: string }): string;
  updateSweep(id: string, patch: Partial<Omit<Sweep, 'id'>>): void;
  removeSweep(id: string): void;

  // ---- editing ----
  setSelection(sel: Partial<Selection>): void;
  selectAll(): void;
  addBlock(kind: BlockKind, position: { x: number; y: number }, params?: Record<string, ParamValue>): string;
  /** A new block dropped on a wire: added and put into the wire as ONE edit (see spliceIntoWire). */
  addBlockOnWire(kind: BlockKind, position: { x: number; y: number }, wireId: string): string;
  /** An unwired block dragged onto a wire: moved there and put into it as ONE edit. */
  moveBlockOntoWire(id: string, position: { x: number; y: number }, wireId: string): boolean;
  setBlockLabel(id: string, label: string): void;
  moveBlocks(positions: Record<string, { x: number; y: number }>): void;
  connect(from: { block: string; port: string }, to: { block: string; port: string }): string | null;
  deleteSelection(): void;
  removeWires(ids: string[]): void;
  setCutLabel(id: string, label: string): void;
  copySelection(): void;
  paste(): void;
  setTitle(title: string): void;
  setDescription(text: string): void;
  addParameter(p?: Partial<NamedParameter>): string;
  updateParameter(name: string, patch: Partial<NamedParameter>): void;
  renameParameter(oldName: string, newName: string): void;
  removeParameter(name: string): void;
}

/** The smallest unused id `${prefix}${n}` (n ≥ 1): deterministic, so tests can predict ids. */
export function nextId(prefix: string, taken: Iterable<string>): string {
  const set = new Set(taken);
  for (let n = 1; ; n++) if (!set.has(`${prefix}${n}`)) return `${prefix}${n}`;
}

function clone<T>(x: T): T {
  return JSON.parse(JSON.stringify(x)) as T;
}

/** Value comparison of two documents; `view` zoom/offset alone is not an undoable edit. */
export function sameDocument(a: Diagram, b: Diagram): boolean {
  if (a === b) return true;
  const strip = (d: Diagram) => JSON.stringify({ ...d, view: { ...d.view, zoom: undefined, offset: undefined } });
  return strip(a) === strip(b);
}

export const HISTORY_LIMIT = 200;

export const useDiagramStore = create<DiagramState>()(
  temporal(
    (set, get) => {
      const edit = (fn: (d: Diagram) => Diagram | void) => {
        const d = clone(get().diagram);
        const r = fn(d);
        set({ diagram: r ?? d });
      };
      return {
        diagram: emptyDiagram(),
        selection: { blocks: [], wires: [] },
        clipboard: null,

        setDiagram: (d) => set({ diagram: clone(d), selection: { blocks: [], wires: [] } }),
        updateBlockParams: (id, patch) =>
          edit((d) => {
            const b = d.blocks.find((x) => x.id === id);
            if (!b) return;
            b.params = { ...b.params, ...patch };
            // A summing junction with fewer signs loses the wires into the dropped inputs.
            if (b.kind === 'summing-junction' && typeof b.params.signs === 'string') {
              const n = b.params.signs.length;
              d.wires = d.wires.filter((w) => w.to.block !== id || Number(w.to.port.replace(/^in/, '')) <= n);
            }
          }),
        setParameterValue: (name, value) =>
          edit((d) => {
            const p = d.parameters.find((x) => x.name === name);
            if (p) p.value = value;
          }),
        addCut: (wireId) =>
          edit((d) => {
            if (d.cuts.some((c) => c.wire === wireId)) return;
            if (!d.wires.some((w) => w.id === wireId)) return;
            const id = nextId(
              'cut',
              d.cuts.map((c) => c.id),
            );
            d.cuts.push({ id, wire: wireId });
            if (!d.view.activeCut) d.view.activeCut = id;
          }),
        removeCut: (id) =>
          edit((d) => {
            d.cuts = d.cuts.filter((c) => c.id !== id);
            if (d.view.activeCut === id) d.view.activeCut = d.cuts[0]?.id;
          }),
        setView: (patch) => edit((d) => void (d.view = { ...d.view, ...patch })),
        setSimulation: (patch) =>
          edit((d) => {
            const next: Record<string, unknown> = { ...(d.simulation ?? {}), ...patch };
            for (const k of Object.keys(next)) if (next[k] === undefined) delete next[k];
            d.simulation = next as SimulationSettings;
          }),
        addSweep: (sweep) => {
          const d = clone(get().diagram);
          const id =
            sweep.id ??
            nextId(
              'sweep',
              d.sweeps.map((s) => s.id),
            );
          d.sweeps.push({ ...sweep, id });
          if (!d.view.activeSweep) d.view.activeSweep = id;
          set({ diagram: d });
          return id;
        },
        updateSweep: (id, patch) =>
          edit((d) => {
            const s = d.sweeps.find((x) => x.id === id);
            if (s) Object.assign(s, patch);
          }),
        removeSweep: (id) =>
          edit((d) => {
            d.sweeps = d.sweeps.filter((s) => s.id !== id);
            if (d.view.activeSweep === id) d.view.activeSweep = d.sweeps[0]?.id;
          }),

        setSelection: (sel) => {
          const cur = get().selection;
          const next = { blocks: sel.blocks ?? cur.blocks, wires: sel.wires ?? cur.wires };
          if (JSON.stringify(next) !== JSON.stringify(cur)) set({ selection: next });
        },
        selectAll: () => {
          const d = get().diagram;
          set({ selection: { blocks: d.blocks.map((b) => b.id), wires: d.wires.map((w) => w.id) } });
        },
        addBlock: (kind, position, params) => {
          const d = clone(get().diagram);
          const id = nextId(
            blockSpec(kind).idPrefix,
            d.blocks.map((b) => b.id),
          );
          d.blocks.push({
            id,
            kind,
            position: { x: Math.round(position.x), y: Math.round(position.y) },
            params: { ...defaultParams(kind), ...params },
          });
          set({ diagram: d, selection: { blocks: [id], wires: [] } });
          return id;
        },
        addBlockOnWire: (kind, position, wireId) => {
          const d = clone(get().diagram);
          const id = nextId(
            blockSpec(kind).idPrefix,
            d.blocks.map((b) => b.id),
          );
          d.blocks.push({ id, kind, position: { x: Math.round(position.x), y: Math.round(position.y) }, params: defaultParams(kind) });
          spliceIntoWire(d, id, wireId);
          set({ diagram: d, selection: { blocks: [id], wires: [] } });
          return id;
        },
        moveBlockOntoWire: (id, position, wireId) => {
          const d = clone(get().diagram);
          const b = d.blocks.find((x) => x.id === id);
          if (!b) return false;
          b.position = { x: Math.round(position.x), y: Math.round(position.y) };
          const joined = spliceIntoWire(d, id, wireId);
          set({ diagram: d });
          return joined;
        },
        setBlockLabel: (id, label) =>
          edit((d) => {
            const b = d.blocks.find((x) => x.id === id);
            if (!b) return;
            if (label.trim()) b.label = label;
            else delete b.label;
          }),
        moveBlocks: (positions) => {
          const d = clone(get().diagram);
          for (const b of d.blocks) {
            const p = positions[b.id];
            if (p) b.position = { x: Math.round(p.x), y: Math.round(p.y) };
          }
          set({ diagram: d });
        },
        connect: (from, to) => {
          const d = clone(get().diagram);
          if (from.block === to.block) return null;
          // An input takes one wire: a new wire into a used input replaces the old one.
          d.wires = d.wires.filter((w) => !(w.to.block === to.block && w.to.port === to.port));
          const id = nextId('w', d.wires.map((w) => w.id).concat(get().diagram.wires.map((w) => w.id)));
          d.wires.push({ id, from: { ...from }, to: { ...to } });
          d.cuts = d.cuts.filter((c) => d.wires.some((w) => w.id === c.wire));
          set({ diagram: d, selection: { blocks: [], wires: [id] } });
          return id;
        },
        deleteSelection: () => {
          const { selection } = get();
          if (selection.blocks.length === 0 && selection.wires.length === 0) return;
          const d = clone(get().diagram);
          const gone = new Set(selection.blocks);
          d.blocks = d.blocks.filter((b) => !gone.has(b.id));
          const goneWires = new Set(selection.wires);
          d.wires = d.wires.filter((w) => !goneWires.has(w.id) && !gone.has(w.from.block) && !gone.has(w.to.block));
          d.cuts = d.cuts.filter((c) => d.wires.some((w) => w.id === c.wire));
          if (d.view.activeCut && !d.cuts.some((c) => c.id === d.view.activeCut)) d.view.activeCut = d.cuts[0]?.id;
          if (d.view.activeProbe && !d.blocks.some((b) => b.id === d.view.activeProbe)) delete d.view.activeProbe;
          if (d.simulation?.probes) d.simulation.probes = d.simulation.probes.filter((id) => !gone.has(id));
          if (d.fits) d.fits = d.fits.filter((f) => !gone.has(f.block));
          set({ diagram: d, selection: { blocks: [], wires: [] } });
        },
        removeWires: (ids) =>
          edit((d) => {
            const gone = new Set(ids);
            d.wires = d.wires.filter((w) => !gone.has(w.id));
            d.cuts = d.cuts.filter((c) => !gone.has(c.wire));
            if (d.view.activeCut && !d.cuts.some((c) => c.id === d.view.activeCut)) d.view.activeCut = d.cuts[0]?.id;
          }),
        setCutLabel: (id, label) =>
          edit((d) => {
            const c = d.cuts.find((x) => x.id === id);
            if (!c) return;
            if (label.trim()) c.label = label;
            else delete c.label;
          }),
        copySelection: () => {
          const { selection, diagram } = get();
          const ids = new Set(selection.blocks);
          if (ids.size === 0) return;
          set({
            clipboard: clone({
              blocks: diagram.blocks.filter((b) => ids.has(b.id)),
              wires: diagram.wires.filter((w) => ids.has(w.from.block) && ids.has(w.to.block)),
            }),
          });
        },
        paste: () => {
          const clip = get().clipboard;
          if (!clip || clip.blocks.length === 0) return;
          const d = clone(get().diagram);
          const map = new Map<string, string>();
          const newIds: string[] = [];
          for (const b of clip.blocks) {
            const id = nextId(
              blockSpec(b.kind).idPrefix,
              d.blocks.map((x) => x.id),
            );
            map.set(b.id, id);
            newIds.push(id);
            d.blocks.push({ ...clone(b), id, position: { x: b.position.x + 40, y: b.position.y + 40 } });
          }
          for (const w of clip.wires) {
            const id = nextId(
              'w',
              d.wires.map((x) => x.id),
            );
            d.wires.push({
              id,
              from: { block: map.get(w.from.block)!, port: w.from.port },
              to: { block: map.get(w.to.block)!, port: w.to.port },
            });
          }
          // Paste again lands a further step away.
          set({
            diagram: d,
            selection: { blocks: newIds, wires: [] },
            clipboard: { ...clip, blocks: clip.blocks.map((b) => ({ ...b, position: { x: b.position.x + 40, y: b.position.y + 40 } })) },
          });
        },
        setTitle: (title) => edit((d) => void (d.title = title)),
        setDescription: (text) => edit((d) => void (d.description = text)),
        addParameter: (p) => {
          const d = clone(get().diagram);
          const name =
            p?.name ??
            nextId(
              'p',
              d.parameters.map((x) => x.name),
            );
          d.parameters.push({ value: 1, min: 0, max: 10, ...p, name });
          set({ diagram: d });
          return name;
        },
        updateParameter: (name, patch) =>
          edit((d) => {
            const p = d.parameters.find((x) => x.name === name);
            if (p) Object.assign(p, patch, { name });
          }),
        renameParameter: (oldName, newName) =>
          edit((d) => {
            if (oldName === newName) return;
            const p = d.parameters.find((x) => x.name === oldName);
            if (!p || d.parameters.some((x) => x.name === newName)) return;
            p.name = newName;
            for (const b of d.blocks) {
              for (const [k, v] of Object.entries(b.params)) {
                if (typeof v === 'string') b.params[k] = renameInExpression(v, oldName, newName);
              }
            }
            for (const s of d.sweeps) if (s.parameter === oldName) s.parameter = newName;
          }),
        removeParameter: (name) =>
          edit((d) => {
            d.parameters = d.parameters.filter((p) => p.name !== name);
            const gone = d.sweeps.filter((s) => s.parameter === name).map((s) => s.id);
            d.sweeps = d.sweeps.filter((s) => s.parameter !== name);
            if (d.view.activeSweep && gone.includes(d.view.activeSweep)) d.view.activeSweep = d.sweeps[0]?.id;
          }),
      };
    },
    {
      partialize: (s) => ({ diagram: s.diagram }),
      equality: (a, b) => sameDocument(a.diagram, b.diagram),
      limit: HISTORY_LIMIT,
    },
  ),
);

export const undo = () => useDiagramStore.temporal.getState().undo();
export const redo = () => useDiagramStore.temporal.getState().redo();
/** Forget history (after opening a file or loading a demo the undo stack starts fresh). */
export const clearHistory = () => useDiagramStore.temporal.getState().clear();

/** Replace the document as a fresh start (new / open / demo): no undo back into the old one. */
export function loadDocument(d: Diagram): void {
  useDiagramStore.getState().setDiagram(d);
  clearHistory();
}

/**
 * A continuous gesture (dragging a slider) as ONE undo step: remember the document at the
 * start, stop recording while it moves, and push the starting document when it ends.
 */
let gestureStart: Diagram | null = null;
export function beginGesture(): void {
  if (gestureStart) return;
  gestureStart = useDiagramStore.getState().diagram;
  useDiagramStore.temporal.getState().pause();
}
export function endGesture(): void {
  run = null;
  if (!gestureStart) return;
  const start = gestureStart;
  gestureStart = null;
  const t = useDiagramStore.temporal;
  t.getState().resume();
  if (!sameDocument(start, useDiagramStore.getState().diagram)) {
    const past = [...t.getState().pastStates, { diagram: start }].slice(-HISTORY_LIMIT);
    t.setState({ pastStates: past, futureStates: [] });
  }
}

/**
 * Runs of small edits as ONE undo step: arrow-key nudges of a slider, a block or a sweep value.
 * An edit made through `coalesced(key, …)` joins the previous one when it has the same key,
 * nothing else changed the document in between (another edit, undo, redo or a load breaks the
 * run), and it follows within COALESCE_MS — or comes from a key held down (`held`: the
 * keyboard's auto-repeat), which continues a run however slowly the machine delivers it. The
 * history keeps the document from before the run's first edit; a run that ends where it began
 * leaves no entry at all.
 */
export const COALESCE_MS = 1500;
let run: { key: string; at: number; diagram: Diagram } | null = null;
export function coalesced(key: string, fn: () => void, opts: { now?: number; held?: boolean } = {}): void {
  const now = opts.now ?? Date.now();
  const before = useDiagramStore.getState().diagram;
  if (gestureStart) {
    // Inside a pointer gesture the gesture already makes one step.
    fn();
    return;
  }
  const t = useDiagramStore.temporal;
  const joining = run !== null && run.key === key && (opts.held === true || now - run.at < COALESCE_MS) && run.diagram === before;
  if (joining) {
    t.getState().pause();
    try {
      fn();
    } finally {
      t.getState().resume();
    }
    const past = t.getState().pastStates;
    const after = useDiagramStore.getState().diagram;
    if (past.length && sameDocument(past[past.length - 1].diagram as Diagram, after))
      t.setState({ pastStates: past.slice(0, -1), futureStates: [] });
    else if (after !== before) t.setState({ futureStates: [] });
  } else {
    fn();
  }
  const after = useDiagramStore.getState().diagram;
  // A call that changed nothing (a range input reports its value on 'input' and again on
  // 'change') must not start a run, or the next real nudge would hide in the previous step.
  if (joining || !sameDocument(before, after)) run = { key, at: now, diagram: after };
}
/** Ends the current run (the control lost focus): the next nudge starts a new undo step. */
export function endCoalescing(): void {
  run = null;
}

// Undo, redo and file loads can remove selected elements: keep the selection to what exists.
useDiagramStore.subscribe((s, prev) => {
  if (s.diagram === prev.diagram) return;
  const blocks = new Set(s.diagram.blocks.map((b) => b.id));
  const wires = new Set(s.diagram.wires.map((w) => w.id));
  const sel = s.selection;
  if (sel.blocks.every((id) => blocks.has(id)) && sel.wires.every((id) => wires.has(id))) return;
  useDiagramStore.setState({
    selection: { blocks: sel.blocks.filter((id) => blocks.has(id)), wires: sel.wires.filter((id) => wires.has(id)) },
  });
});
