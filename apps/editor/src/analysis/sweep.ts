/**
 * The sweep: which quantity the slider moves and how slider positions map to values.
 * A sweep target is a named parameter of the diagram, or the numeric value of a gain block.
 * The engine only sweeps named parameters, so a gain-block target is expressed by rewriting
 * the block's k into a synthetic named parameter (`asSweepDiagram`); the document itself is
 * never changed by that rewrite.
 */
import type { Diagram, NamedParameter } from '@loopwright/graph';

export type SweepTarget =
  | { kind: 'parameter'; name: string }
  | { kind: 'block'; block: string; field: 'k' };

export interface SweepRange {
  min: number;
  max: number;
  scale: 'linear' | 'log';
}

export interface SweepChoice {
  key: string;
  target: SweepTarget;
  label: string;
  value: number;
  range: SweepRange;
}

export const targetKey = (t: SweepTarget): string =>
  t.kind === 'parameter' ? `param:${t.name}` : `block:${t.block}.${t.field}`;

export function parseTargetKey(key: string): SweepTarget | null {
  if (key.startsWith('param:')) return { kind: 'parameter', name: key.slice(6) };
  const m = /^block:(.+)\.k$/.exec(key);
  return m ? { kind: 'block', block: m[1], field: 'k' } : null;
}

/** The name the engine sees for a target (a gain block gets a synthetic parameter name). */
export function engineParameterName(t: SweepTarget): string {
  return t.kind === 'parameter' ? t.name : `sweep_${t.block.replace(/[^A-Za-z0-9_]/g, '_')}_k`;
}

/** A default slider range around a value: a decade either side (log) when positive. */
export function defaultRange(value: number): SweepRange {
  if (value > 0 && Number.isFinite(value)) return { min: value / 10, max: value * 10, scale: 'log' };
  if (value < 0 && Number.isFinite(value)) return { min: value * 10, max: value / 10, scale: 'log' };
  return { min: -1, max: 1, scale: 'linear' };
}

function parameterRange(d: Diagram, p: NamedParameter): SweepRange {
  const sweep = d.sweeps.find((s) => s.parameter === p.name);
  if (sweep && sweep.max > sweep.min) return { min: sweep.min, max: sweep.max, scale: sweep.scale };
  if (p.min !== undefined && p.max !== undefined && p.max > p.min) {
    return { min: p.min, max: p.max, scale: p.scale ?? (p.min > 0 ? 'log' : 'linear') };
  }
  return defaultRange(p.value);
}

/** Every quantity the sweep can move: named parameters, then gain blocks with a numeric k. */
export function sweepChoices(d: Diagram): SweepChoice[] {
  const out: SweepChoice[] = [];
  for (const p of d.parameters) {
    const target: SweepTarget = { kind: 'parameter', name: p.name };
    out.push({ key: targetKey(target), target, label: p.unit ? `${p.name} [${p.unit}]` : p.name, value: p.value, range: parameterRange(d, p) });
  }
  for (const b of d.blocks) {
    if (b.kind !== 'gain') continue;
    const k = b.params.k;
    if (typeof k !== 'number' || !Number.isFinite(k)) continue;
    const target: SweepTarget = { kind: 'block', block: b.id, field: 'k' };
    out.push({ key: targetKey(target), target, label: `${b.label ?? b.id} · k`, value: k, range: defaultRange(k) });
  }
  return out;
}

/** The target's value in the document (NaN when it no longer exists). */
export function documentValue(d: Diagram, t: SweepTarget): number {
  if (t.kind === 'parameter') return d.parameters.find((p) => p.name === t.name)?.value ?? Number.NaN;
  const k = d.blocks.find((b) => b.id === t.block)?.params.k;
  return typeof k === 'number' ? k : Number.NaN;
}

/** The sweep the diagram asks for first (view.activeSweep, then its first sweep, then its first parameter). */
export function preferredChoice(d: Diagram, choices: SweepChoice[]): SweepChoice | null {
  const active = d.sweeps.find((s) => s.id === d.view.activeSweep) ?? d.sweeps[0];
  if (active) {
    const c = choices.find((x) => x.target.kind === 'parameter' && x.target.name === active.parameter);
    if (c) return c;
  }
  return choices[0] ?? null;
}

/**
 * The diagram the engine analyses for a target: unchanged for a named parameter; for a gain
 * block, its k becomes a synthetic named parameter holding the same value.
 */
export function asSweepDiagram(d: Diagram, t: SweepTarget): Diagram {
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

const clamp01 = (x: number) => (x < 0 ? 0 : x > 1 ? 1 : x);
const logOk = (r: SweepRange) => r.scale === 'log' && r.min * r.max > 0;

/** Slider position in [0, 1] → value. A log range with a sign change falls back to linear. */
export function positionToValue(r: SweepRange, pos: number): number {
  const p = clamp01(pos);
  if (logOk(r)) {
    const sign = r.min < 0 ? -1 : 1;
    const a = Math.log(Math.abs(r.min));
    const b = Math.log(Math.abs(r.max));
    return sign * Math.exp(a + p * (b - a));
  }
  return r.min + p * (r.max - r.min);
}

/** Value → slider position in [0, 1] (clamped). */
export function valueToPosition(r: SweepRange, v: number): number {
  if (!Number.isFinite(v) || r.max === r.min) return 0;
  if (logOk(r)) {
    if (v * r.min <= 0) return 0;
    const a = Math.log(Math.abs(r.min));
    const b = Math.log(Math.abs(r.max));
    return clamp01((Math.log(Math.abs(v)) - a) / (b - a));
  }
  return clamp01((v - r.min) / (r.max - r.min));
}

/** Number formatting for readouts: 4 significant digits, exponent form outside 1e-3..1e5. */
export function fmt(v: number | null | undefined, digits = 4): string {
  if (v === null || v === undefined || Number.isNaN(v)) return '—';
  if (v === Infinity) return '∞';
  if (v === -Infinity) return '−∞';
  const a = Math.abs(v);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) return v.toExponential(digits - 1);
  return String(Number(v.toPrecision(digits)));
}
