/**
 * Tidy layout with elkjs (layered, left to right), run in the main thread: block inputs on the
 * west side, outputs east, a summing junction's second input from below, so that feedback
 * wires come back underneath as in a textbook diagram.
 */
import ELK from 'elkjs/lib/elk.bundled.js';
import type { Diagram } from '../store/graph-bridge.ts';
import { blockSpec } from '../store/graph-bridge.ts';

const elk = new ELK();
const GRID = 10;

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
        layoutOptions: { 'elk.port.side': b.kind === 'summing-junction' && i === 1 ? 'SOUTH' : b.kind === 'summing-junction' && i === 2 ? 'NORTH' : 'WEST' },
      })),
      ...blockSpec(b.kind).outputs.map((p) => ({ id: `${b.id}:${p}`, layoutOptions: { 'elk.port.side': 'EAST' } })),
    ];
    return { id: b.id, width: size.width, height: size.height, ports, layoutOptions: { 'elk.portConstraints': 'FIXED_SIDE' } };
  });
  const edges = d.wires.map((w) => ({ id: w.id, sources: [`${w.from.block}:${w.from.port}`], targets: [`${w.to.block}:${w.to.port}`] }));
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
