import { beforeEach, describe, expect, it } from 'vitest';
import {
  beginGesture,
  coalesced,
  COALESCE_MS,
  endCoalescing,
  endGesture,
  HISTORY_LIMIT,
  loadDocument,
  redo,
  undo,
  useDiagramStore,
} from './diagram-store.ts';
import { emptyDiagram } from './graph-bridge.ts';

const st = () => useDiagramStore.getState();
const past = () => useDiagramStore.temporal.getState().pastStates.length;

// Store behaviour the editor relies on (common practice, no source): one undo step per edit,
// none for selection, value comparison, cascades on delete, token-aware rename.
describe('diagram store', () => {
  beforeEach(() => loadDocument(emptyDiagram()));

  it('records document edits only, one entry each, and undoes them by value', () => {
    const a = st().addBlock('gain', { x: 10, y: 20 });
    const b = st().addBlock('probe', { x: 200, y: 20 });
    expect(past()).toBe(2);
    st().setSelection({ blocks: [a, b] });
    st().setSelection({ blocks: [] });
    expect(past()).toBe(2);
    st().connect({ block: a, port: 'out' }, { block: b, port: 'in' });
    expect(past()).toBe(3);
    st().updateBlockParams(a, { k: 3 });
    st().updateBlockParams(a, { k: 3 }); // same value again: no new entry
    expect(past()).toBe(4);
    undo();
    expect(st().diagram.blocks[0].params.k).toBe(1);
    undo();
    expect(st().diagram.wires).toEqual([]);
    redo();
    redo();
    expect(st().diagram.blocks[0].params.k).toBe(3);
  });

  it('keeps at least 100 steps', () => {
    expect(HISTORY_LIMIT).toBeGreaterThanOrEqual(100);
    const id = st().addBlock('gain', { x: 0, y: 0 });
    for (let i = 1; i <= 120; i++) st().updateBlockParams(id, { k: i });
    for (let i = 0; i < 119; i++) undo();
    expect(st().diagram.blocks[0].params.k).toBe(1);
  });

  it('deleting a block removes its wires and their cuts', () => {
    const a = st().addBlock('gain', { x: 0, y: 0 });
    const b = st().addBlock('gain', { x: 200, y: 0 });
    const w = st().connect({ block: a, port: 'out' }, { block: b, port: 'in' })!;
    st().addCut(w);
    expect(st().diagram.cuts).toHaveLength(1);
    st().setSelection({ blocks: [b], wires: [] });
    st().deleteSelection();
    expect(st().diagram.wires).toEqual([]);
    expect(st().diagram.cuts).toEqual([]);
  });

  it('a new wire into a used input replaces the old one', () => {
    const a = st().addBlock('gain', { x: 0, y: 0 });
    const b = st().addBlock('gain', { x: 0, y: 100 });
    const c = st().addBlock('probe', { x: 200, y: 0 });
    st().connect({ block: a, port: 'out' }, { block: c, port: 'in' });
    st().connect({ block: b, port: 'out' }, { block: c, port: 'in' });
    expect(st().diagram.wires.map((w) => w.from.block)).toEqual([b]);
  });

  it('renaming a parameter rewrites whole-name uses only', () => {
    st().addParameter({ name: 'K', value: 2 });
    const g = st().addBlock('gain', { x: 0, y: 0 }, { k: 'K*Kd' });
    const t = st().addBlock('transfer-function', { x: 0, y: 0 }, { expression: 'K/(s+K)' });
    st().addSweep({ parameter: 'K', min: 0, max: 5, scale: 'linear' });
    st().renameParameter('K', 'Kc');
    const d = st().diagram;
    expect(d.blocks.find((b) => b.id === g)!.params.k).toBe('Kc*Kd');
    expect(d.blocks.find((b) => b.id === t)!.params.expression).toBe('Kc/(s+Kc)');
    expect(d.sweeps[0].parameter).toBe('Kc');
    expect(d.parameters[0].name).toBe('Kc');
  });

  it('copy and paste duplicate blocks with their inner wires under fresh ids', () => {
    const a = st().addBlock('gain', { x: 0, y: 0 });
    const b = st().addBlock('probe', { x: 200, y: 0 });
    st().connect({ block: a, port: 'out' }, { block: b, port: 'in' });
    st().setSelection({ blocks: [a, b], wires: [] });
    st().copySelection();
    st().paste();
    const d = st().diagram;
    expect(d.blocks.map((x) => x.id)).toEqual(['gain1', 'probe1', 'gain2', 'probe2']);
    expect(d.wires.map((w) => `${w.from.block}->${w.to.block}`)).toEqual(['gain1->probe1', 'gain2->probe2']);
    expect(d.blocks[2].position).toEqual({ x: 40, y: 40 });
  });

  it('a slider gesture is one undo step', () => {
    st().addParameter({ name: 'K', value: 1 });
    const before = past();
    beginGesture();
    for (let v = 2; v < 30; v++) st().setParameterValue('K', v);
    endGesture();
    expect(past()).toBe(before + 1);
    undo();
    expect(st().diagram.parameters[0].value).toBe(1);
  });
});

