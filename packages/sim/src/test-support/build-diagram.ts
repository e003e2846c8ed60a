import { DIAGRAM_FORMAT, DIAGRAM_VERSION, type BlockKind, type Diagram, type NamedParameter, type ParamValue } from '@loopwright/graph';

/**
 * A compact way for tests and benches to write diagrams:
 * blocks as [id, kind, params], wires as "from -> to" or "from -> to.in2".
 */
export function buildDiagram(
  blocks: [string, BlockKind, Record<string, ParamValue>?][],
  wires: string[],
  parameters: NamedParameter[] = [],
): Diagram {
  return {
    format: DIAGRAM_FORMAT,
    version: DIAGRAM_VERSION,
    title: 'test',
    description: '',
    parameters,
    blocks: blocks.map(([id, kind, params], i) => ({ id, kind, position: { x: i * 100, y: 0 }, params: params ?? {} })),
    wires: wires.map((w, i) => {
      const [from, to] = w.split('->').map((s) => s.trim());
      const [toBlock, toPort] = to.split('.');
      return { id: `w${i + 1}`, from: { block: from, port: 'out' }, to: { block: toBlock, port: toPort ?? 'in' } };
    }),
    cuts: [],
    sweeps: [],
    view: {},
  };
}
