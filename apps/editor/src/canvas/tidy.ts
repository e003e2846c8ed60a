/**
 * Tidy layout with elkjs (layered, left to right), run in the main thread: block inputs on the
 * west side, outputs east, a summing junction's second input from below, so that feedback
 * wires come back underneath as in a textbook diagram.
 */
import type { ELK } from 'elkjs/lib/elk.bundled.js';
import type { Diagram } from '../store/graph-bridge.ts';
import { blockSpec } from '../store/graph-bridge.ts';
import { inputSide } from './ports.ts';

const ELK_SIDE = { left: 'WEST', bottom: 'SOUTH', top: 'NORTH' } as const;

// elkjs is about 480 kB gzipped: loaded on the first Tidy, not with the editor.
let elkReady: Promise<ELK> | null = null;
const loadElk = () => (elkReady ??= import('elkjs/lib/elk.bundled.js').then((m) => new m.default()));
const GRID = 10;

/**
 * The wires that close loops, found by a depth-first walk from the sources along the signal
 * direction: a wire into a block still on the walk's stack is a feedback wire. They are left
 * out of the layering so that the forward path runs left to right (the canvas routes them
 * back underneath).
 */
export function feedbackWires(d: Diagram): Set<string> {
  const out = new Map<string, Diagram['wires']>();
  for (const w of d.wires) {
    const list = out.get(w.from.block) ?? [];
    list.push(w);
    out.set(w.from.block, list);
  }
  // Main inputs (in, in1) before side inputs, so a junction's reference path wins.
  for (const list of out.values()) list.sort((a, b) => a.to.port.localeCompare(b.to.port, 'en', { numeric: true }));
  const state = new Map<string, 'open' | 'done'>();
  const back = new Set<string>();
  const visit = (id: string) => {
    state.set(id, 'open');
    for (const w of out.get(id) ?? []) {
      const s = state.get(w.to.block);
      if (s === 'open') back.add(w.id);
      else if (!s) visit(w.to.block);
    }
    state.set(id, 'done');
  };
  const order = [...d.blocks.filter((b) => b.kind === 'source'), ...d.blocks.filter((b) => b.kind !== 'source')];
  for (const b of order) if (!state.has(b.id)) visit(b.id);
  return back;
}

export async function tidyPositions(
  d: Diagram,
  sizes: Record<string, { width: number; height: number }>,
): Promise<Record<string, { x: number; y: number }>> {
  const children = d.blocks.map((b) => {
    const size = sizes[b.id] ?? { width: 140, height: 70 };
    const inputs = blockSpec(b.kind).inputs(b.params);
    const ports = [
      ...inputs.map((p, i) => ({
        id: `${b.id}:${p}`,
        layoutOptions: { 'elk.port.side': ELK_SIDE[inputSide(b.kind, i)] },
      })),
      ...blockSpec(b.kind).outputs.map((p) => ({ id: `${b.id}:${p}`, layoutOptions: { 'elk.port.side': 'EAST' } })),
    ];
    return { id: b.id, width: size.width, height: size.height, ports, layoutOptions: { 'elk.portConstraints': 'FIXED_SIDE' } };
  });
  const back = feedbackWires(d);
  const edges = d.wires
    .filter((w) => !back.has(w.id))
    .map((w) => ({ id: w.id, sources: [`${w.from.block}:${w.from.port}`], targets: [`${w.to.block}:${w.to.port}`] }));
  const elk = await loadElk();
  const result = await elk.layout({
    id: 'root',
    layoutOptions: {
      'elk.algorithm': 'layered',
      'elk.direction': 'RIGHT',
      'elk.layered.spacing.nodeNodeBetweenLayers': '70',
      'elk.spacing.nodeNode': '50',
      'elk.edgeRouting': 'ORTHOGONAL',
      'elk.layered.nodePlacement.strategy': 'BRANDES_KOEPF',
    },
    children,
    edges,
  });
  const out: Record<string, { x: number; y: number }> = {};
  for (const c of result.children ?? []) {
    out[c.id] = { x: Math.round((c.x ?? 0) / GRID) * GRID + 40, y: Math.round((c.y ?? 0) / GRID) * GRID + 40 };
  }
  return out;
}