describe('selection after undo', () => {
  it('drops elements that no longer exist', () => {
    loadDocument(emptyDiagram());
    const a = useDiagramStore.getState().addBlock('gain', { x: 0, y: 0 });
    expect(useDiagramStore.getState().selection.blocks).toEqual([a]);
    undo();
    expect(useDiagramStore.getState().selection.blocks).toEqual([]);
  });
});

// Wiring and undo coalescing the canvas and the Parameters panel rely on (common practice, no source).
describe('blocks dropped on wires', () => {
  beforeEach(() => loadDocument(emptyDiagram()));

  const line = () => {
    const a = st().addBlock('gain', { x: 0, y: 0 });
    const b = st().addBlock('probe', { x: 400, y: 0 });
    const w = st().connect({ block: a, port: 'out' }, { block: b, port: 'in' })!;
    st().addCut(w);
    return { a, b, w };
  };

  it('a block with an input and an output goes in line, in ONE undo step; the cut stays on the upstream half', () => {
    const { a, b, w } = line();
    const before = st().diagram;
    const n = past();
    const lag = st().addBlockOnWire('first-order-lag', { x: 200, y: 0 }, w);
    expect(past()).toBe(n + 1);
    const d = st().diagram;
    expect(d.wires.map((x) => `${x.id}:${x.from.block}.${x.from.port}->${x.to.block}.${x.to.port}`)).toEqual([
      `${w}:${a}.out->${lag}.in`,
      `w2:${lag}.out->${b}.in`,
    ]);
    expect(d.cuts).toEqual([{ id: 'cut1', wire: w }]);
    undo();
    expect(st().diagram).toEqual(before);
  });

  it('a summing junction takes the signal on in1; a probe taps the wire; a source is only placed', () => {
    const { a, b, w } = line();
    const sum = st().addBlockOnWire('summing-junction', { x: 200, y: 0 }, w);
    expect(st().diagram.wires.map((x) => `${x.from.block}->${x.to.block}.${x.to.port}`)).toEqual([`${a}->${sum}.in1`, `${sum}->${b}.in`]);
    const p = st().addBlockOnWire('probe', { x: 200, y: 100 }, w);
    expect(st().diagram.wires.map((x) => `${x.from.block}->${x.to.block}.${x.to.port}`)).toEqual([
      `${a}->${sum}.in1`,
      `${sum}->${b}.in`,
      `${a}->${p}.in`,
    ]);
    const wires = st().diagram.wires;
    const src = st().addBlockOnWire('source', { x: 200, y: 200 }, w);
    expect(st().diagram.blocks.map((x) => x.id)).toContain(src);
    expect(st().diagram.wires).toEqual(wires);
  });

  it('an unwired block dragged onto a wire joins it; a wired one only moves', () => {
    const { w } = line();
    const g = st().addBlock('gain', { x: 0, y: 300 });
    const n = past();
    expect(st().moveBlockOntoWire(g, { x: 200, y: 0 }, w)).toBe(true);
    expect(past()).toBe(n + 1);
    expect(st().diagram.wires).toHaveLength(2);
    const g2 = st().addBlock('gain', { x: 0, y: 500 });
    st().connect({ block: g, port: 'out' }, { block: g2, port: 'in' });
    const wires = st().diagram.wires;
    expect(st().moveBlockOntoWire(g2, { x: 100, y: 0 }, w)).toBe(false);
    expect(st().diagram.wires).toEqual(wires);
    expect(st().diagram.blocks.find((x) => x.id === g2)!.position).toEqual({ x: 100, y: 0 });
  });
});

