import { beforeEach, describe, expect, it } from 'vitest';
import { beginGesture, endGesture, HISTORY_LIMIT, loadDocument, redo, undo, useDiagramStore } from './diagram-store.ts';
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
