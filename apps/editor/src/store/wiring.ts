/**
 * Wiring edits as pure functions on a document copy (the store wraps each in ONE undoable
 * edit): putting a block into a wire, and finding what already drives an input.
 */
import { blockSpec, type Diagram, type Wire } from './graph-bridge.ts';

/** The smallest unused wire id `w${n}`. */
export function nextWireId(d: Diagram): string {
  const taken = new Set(d.wires.map((w) => w.id));
  for (let n = 1; ; n++) if (!taken.has(`w${n}`)) return `w${n}`;
}

function portsOf(d: Diagram, blockId: string): { inputs: string[]; outputs: string[] } | null {
  const b = d.blocks.find((x) => x.id === blockId);
  if (!b) return null;
  const spec = blockSpec(b.kind);
  try {
    return { inputs: spec.inputs(b.params), outputs: spec.outputs };
  } catch {
    return null;
  }
}

/** How a block dropped on a wire joins it: in line (in and out), as a tap (a probe), or not at all (a source). */
export function spliceMode(d: Diagram, blockId: string): 'inline' | 'tap' | null {
  const ports = portsOf(d, blockId);
  if (!ports || ports.inputs.length === 0) return null;
  return ports.outputs.length > 0 ? 'inline' : 'tap';
}

/**
 * Puts block `blockId` into wire `wireId` (A.p → B.q), in place on `d`:
 * - a block with an input and an output goes in line: A.p → block's first input keeps the
 *   wire's id (and so its cut), and a new wire runs from the block's first output to B.q;
 * - a block with inputs only (a probe) taps the wire: a new wire A.p → its first input;
 * - a block without inputs (a source), or one already wired, is left alone.
 * Returns whether anything changed.
 */
export function spliceIntoWire(d: Diagram, blockId: string, wireId: string): boolean {
  const w = d.wires.find((x) => x.id === wireId);
  const ports = portsOf(d, blockId);
  if (!w || !ports || ports.inputs.length === 0) return false;
  if (w.from.block === blockId || w.to.block === blockId) return false;
  if (d.wires.some((x) => x.from.block === blockId || x.to.block === blockId)) return false;
  const input = { block: blockId, port: ports.inputs[0] };
  if (ports.outputs.length === 0) {
    d.wires.push({ id: nextWireId(d), from: { ...w.from }, to: input });
    return true;
  }
  const onward: Wire = { id: nextWireId(d), from: { block: blockId, port: ports.outputs[0] }, to: { ...w.to } };
  w.to = input;
  d.wires.push(onward);
  return true;
}

/** The wire that already drives input `to`, other than one from `from` itself (null: the input is free). */
export function occupyingWire(d: Diagram, from: { block: string; port: string }, to: { block: string; port: string }): Wire | null {
  const w = d.wires.find((x) => x.to.block === to.block && x.to.port === to.port);
  if (!w) return null;
  if (w.from.block === from.block && w.from.port === from.port) return null;
  return w;
}
