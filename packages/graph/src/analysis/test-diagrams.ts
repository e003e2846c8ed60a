import {
  DIAGRAM_FORMAT,
  DIAGRAM_VERSION,
  type Block,
  type BlockKind,
  type Diagram,
  type NamedParameter,
  type ParamValue,
} from '../document-types.ts';

/**
 * Compact diagram builder for tests and benches: blocks as [id, kind, params], wires as
 * "a->b" or "id:a->b.in2" (output port "out", input port "in" unless given).
 */
export function diagramOf(
  blocks: [string, BlockKind, Record<string, ParamValue>?][],
  wireSpecs: string[],
  parameters: NamedParameter[] = [],
  extra: Partial<Pick<Diagram, 'cuts' | 'sweeps' | 'title'>> = {},
): Diagram {
  const bs: Block[] = blocks.map(([id, kind, params], i) => ({ id, kind, position: { x: 120 * i, y: 0 }, params: params ?? {} }));
  const wires = wireSpecs.map((s, i) => {
    const m = /^(?:(\w+):)?(\w+)->(\w+)(?:\.(\w+))?$/.exec(s);
    if (!m) throw new Error(`bad wire spec ${s}`);
    return { id: m[1] ?? `w${i + 1}`, from: { block: m[2], port: 'out' }, to: { block: m[3], port: m[4] ?? 'in' } };
  });
  return {
    format: DIAGRAM_FORMAT,
    version: DIAGRAM_VERSION,
    title: extra.title ?? 'test diagram',
    description: '',
    parameters,
    blocks: bs,
    wires,
    cuts: extra.cuts ?? [],
    sweeps: extra.sweeps ?? [],
    view: {},
  };
}

/**
 * A three-loop positioning axis (current, speed, position), invented for tests:
 * current PI 2(1 + 1/(0.002 s)) on a winding 1/(0.002 s + 1) (≈ 1000 rad/s current loop),
 * torque constant and inertia 1000/s, speed PI Kv(1 + 1/(0.02 s)), position gain Kpos, 1/s.
 */
export function threeLoopAxis(kpos = 40, kv = 0.2): Diagram {
  return diagramOf(
    [
      ['ref', 'source'],
      ['ePos', 'summing-junction', { signs: '+-' }],
      ['Cpos', 'gain', { k: 'Kpos' }],
      ['eVel', 'summing-junction', { signs: '+-' }],
      ['Cvel', 'pid', { kp: 'Kv', ti: 0.02, td: 0 }],
      ['eCur', 'summing-junction', { signs: '+-' }],
      ['Ccur', 'pid', { kp: 2, ti: 0.002, td: 0 }],
      ['winding', 'first-order-lag', { k: 1, tau: 0.002 }],
      ['mech', 'integrator', { k: 1000 }],
      ['axis', 'integrator', { k: 1 }],
      ['pos', 'probe'],
    ],
    [
      'ref->ePos.in1',
      'ePos->Cpos',
      'Cpos->eVel.in1',
      'eVel->Cvel',
      'Cvel->eCur.in1',
      'eCur->Ccur',
      'Ccur->winding',
      'fbCur:winding->eCur.in2',
      'winding->mech',
      'fbVel:mech->eVel.in2',
      'mech->axis',
      'fbPos:axis->ePos.in2',
      'axis->pos',
    ],
    [
      { name: 'Kpos', value: kpos, min: 1, max: 400, scale: 'log' },
      { name: 'Kv', value: kv, min: 0.01, max: 2, scale: 'log' },
    ],
    {
      cuts: [
        { id: 'current', wire: 'fbCur', label: 'current loop' },
        { id: 'speed', wire: 'fbVel', label: 'speed loop' },
        { id: 'position', wire: 'fbPos', label: 'position loop' },
      ],
      sweeps: [{ id: 'sweepKpos', parameter: 'Kpos', min: 1, max: 400, scale: 'log' }],
    },
  );
}
