/**
 * Sweep targets: which quantity the sweep moves. A target is a named parameter of the diagram
 * or the numeric k of a gain block. The engine only varies named parameters, so a gain-block
 * target is expressed by rewriting that block's k into a synthetic named parameter holding the
 * same value (`engineDiagram`); the document itself is never changed by the rewrite.
 */
import { InputError } from '@loopwright/lti';
import { sweepRange, type Diagram } from '@loopwright/graph';
import type { LiveValue, SweepChoice, SweepRange, SweepTarget } from './types.ts';

export const targetKey = (t: SweepTarget): string => (t.kind === 'parameter' ? `param:${t.name}` : `block:${t.block}.${t.field}`);

/** Parses a target key; on the command line a bare parameter name is accepted too. */
export function parseTargetKey(key: string): SweepTarget | null {
  if (key.startsWith('param:')) return { kind: 'parameter', name: key.slice(6) };
  const m = /^block:(.+)\.k$/.exec(key);
  if (m) return { kind: 'block', block: m[1], field: 'k' };
  return /^[A-Za-z_][A-Za-z0-9_]*$/.test(key) ? { kind: 'parameter', name: key } : null;
}

/** The name the engine varies for a target (a gain block gets a synthetic parameter name). */
export function engineParameterName(t: SweepTarget): string {
  return t.kind === 'parameter' ? t.name : `sweep_${t.block.replace(/[^A-Za-z0-9_]/g, '_')}_k`;
}

/** The target's value in the document (NaN when it no longer exists or is not a number). */
export function documentValue(d: Diagram, t: SweepTarget): number {
  if (t.kind === 'parameter') return d.parameters.find((p) => p.name === t.name)?.value ?? Number.NaN;
  const k = d.blocks.find((b) => b.id === t.block && b.kind === 'gain')?.params.k;
  return typeof k === 'number' ? k : Number.NaN;
}

/**
 * The diagram the engine analyses for a target: unchanged for a named parameter; for a gain
 * block, its k becomes a synthetic named parameter holding the same value.
 */
export function engineDiagram(d: Diagram, t: SweepTarget): Diagram {
  if (t.kind === 'parameter') return d;
  const name = engineParameterName(t);
  const value = documentValue(d, t);
  if (!Number.isFinite(value)) return d;
  return {
    ...d,
    parameters: [...d.parameters.filter((p) => p.name !== name), { name, value }],
    blocks: d.blocks.map((b) => (b.id === t.block ? { ...b, params: { ...b.params, k: name } } : b)),
  };
}

/** Checks that a target exists in the diagram; an InputError names it otherwise. */
export function checkTarget(d: Diagram, t: SweepTarget): void {
  if (t.kind === 'parameter') {
    if (!d.parameters.some((p) => p.name === t.name)) {
      const known = d.parameters.map((p) => p.name).join(', ') || 'none';
      throw new InputError(`sweep: "${t.name}" is not a named parameter of the diagram (known: ${known})`, { field: 'sweep' });
    }
    return;
  }
  const b = d.blocks.find((x) => x.id === t.block);
  if (!b || b.kind !== 'gain') throw new InputError(`sweep: "${t.block}" is not a gain block of the diagram`, { field: 'sweep' });
  if (!Number.isFinite(documentValue(d, t))) {
    throw new InputError(
      `sweep: gain block ${t.block} has k = "${String(b.params.k)}", not a number; sweep the parameter it uses instead`,
      { field: `blocks.${t.block}.params.k` },
    );
  }
}

/** The engine diagram and the overrides for a live value (a held slider value of any target). */
export function withLiveValue(
  d: Diagram,
  overrides: Record<string, number>,
  live: LiveValue | null | undefined,
): { diagram: Diagram; overrides: Record<string, number> } {
  if (!live) return { diagram: d, overrides };
  return { diagram: engineDiagram(d, live.target), overrides: { ...overrides, [engineParameterName(live.target)]: live.value } };
}

/** The range of a target: the diagram's sweep of it, its slider range, else a decade either side (graph's rule). */
export function targetRange(d: Diagram, t: SweepTarget): SweepRange {
  const value = documentValue(d, t);
  return sweepRange(engineDiagram(d, t), engineParameterName(t), Number.isFinite(value) ? value : 1);
}

/** Every quantity the sweep can move: named parameters, then gain blocks with a numeric k. */
export function sweepChoices(d: Diagram): SweepChoice[] {
  const out: SweepChoice[] = [];
  for (const p of d.parameters) {
    const target: SweepTarget = { kind: 'parameter', name: p.name };
    out.push({
      key: targetKey(target),
      target,
      label: p.unit ? `${p.name} [${p.unit}]` : p.name,
      value: p.value,
      range: targetRange(d, target),
    });
  }
  for (const b of d.blocks) {
    if (b.kind !== 'gain') continue;
    const k = b.params.k;
    if (typeof k !== 'number' || !Number.isFinite(k)) continue;
    const target: SweepTarget = { kind: 'block', block: b.id, field: 'k' };
    out.push({ key: targetKey(target), target, label: `${b.label ?? b.id} · k`, value: k, range: targetRange(d, target) });
  }
  return out;
}

/** The sweep the diagram asks for first: view.activeSweep, then its first sweep, then the first choice. */
export function preferredChoice(d: Diagram, choices: SweepChoice[] = sweepChoices(d)): SweepChoice | null {
  const active = d.sweeps.find((s) => s.id === d.view.activeSweep) ?? d.sweeps[0];
  if (active) {
    const c = choices.find((x) => x.target.kind === 'parameter' && x.target.name === active.parameter);
    if (c) return c;
  }
  return choices[0] ?? null;
}

export interface SweepSelection {
  /** Target key chosen in the UI (null: the diagram's preferred one). */
  key: string | null;
  /** The live slider value (null: the document's value). */
  liveValue: number | null;
  /** Range edits not (yet) in the document, by target key. */
  ranges?: Record<string, SweepRange>;
}

export interface ResolvedSweep {
  choices: SweepChoice[];
  choice: SweepChoice | null;
  range: SweepRange | null;
  /** The value in force: the live one, else the document's. */
  value: number;
  /** Non-null when a value is held for the target (the live slider value, or the document's). */
  live: LiveValue | null;
}

/** The value in force for a swept quantity: the live slider value, else the document's. */
export function valueInForce(choice: SweepChoice, liveValue: number | null): number {
  return liveValue ?? choice.value;
}

/** Which sweep is in force for a UI selection: one answer for the sweep bar, the views and the requests. */
export function resolveSweep(d: Diagram, sel: SweepSelection): ResolvedSweep {
  const choices = sweepChoices(d);
  const choice = choices.find((c) => c.key === sel.key) ?? preferredChoice(d, choices);
  if (!choice) return { choices, choice: null, range: null, value: Number.NaN, live: null };
  const range = sel.ranges?.[choice.key] ?? choice.range;
  const value = valueInForce(choice, sel.liveValue);
  return { choices, choice, range, value, live: Number.isFinite(value) ? { target: choice.target, value } : null };
}
