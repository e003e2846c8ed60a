import { InputError, expressionParameters, relativeDegree, poly } from '@loopwright/lti';
import { blockSpec, isBlockKind } from '../catalogue/index.ts';
import type { Block, Diagram } from '../document-types.ts';
import { fieldParameters, linearFormWithScope, parameterScope, type ParameterOverrides } from '../resolve.ts';
import type { Finding } from './finding.ts';

/**
 * Structural checks: everything about a diagram that can be said without its dynamics —
 * ports and wires, ids, references from wires, cuts, sweeps and the view, named parameters,
 * and each block's parameters (expressions over unknown names, values out of their physical
 * range, improper transfer functions). Never throws for a diagram that validateDiagram
 * accepted; each problem is one finding.
 */
export function checkStructure(d: Diagram, overrides?: ParameterOverrides): Finding[] {
  const out: Finding[] = [];
  const err = (code: string, message: string, more: Partial<Finding> = {}) => out.push({ severity: 'error', code, message, ...more });
  const warn = (code: string, message: string, more: Partial<Finding> = {}) => out.push({ severity: 'warning', code, message, ...more });
  const info = (code: string, message: string, more: Partial<Finding> = {}) => out.push({ severity: 'info', code, message, ...more });

  // --- duplicate ids (each collection has its own namespace) and parameter names
  const dupes = (ids: string[]) => [...new Set(ids.filter((id, i) => ids.indexOf(id) !== i))];
  for (const id of dupes(d.blocks.map((b) => b.id))) err('duplicate-id', `the id "${id}" is used by more than one block`, { blocks: [id] });
  for (const id of dupes(d.wires.map((w) => w.id))) err('duplicate-id', `the id "${id}" is used by more than one wire`, { wires: [id] });
  for (const id of dupes(d.cuts.map((c) => c.id)))
    err('duplicate-id', `cut ${id}: the id is used by more than one cut`, { field: `cuts.${id}` });
  for (const id of dupes(d.sweeps.map((s) => s.id)))
    err('duplicate-id', `sweep ${id}: the id is used by more than one sweep`, { field: `sweeps.${id}` });
  for (const name of dupes(d.parameters.map((p) => p.name))) {
    err('duplicate-parameter', `parameter ${name}: defined more than once`, { field: `parameters.${name}` });
  }

  const blocks = new Map<string, Block>();
  for (const b of d.blocks) if (!blocks.has(b.id)) blocks.set(b.id, b);
  const ports = new Map<string, { inputs: string[]; outputs: string[] }>();
  for (const b of blocks.values()) {
    if (!isBlockKind(b.kind)) {
      err('unknown-kind', `unknown block kind "${b.kind}"`, { blocks: [b.id], field: `blocks.${b.id}.kind` });
      continue;
    }
    const spec = blockSpec(b.kind);
    ports.set(b.id, { inputs: spec.inputs(b.params ?? {}), outputs: spec.outputs });
  }

  // --- wires: ends, ports, directions, one driver per input
  const drivers = new Map<string, string[]>(); // "block\0port" → wire ids
  const drivenOutputs = new Set<string>();
  for (const w of d.wires) {
    let ok = true;
    for (const [end, ref] of [
      ['from', w.from],
      ['to', w.to],
    ] as const) {
      if (!blocks.has(ref.block)) {
        err('dangling-wire', `its ${end === 'from' ? 'start' : 'end'} refers to block "${ref.block}", which does not exist`, {
          wires: [w.id],
          field: `wires.${w.id}.${end}.block`,
        });
        ok = false;
      }
    }
    if (!ok) continue;
    const src = ports.get(w.from.block);
    const dst = ports.get(w.to.block);
    if (src) {
      if (src.outputs.includes(w.from.port)) drivenOutputs.add(`${w.from.block}\0${w.from.port}`);
      else if (src.inputs.includes(w.from.port)) {
        err(
          'wire-from-input',
          `starts at "${w.from.port}" of block ${w.from.block}, which is an input (wires run from an output to an input)`,
          { wires: [w.id], blocks: [w.from.block], field: `wires.${w.id}.from.port` },
        );
      } else {
        err(
          'unknown-port',
          `starts at port "${w.from.port}", which block ${w.from.block} does not have (outputs: ${src.outputs.join(', ') || 'none'})`,
          { wires: [w.id], blocks: [w.from.block], field: `wires.${w.id}.from.port` },
        );
      }
    }
    if (dst) {
      if (dst.inputs.includes(w.to.port)) {
        const key = `${w.to.block}\0${w.to.port}`;
        drivers.set(key, [...(drivers.get(key) ?? []), w.id]);
      } else if (dst.outputs.includes(w.to.port)) {
        err(
          'wire-into-output',
          `ends at "${w.to.port}" of block ${w.to.block}, which is an output (wires run from an output to an input)`,
          { wires: [w.id], blocks: [w.to.block], field: `wires.${w.id}.to.port` },
        );
      } else {
        err(
          'unknown-port',
          `ends at port "${w.to.port}", which block ${w.to.block} does not have (inputs: ${dst.inputs.join(', ') || 'none'})`,
          { wires: [w.id], blocks: [w.to.block], field: `wires.${w.id}.to.port` },
        );
      }
    }
  }
  for (const [key, ws] of drivers) {
    if (ws.length > 1) {
      const [block, port] = key.split('\0');
      err(
        'multiple-drivers',
        `input "${port}" is driven by ${ws.length} wires (${ws.join(', ')}); add a summing junction to combine signals`,
        { blocks: [block], wires: ws, field: `blocks.${block}.inputs.${port}` },
      );
    }
  }
  for (const [id, p] of ports) {
    const unconnected = p.inputs.filter((port) => !drivers.has(`${id}\0${port}`));
    if (unconnected.length) {
      const list = unconnected.map((q) => `"${q}"`).join(', ');
      warn('unconnected-input', `${unconnected.length === 1 ? 'input' : 'inputs'} ${list} not connected (taken as 0)`, { blocks: [id] });
    }
    for (const port of p.outputs) {
      if (drivenOutputs.has(`${id}\0${port}`)) continue;
      const kind = blocks.get(id)!.kind;
      if (kind === 'source') warn('unconnected-output', 'the source drives nothing', { blocks: [id] });
      else info('unconnected-output', `output "${port}" goes nowhere`, { blocks: [id] });
    }
  }

  // --- cuts, sweeps, view
  const wireIds = new Set(d.wires.map((w) => w.id));
  const cutWires = new Map<string, string>();
  for (const c of d.cuts) {
    if (!wireIds.has(c.wire))
      err('dangling-cut', `cut ${c.id}: refers to wire "${c.wire}", which does not exist`, { field: `cuts.${c.id}.wire` });
    else if (cutWires.has(c.wire))
      warn('duplicate-cut', `cut ${c.id}: wire ${c.wire} is already cut by ${cutWires.get(c.wire)}`, {
        wires: [c.wire],
        field: `cuts.${c.id}.wire`,
      });
    else cutWires.set(c.wire, c.id);
  }
  const paramNames = new Set(d.parameters.map((p) => p.name));
  for (const s of d.sweeps) {
    if (!paramNames.has(s.parameter))
      err('dangling-sweep', `sweep ${s.id}: varies "${s.parameter}", which is not a named parameter`, {
        field: `sweeps.${s.id}.parameter`,
      });
    if (!(s.min < s.max)) err('sweep-range', `sweep ${s.id}: min (${s.min}) must be below max (${s.max})`, { field: `sweeps.${s.id}.min` });
    if (s.scale === 'log' && !(s.min > 0))
      err('sweep-range', `sweep ${s.id}: a log scale needs min > 0, got ${s.min}`, { field: `sweeps.${s.id}.min` });
  }
  const v = d.view ?? {};
  if (v.activeCut !== undefined && !d.cuts.some((c) => c.id === v.activeCut))
    warn('dangling-view', `view: the shown cut "${v.activeCut}" does not exist`, { field: 'view.activeCut' });
  if (v.activeSweep !== undefined && !d.sweeps.some((s) => s.id === v.activeSweep))
    warn('dangling-view', `view: the shown sweep "${v.activeSweep}" does not exist`, { field: 'view.activeSweep' });
  if (v.activeProbe !== undefined && blocks.get(v.activeProbe)?.kind !== 'probe')
    warn('dangling-view', `view: the shown probe "${v.activeProbe}" is not a probe block of this diagram`, { field: 'view.activeProbe' });
  for (const id of d.simulation?.probes ?? []) {
    if (blocks.get(id)?.kind !== 'probe')
      warn('dangling-simulation-probe', `simulation: the shown probe "${id}" is not a probe block of this diagram`, {
        field: 'simulation.probes',
      });
  }
  const fitted = new Set<string>();
  for (const f of d.fits ?? []) {
    if (!blocks.has(f.block))
      warn('dangling-fit', `fits: the record of a fitted model names block "${f.block}", which does not exist`, {
        field: `fits.${f.block}`,
      });
    else if (fitted.has(f.block))
      warn('duplicate-fit', `fits: block ${f.block} has more than one fit record (the last one describes its model)`, {
        blocks: [f.block],
        field: `fits.${f.block}`,
      });
    fitted.add(f.block);
  }

  // --- named parameters
  for (const p of d.parameters) {
    const field = `parameters.${p.name}`;
    if (p.min !== undefined && p.max !== undefined && !(p.min < p.max))
      err('parameter-range', `parameter ${p.name}: slider min (${p.min}) must be below max (${p.max})`, { field });
    else if ((p.min !== undefined && p.value < p.min) || (p.max !== undefined && p.value > p.max)) {
      warn(
        'parameter-out-of-range',
        `parameter ${p.name}: value ${p.value} lies outside its slider range [${p.min ?? '−∞'}, ${p.max ?? '∞'}]`,
        { field },
      );
    }
    if (p.scale === 'log' && p.min !== undefined && !(p.min > 0))
      err('parameter-range', `parameter ${p.name}: a log slider needs min > 0, got ${p.min}`, { field });
  }

  // --- block parameters: expressions over known names, resolvable values, proper forms
  const known = new Set([...paramNames, ...Object.keys(overrides ?? {})]);
  const used = new Set<string>();
  let scope: Record<string, number> | null = null;
  try {
    scope = parameterScope(d, overrides);
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    err('invalid-override', e.message);
  }
  for (const b of blocks.values()) {
    if (!isBlockKind(b.kind)) continue;
    const spec = blockSpec(b.kind);
    let fieldProblem = false;
    for (const ps of spec.params) {
      const raw = b.params?.[ps.name];
      if (typeof raw !== 'string' || raw.trim() === '' || (ps.type !== 'number' && ps.type !== 'expression')) continue;
      const field = `blocks.${b.id}.params.${ps.name}`;
      let names: string[];
      try {
        names = fieldParameters(raw, expressionParameters);
      } catch (e) {
        if (!(e instanceof InputError)) throw e;
        err('invalid-expression', `field ${ps.name}: "${raw}": ${e.message}`, { blocks: [b.id], field });
        fieldProblem = true;
        continue;
      }
      for (const n of names) used.add(n);
      const unknown = names.filter((n) => !known.has(n));
      if (unknown.length) {
        const list = unknown.map((n) => `"${n}"`).join(', ');
        err(
          'unknown-parameter',
          `field ${ps.name}: "${raw}" uses ${list}, not ${unknown.length === 1 ? 'a named parameter' : 'named parameters'}`,
          { blocks: [b.id], field },
        );
        fieldProblem = true;
      }
    }
    if (fieldProblem || !scope) continue;
    try {
      const f = linearFormWithScope(b, scope);
      if (f.type === 'transfer') {
        const rd = relativeDegree(f.tf.rational);
        if (rd < 0) {
          const nd = poly.degree(f.tf.rational.num);
          const dd = poly.degree(f.tf.rational.den);
          err(
            'improper-block',
            `the transfer function is improper (numerator degree ${nd} > denominator degree ${dd}): it cannot be simulated or realised; add poles (e.g. a filter)`,
            { blocks: [b.id], field: `blocks.${b.id}.params.expression` },
          );
        }
      }
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      const field = e.details.field;
      const msg = e.message.replace(new RegExp(`^block ${escapeRe(b.id)} `), '');
      err('invalid-parameter', msg, { blocks: [b.id], ...(field ? { field } : {}) });
    }
  }
  for (const p of d.parameters) {
    if (!used.has(p.name) && !d.sweeps.some((s) => s.parameter === p.name)) {
      info('unused-parameter', `parameter ${p.name}: no block uses it`, { field: `parameters.${p.name}` });
    }
  }
  for (const s of d.sweeps) {
    if (paramNames.has(s.parameter) && !used.has(s.parameter))
      warn('unused-sweep-parameter', `sweep ${s.id}: no block uses "${s.parameter}", so the sweep changes nothing`, {
        field: `sweeps.${s.id}.parameter`,
      });
  }

  // --- what analysis needs
  if (d.blocks.length > 0 && !d.blocks.some((b) => b.kind === 'source'))
    info('no-source', 'the diagram has no source (nothing to inject a signal for responses)');
  if (d.blocks.length > 0 && !d.blocks.some((b) => b.kind === 'probe'))
    info('no-probe', 'the diagram has no probe (nothing is recorded in simulation)');
  return out;
}

const escapeRe = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
