import { InputError } from '@loopwright/lti';

/**
 * The separation check of inner-first cascade tuning: the inner loop should be several times
 * faster than the loop around it, so that the outer controller sees it as nearly ideal. The
 * ratio is taken between like quantities (gain crossovers or closed-loop bandwidths, rad/s);
 * below 3 it is flagged (a common rule of thumb is 3 to 5 or more: common practice, no source).
 * The study engine supplies both figures from the diagram with the other loops closed.
 */
export const MIN_SEPARATION = 3;

export interface SeparationCheck {
  ratio: number;
  ok: boolean;
  message: string;
}

export function separationCheck(inner: number, outer: number, minimum = MIN_SEPARATION): SeparationCheck {
  if (!(inner > 0 && Number.isFinite(inner)))
    throw new InputError(`inner-loop frequency must be a finite number > 0 rad/s, got ${inner}`, { field: 'inner' });
  if (!(outer > 0 && Number.isFinite(outer)))
    throw new InputError(`outer-loop frequency must be a finite number > 0 rad/s, got ${outer}`, { field: 'outer' });
  const ratio = inner / outer;
  const ok = ratio >= minimum;
  const r = Number(ratio.toPrecision(3));
  return {
    ratio,
    ok,
    message: ok
      ? `the inner loop is ${r} times faster than the outer loop`
      : `the inner loop is only ${r} times faster than the outer loop (below ${minimum}): slow the outer loop down or speed the inner one up`,
  };
}
