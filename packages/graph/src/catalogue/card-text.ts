/**
 * Pieces of the card texts (BlockSpec.card): a stored field as a factor of a formula, or as a
 * figure in a caption. Numbers are written as the Parameters panel shows them (engineering
 * notation, 4 significant digits, "50e-6"); expressions stay as typed.
 */
import { formatEngineering } from '@loopwright/lti';
import type { StoredParams } from './types.ts';

const NAME = /^[A-Za-z_][A-Za-z0-9_]*$/;
const NUMBER = /^(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** A field as a factor in a formula text: numbers compact, names bare, other expressions bracketed; null when blank. */
export function term(v: unknown): string | null {
  if (typeof v === 'number') return Number.isFinite(v) ? formatEngineering(v) : null;
  if (typeof v !== 'string') return null;
  const t = v.trim();
  if (t === '') return null;
  if (NAME.test(t) || NUMBER.test(t)) return t;
  return `(${t})`;
}

/** Is the factor absent or a plain zero? */
export const isZero = (t: string | null): boolean => t === null || (Number.isFinite(Number(t)) && Number(t) === 0);

/** `k*rest`, or `rest` alone when k is absent or a plain 1. */
export function times(k: string | null, rest: string): string {
  const one = k !== null && Number(k) === 1 && /^[\d.]+$/.test(k);
  return k === null || one ? rest : `${k}*${rest}`;
}

/** A field as a figure in a caption: numbers compact, texts as typed, blank as "—". */
export function show(v: unknown): string {
  if (typeof v === 'number') return formatEngineering(v);
  if (typeof v === 'string' && v.trim() !== '') return v;
  return '—';
}

/** A field that may be left blank for "none" (an open limit). */
export const isBlank = (p: StoredParams, name: string): boolean => {
  const v = p[name];
  return v === undefined || (typeof v === 'string' && v.trim() === '');
};
