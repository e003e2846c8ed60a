/**
 * The controller of a loop: which block a cut's tuning sets, what it holds today, and the
 * document edit that writes a suggested setting into it.
 *
 * How the controller of a cut is found: the blocks on the loop through the cut wire are those on
 * its simple cycles (loopBlocks). Walking forward from the wire's end along that loop, breadth
 * first in wire order, the first PID block met is the controller: a feedback wire enters the
 * loop's summing junction, whose error signal reaches its own controller before any other. The
 * walk does not pass another summing junction: there an inner loop (or a feedforward) enters,
 * and the controller of this loop sits before it — in a cascade the outer loop also runs
 * through the inner controller, behind the inner junction. A loop without a PID block there
 * (e.g. a gain as a P controller) has no controller to set, and the tuning says so.
 */
import { InputError, expressionParameters } from '@loopwright/lti';
import { fieldParameters, resolveParams, type Block, type Diagram, type ParamValue } from '@loopwright/graph';
import { type ControllerSetting, DEFAULT_DERIVATIVE_FILTER, controllerSetting } from '@loopwright/tune';

/**
 * Ids of the blocks on the loops through a wire: on some simple cycle through it, i.e. on a
 * simple path from where the wire ends back to where it starts (a walk that passes a block twice
 * belongs to another loop: in a cascade, the outer loop's way back into the inner junction).
 * Empty when no loop passes through the wire. Diagrams are small; the path search is capped.
 */
export function loopBlocks(d: Diagram, wireId: string): Set<string> {
  const wire = d.wires.find((w) => w.id === wireId);
  if (!wire) throw new InputError(`the diagram has no wire "${wireId}"`, { field: 'wire' });
  const next = new Map<string, string[]>();
  for (const w of d.wires) if (w.id !== wireId) next.set(w.from.block, [...(next.get(w.from.block) ?? []), w.to.block]);
  const out = new Set<string>();
  const path: string[] = [];
  const onPath = new Set<string>();
  let budget = 200_000;
  const visit = (id: string) => {
    if (--budget < 0) throw new InputError(`wire ${wireId}: the diagram has too many paths to search for its loop`, { field: 'wire' });
    path.push(id);
    onPath.add(id);
    if (id === wire.from.block) for (const x of path) out.add(x);
    else for (const n of next.get(id) ?? []) if (!onPath.has(n)) visit(n);
    path.pop();
    onPath.delete(id);
  };
  visit(wire.to.block);
  return out;
}

/** The controller block of the loop through a cut wire (see the file comment); InputError when there is none. */
export function controllerOfCut(d: Diagram, wireId: string, cutName: string): Block {
  const onLoop = loopBlocks(d, wireId);
  if (onLoop.size === 0) throw new InputError(`cut ${cutName}: no feedback loop passes through wire ${wireId}`, { field: 'cut' });
  const wire = d.wires.find((w) => w.id === wireId)!;
  const passed: string[] = [];
  const seen = new Set<string>([wire.to.block]);
  const queue = [wire.to.block];
  while (queue.length) {
    const id = queue.shift()!;
    const b = d.blocks.find((x) => x.id === id);
    if (b?.kind === 'pid') return b;
    // Another summing junction on the way is where an inner loop (or a feedforward) enters:
    // the controller of this loop sits before it.
    if (b && id !== wire.to.block && b.kind === 'summing-junction') continue;
    if (b && id !== wire.to.block) passed.push(id);
    for (const w of d.wires) {
      if (w.id === wireId || w.from.block !== id || !onLoop.has(w.to.block) || seen.has(w.to.block)) continue;
      seen.add(w.to.block);
      queue.push(w.to.block);
    }
  }
  const between = passed.length ? ` (between its junction and the next one: ${passed.join(', ')})` : '';
  throw new InputError(
    `cut ${cutName}: the loop through wire ${wireId} has no PID controller block${between}; ` +
      'the tuner writes kp, ti and td into a PID block: make the controller a PID block, or tune a model expression instead',
    { field: 'cut' },
  );
}

/** A block of the diagram that must be a PID block (a controller named by the caller). */
export function pidBlock(d: Diagram, id: string): Block {
  const b = d.blocks.find((x) => x.id === id);
  if (!b) throw new InputError(`block ${id}: the diagram has no such block`, { field: 'block' });
  if (b.kind !== 'pid')
    throw new InputError(`block ${id}: a ${b.kind} block is no PID controller; the tuner sets a PID block's kp, ti and td`, {
      field: 'block',
    });
  return b;
}

