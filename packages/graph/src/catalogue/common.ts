import { InputError, rational, transfer, type TransferFunction } from '@loopwright/lti';
import type { ResolvedParams } from './types.ts';

/** A transfer function from ascending coefficients, with an optional dead time. */
export const tfOf = (num: number[], den: number[], delay = 0): TransferFunction => transfer(rational(num, den), delay);

/** The numeric value of a resolved field (resolveParams guarantees the type). */
export function numberOf(p: ResolvedParams, name: string): number {
  const v = p[name];
  if (typeof v !== 'number' || Number.isNaN(v)) {
    throw new InputError(`field ${name}: expected a number, got ${JSON.stringify(v)}`, { field: name });
  }
  return v;
}

/** Refuses a value that is not finite, naming the field. */
export function finite(p: ResolvedParams, name: string): number {
  const v = numberOf(p, name);
  if (!Number.isFinite(v)) throw new InputError(`field ${name}: must be a finite number, got ${v}`, { field: name });
  return v;
}

export const stringOf = (p: ResolvedParams, name: string): string => String(p[name] ?? '');

/** Ports of a single-input, single-output block. */
export const singleInput = () => ['in'];
export const singleOutput = ['out'];
