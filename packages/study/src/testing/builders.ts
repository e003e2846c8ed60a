/**
 * Diagram builders for the study tests and the agreement test (not part of the public API).
 * Blocks as [id, kind, params]; wires as "a->b", "id:a->b" or "id:a->b.in2" (port "out" to
 * port "in" unless given).
 */
import {
  DIAGRAM_FORMAT,
  DIAGRAM_VERSION,
  type BlockKind,
  type Cut,
  type Diagram,
  type NamedParameter,
  type ParamValue,
  type SimulationSettings,
  type Sweep,
} from '@loopwright/graph';

/** Like graph's test builder, but with ids that may hold "-" (readable scenario ids) and simulation settings. */
export function build(
  blocks: [string, BlockKind, Record<string, ParamValue>?][],
  wires: string[],
  parameters: NamedParameter[] = [],
  extra: { cuts?: Cut[]; sweeps?: Sweep[]; simulation?: SimulationSettings; title?: string } = {},
): Diagram {
  const wireOf = (s: string, i: number) => {
    const m = /^(?:([\w-]+):)?([\w-]+)->([\w-]+)(?:\.(\w+))?$/.exec(s);
    if (!m) throw new Error(`bad wire spec ${s}`);
    return { id: m[1] ?? `w${i + 1}`, from: { block: m[2], port: 'out' }, to: { block: m[3], port: m[4] ?? 'in' } };
  };
  return {
    format: DIAGRAM_FORMAT,
    version: DIAGRAM_VERSION,
    title: extra.title ?? 'study test',
    description: '',
    parameters,
    blocks: blocks.map(([id, kind, params], i) => ({ id, kind, position: { x: 180 * i, y: 0 }, params: params ?? {} })),
    wires: wires.map(wireOf),
    cuts: extra.cuts ?? [],
    sweeps: extra.sweeps ?? [],
    simulation: extra.simulation ?? {},
    view: {},
  };
}

/** r → e(+−) → gain k (parameter K) → plant → y, unity feedback from the plant output; cut "c1" on the feedback wire. */
export function unityLoop(K: number, plant = '1/(s*(s + 2))', extra: { min?: number; max?: number } = {}): Diagram {
  return build(
    [
      ['r', 'source', { shape: 'step', amplitude: 1 }],
      ['e', 'summing-junction', { signs: '+-' }],
      ['k', 'gain', { k: 'K' }],
      ['g', 'transfer-function', { expression: plant }],
      ['y', 'probe'],
    ],
    ['w1:r->e.in1', 'w2:e->k', 'w3:k->g', 'w4:g->y', 'fb:g->e.in2'],
    [{ name: 'K', value: K, min: extra.min ?? 0.1, max: extra.max ?? 10, scale: 'log' }],
    { cuts: [{ id: 'c1', wire: 'fb', label: 'loop' }] },
  );
}