/** What a PID block holds today, in the ideal form (a parallel block converted), and its derivative filter n. */
export function currentSetting(d: Diagram, b: Block, overrides: Record<string, number> = {}): { setting: ControllerSetting; n: number } {
  const p = resolveParams(d, b, overrides);
  const n = typeof p.n === 'number' && p.n > 0 ? p.n : DEFAULT_DERIVATIVE_FILTER;
  const num = (k: string) => (typeof p[k] === 'number' ? (p[k] as number) : Number.NaN);
  const kp = num('kp');
  let ti: number | null;
  let td: number;
  if (p.form === 'parallel') {
    const ki = num('ki');
    const kd = num('kd');
    ti = ki !== 0 && kp !== 0 ? kp / ki : null;
    td = kp !== 0 ? kd / kp : 0;
  } else {
    ti = Number.isFinite(num('ti')) ? num('ti') : null;
    td = num('td');
  }
  const kind = td > 0 ? 'pid' : ti === null ? 'p' : 'pi';
  return { setting: controllerSetting(kind, kp, ti !== null && ti > 0 ? ti : null, td > 0 ? td : 0), n };
}

/**
 * The block's parameters for a setting written with plain numbers (ideal form, no limits, no
 * anti-windup): the controller of the loop-form responses, and the P-only variants of readings.
 */
export function settingParams(s: ControllerSetting, n: number): Record<string, ParamValue> {
  return { form: 'ideal', kp: s.kp, ti: s.ti === null ? '' : s.ti, td: s.td, n, umin: '', umax: '', antiWindup: 'off' };
}

/** The diagram with a block's parameters replaced (the document itself is not touched). */
export function withBlockParams(d: Diagram, id: string, patch: Record<string, ParamValue>): Diagram {
  return { ...d, blocks: d.blocks.map((b) => (b.id === id ? { ...b, params: { ...b.params, ...patch } } : b)) };
}

/**
 * The edit that puts a setting into a PID block, as plain data: the block fields to write, the
 * named parameters whose values change, slider ranges widened to hold the new values, and what
 * was done in words. A field holding just the name of a parameter that no other field uses
 * keeps its name and the parameter gets the value (sliders and sweeps keep working); any other
 * expression is replaced by the number. A parallel-form block is switched to the ideal form.
 * Limits, anti-windup and tracking time are left as they are.
 */
export interface ControllerPatch {
  block: string;
  params: Record<string, ParamValue>;
  parameters: Record<string, number>;
  ranges: Record<string, { min?: number; max?: number }>;
  notes: string[];
}

export function controllerPatch(d: Diagram, blockId: string, s: ControllerSetting, n: number): ControllerPatch {
  const b = pidBlock(d, blockId);
  const patch: ControllerPatch = { block: blockId, params: {}, parameters: {}, ranges: {}, notes: [] };
  if (b.params.form === 'parallel') {
    patch.params.form = 'ideal';
    patch.notes.push(`block ${blockId} was in the parallel form: it is switched to the ideal form kp·(1 + 1/(ti·s) + td·s/(1 + td·s/n))`);
  }
  const uses = (name: string) => {
    let count = 0;
    for (const x of d.blocks) {
      for (const v of Object.values(x.params)) {
        if (typeof v !== 'string' || v.trim() === '') continue;
        try {
          if (fieldParameters(v, expressionParameters).includes(name)) count++;
        } catch {
          // an unreadable field uses nothing we can see
        }
      }
    }
    return count;
  };
  const write = (field: 'kp' | 'ti' | 'td' | 'n', value: number | null) => {
    const raw = b.params[field];
    if (raw === (value === null ? '' : value) && b.params.form !== 'parallel') return;
    const name = typeof raw === 'string' ? raw.trim() : '';
    const param = d.parameters.find((p) => p.name === name);
    if (value !== null && param && uses(name) === 1) {
      patch.parameters[name] = value;
      const range: { min?: number; max?: number } = {};
      const log = param.scale === 'log' && value > 0;
      if (param.min !== undefined && value < param.min) range.min = log ? value / 2 : value - 0.1 * Math.abs(value || 1);
      if (param.max !== undefined && value > param.max) range.max = log ? value * 2 : value + 0.1 * Math.abs(value || 1);
      if (range.min !== undefined || range.max !== undefined) {
        patch.ranges[name] = range;
        patch.notes.push(`parameter ${name}: its slider range is widened to hold ${value}`);
      }
      return;
    }
    if (param && uses(name) > 1)
      patch.notes.push(`field ${field} held "${name}", which other fields use too: the number is written into the field instead`);
    patch.params[field] = value === null ? '' : value;
  };
  write('kp', s.kp);
  write('ti', s.ti);
  write('td', s.td);
  if (b.params.n !== n) write('n', n);
  return patch;
}

/** The diagram with a controller patch applied (a new object; the input is not changed). */
export function applyControllerPatch(d: Diagram, patch: ControllerPatch): Diagram {
  return {
    ...withBlockParams(d, patch.block, patch.params),
    parameters: d.parameters.map((p) => {
      if (!(p.name in patch.parameters)) return p;
      return { ...p, value: patch.parameters[p.name], ...patch.ranges[p.name] };
    }),
  };
}
