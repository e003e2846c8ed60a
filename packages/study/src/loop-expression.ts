/**
 * Studies of a loop given as an expression rather than a diagram (`loopwright margins --loop`,
 * `loopwright locus --loop`): margins with the dead time exact, and the root locus of
 * 1 + k·L(s) = 0 with a dead time replaced by a Padé approximant (the only place poles need it).
 */
import {
  InputError,
  closedLoopPolesOf,
  loopMargins,
  padeDelay,
  parseTransferFunction,
  poly,
  rootLocus,
  type LoopMargins,
  type RootLocus,
  type TransferFunction,
} from '@loopwright/lti';
import { comparisonOrder, originsOf } from './poles.ts';
import type { PoleOrigin } from './types.ts';

export interface ExpressionLoop {
  text: string;
  /** Values of the names used in the text. */
  params?: Record<string, number>;
}

/** The loop L(s) of an expression (InputError with the position of a fault). */
export function loopOfExpression(e: ExpressionLoop): TransferFunction {
  if (e.text.trim() === '') throw new InputError('the loop expression is empty', { field: 'loop' });
  return parseTransferFunction(e.text, e.params ?? {});
}

export function expressionMargins(
  e: ExpressionLoop,
  opts: { padeOrder?: number; deadline?: number } = {},
): { loop: TransferFunction; margins: LoopMargins; poleOrigin: PoleOrigin[] } {
  const loop = loopOfExpression(e);
  const margins = loopMargins(loop, {
    ...(opts.padeOrder !== undefined ? { padeOrder: opts.padeOrder } : {}),
    ...(opts.deadline !== undefined ? { deadline: opts.deadline } : {}),
  });
  // With a dead time the closed-loop poles are those of 1 + L with a Padé approximant: each is
  // marked by whether it stays put at an order two higher (roots of D·Pd + N·Pn).
  const order = margins.padeOrder;
  // Solved the way the margins solved theirs (product form), so that a dead time whose Padé
  // coefficients overflow (e^(−1e308·s)) is compared too.
  const poleOrigin = originsOf(
    margins.closedLoopPoles,
    order !== null && loop.delay > 0,
    () => closedLoopPolesOf(loop.rational.num, loop.rational.den, loop.delay, comparisonOrder(order!)).poles,
  );
  return { loop, margins, poleOrigin };
}

export type PadeNote = { mode: 'none' } | { mode: 'pade'; order: number; delay: number };

export function expressionLocus(
  e: ExpressionLoop,
  opts: { negative?: boolean; kMax?: number; samples?: number; padeOrder?: number; deadline?: number } = {},
): { loop: TransferFunction; locus: RootLocus; delayHandling: PadeNote } {
  const loop = loopOfExpression(e);
  const order = opts.padeOrder ?? 3;
  let num = [...loop.rational.num];
  let den = [...loop.rational.den];
  let delayHandling: PadeNote = { mode: 'none' };
  if (loop.delay > 0) {
    const p = padeDelay(loop.delay, order);
    num = poly.mul(num, p.num);
    den = poly.mul(den, p.den);
    delayHandling = { mode: 'pade', order, delay: loop.delay };
  }
  if (poly.isZero(num)) throw new InputError(`the loop "${e.text}" is identically zero: there is no gain to sweep`, { field: 'loop' });
  const locus = rootLocus(num, den, {
    negative: opts.negative === true,
    ...(opts.kMax !== undefined ? { kMax: opts.kMax } : {}),
    ...(opts.samples !== undefined ? { samples: opts.samples } : {}),
    ...(opts.deadline !== undefined ? { deadline: opts.deadline } : {}),
  });
  return { loop, locus, delayHandling };
}