describe('runs of nudges', () => {
  beforeEach(() => {
    loadDocument(emptyDiagram());
    endCoalescing();
  });

  it('nudges with one key, each within the window, are ONE undo step; undo returns to before the run', () => {
    st().addParameter({ name: 'K', value: 1 });
    const n = past();
    let t = 1000;
    for (let v = 2; v <= 12; v++) coalesced('K', () => st().setParameterValue('K', v), { now: (t += COALESCE_MS / 2) });
    expect(st().diagram.parameters[0].value).toBe(12);
    expect(past()).toBe(n + 1);
    undo();
    expect(st().diagram.parameters[0].value).toBe(1);
    redo();
    expect(st().diagram.parameters[0].value).toBe(12);
  });

  it('a pause, another key, or another edit in between starts a new step', () => {
    st().addParameter({ name: 'K', value: 1 });
    st().addParameter({ name: 'T', value: 1 });
    const n = past();
    coalesced('K', () => st().setParameterValue('K', 2), { now: 0 });
    coalesced('K', () => st().setParameterValue('K', 3), { now: COALESCE_MS + 1 }); // too late
    expect(past()).toBe(n + 2);
    coalesced('T', () => st().setParameterValue('T', 2), { now: COALESCE_MS + 2 }); // another key
    expect(past()).toBe(n + 3);
    st().setTitle('edited'); // another edit
    coalesced('T', () => st().setParameterValue('T', 3), { now: COALESCE_MS + 3 });
    expect(past()).toBe(n + 5);
    undo();
    expect(st().diagram.parameters[1].value).toBe(2);
  });

  it('a run that comes back to where it began leaves no undo step', () => {
    st().addParameter({ name: 'K', value: 1 });
    const n = past();
    coalesced('K', () => st().setParameterValue('K', 2), { now: 0 });
    coalesced('K', () => st().setParameterValue('K', 1), { now: 10 });
    expect(past()).toBe(n);
  });

  it('a held key continues its run however long the events take; a tap after a pause does not', () => {
    st().addParameter({ name: 'K', value: 1 });
    const n = past();
    coalesced('K', () => st().setParameterValue('K', 2), { now: 0 });
    for (let v = 3; v < 8; v++) coalesced('K', () => st().setParameterValue('K', v), { now: v * 10 * COALESCE_MS, held: true });
    expect(past()).toBe(n + 1);
    coalesced('K', () => st().setParameterValue('K', 9), { now: 100 * COALESCE_MS });
    expect(past()).toBe(n + 2);
    undo();
    expect(st().diagram.parameters[0].value).toBe(7);
  });

  it('a call that changes nothing does not start a run', () => {
    st().addParameter({ name: 'K', value: 1 });
    const n = past();
    coalesced('K', () => st().setParameterValue('K', 1), { now: 0 }); // the same value again
    coalesced('K', () => st().setParameterValue('K', 2), { now: 10 });
    expect(past()).toBe(n + 1);
    undo();
    expect(st().diagram.parameters[0].value).toBe(1);
  });

  it('inside a pointer gesture the gesture makes the one step', () => {
    st().addParameter({ name: 'K', value: 1 });
    const n = past();
    beginGesture();
    for (let v = 2; v < 6; v++) coalesced('K', () => st().setParameterValue('K', v), { now: v });
    endGesture();
    coalesced('K', () => st().setParameterValue('K', 9), { now: 7 });
    expect(past()).toBe(n + 2);
  });
});
