/**
 * Result parts and how a thrown error becomes one. Input errors (the engine's InputError,
 * recognised by its `inputError` flag) and budget errors (`budget` flag: an analysis ran past
 * its time or size cap) are the user's to act on; anything else is a bug and says so.
 */
import type { Part } from './types.ts';

export type FailedPart = Extract<Part<never>, { ok: false }>;

export const isInputError = (e: unknown): boolean => e instanceof Error && (e as { inputError?: boolean }).inputError === true;
export const isBudgetError = (e: unknown): boolean => e instanceof Error && (e as { budget?: boolean }).budget === true;

/** Where an error points: a field path, a character position, or null. */
export function errorAt(e: unknown): string | null {
  const d = (e as { details?: { field?: string; position?: number } } | null)?.details;
  if (d?.field) return d.field;
  if (typeof d?.position === 'number') return `character ${d.position + 1}`;
  return null;
}

export function failure(e: unknown): FailedPart {
  const message = e instanceof Error ? e.message : String(e);
  if (isBudgetError(e)) return { ok: false, error: message, reason: 'budget', at: null };
  if (isInputError(e)) return { ok: false, error: message, reason: 'input', at: errorAt(e) };
  return { ok: false, error: `internal error: ${message}`, reason: 'internal', at: null };
}

/** Runs fn; its value, or the failure it threw, as a part. */
export function part<T>(fn: () => T): Part<T> {
  try {
    return { ok: true, value: fn() };
  } catch (e) {
    return failure(e);
  }
}
