import { blockSpec, type Block, type BlockKind, type Diagram } from '@loopwright/graph';
import { InputError } from '@loopwright/lti';

/**
 * The structure of a diagram, resolved once: which output feeds each block input, the probes
 * and the wires. Parameter values are applied per run (build.ts), so a sweep or a slider
 * re-runs without re-reading the document.
 */
export interface CompiledBlock {
  index: number;
  id: string;
  kind: BlockKind;
  block: Block;
  /** Block index feeding each input port, in the order of the kind's input ports. */
  inputs: number[];
  inputPorts: string[];
}

export interface CompiledModel {
  readonly diagram: Diagram;
  readonly blocks: CompiledBlock[];
  readonly byId: ReadonlyMap<string, number>;
  /** Probe block indices. */
  readonly probes: number[];
  /** Wire id → index of the block whose output it carries. */
  readonly wireSource: ReadonlyMap<string, number>;
}

export function compileModel(diagram: Diagram): CompiledModel {
  const byId = new Map<string, number>();
  const blocks: CompiledBlock[] = diagram.blocks.map((block, index) => {
    if (byId.has(block.id)) throw new InputError(`block ${block.id}: the id is used twice`, { field: `blocks.${block.id}` });
    byId.set(block.id, index);
    const spec = blockSpec(block.kind);
    const inputPorts = spec.inputs(block.params ?? {});
    return { index, id: block.id, kind: block.kind, block, inputs: inputPorts.map(() => -1), inputPorts };
  });
  const wireSource = new Map<string, number>();
  for (const w of diagram.wires) {
    const from = byId.get(w.from.block);
    const to = byId.get(w.to.block);
    if (from === undefined) throw new InputError(`wire ${w.id}: unknown source block "${w.from.block}"`, { field: `wires.${w.id}.from` });
    if (to === undefined) throw new InputError(`wire ${w.id}: unknown target block "${w.to.block}"`, { field: `wires.${w.id}.to` });
    const src = blocks[from];
    if (!blockSpec(src.kind).outputs.includes(w.from.port)) {
      throw new InputError(`wire ${w.id}: block ${src.id} has no output "${w.from.port}"`, { field: `wires.${w.id}.from` });
    }
    const dst = blocks[to];
    const port = dst.inputPorts.indexOf(w.to.port);
    if (port < 0) {
      throw new InputError(`wire ${w.id}: block ${dst.id} has no input "${w.to.port}" (inputs: ${dst.inputPorts.join(', ') || 'none'})`, {
        field: `wires.${w.id}.to`,
      });
    }
    if (dst.inputs[port] >= 0)
      throw new InputError(`wire ${w.id}: input ${dst.id}.${w.to.port} already has a wire`, { field: `wires.${w.id}.to` });
    dst.inputs[port] = from;
    wireSource.set(w.id, from);
  }
  for (const b of blocks) {
    b.inputs.forEach((src, i) => {
      if (src < 0) throw new InputError(`block ${b.id}: input ${b.inputPorts[i]} is not connected`, { field: `blocks.${b.id}` });
    });
  }
  const probes = blocks.filter((b) => b.kind === 'probe').map((b) => b.index);
  return { diagram, blocks, byId, probes, wireSource };
}
