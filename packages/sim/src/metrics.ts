import { NEAR_ZERO_CHANGE, responseMetrics, type MetricsOptions, type ResponseMetrics } from '@loopwright/lti';
import type { SimStatus } from './types.ts';

/**
 * Response metrics of a probe's trace, from lti's `responseMetrics` (one implementation for the
 * whole project), told what the simulator knows: where the trace may jump (events and
 * breakpoints: no peak interpolation across them), the turning points the engine located
 * exactly (then no interpolation at all), and whether the run stopped early (then no settling
 * figures, and no figures relative to a final value that was never reached). null when the
 * trace cannot be measured (fewer than two samples, or non-finite values).
 */
export function probeMetrics(
  time: number[],
  y: number[],
  o: {
    user?: MetricsOptions;
    breaks: number[];
    /** Located turning points for a direction (1 maxima, −1 minima, 0 both), or undefined when the engine locates none. */
    extrema?: (dir: number) => { time: number; value: number }[];
    status: SimStatus;
    message: string;
  },
): ResponseMetrics | null {
  if (time.length < 2 || !y.every(Number.isFinite)) return null;
  const user = o.user ?? {};
  let extrema: { time: number; value: number }[] | undefined;
  if (o.extrema) {
    // the direction of the change decides which extreme is the peak; near no change, both
    const y0 = user.initialValue ?? y[0];
    const change = (user.finalValue ?? y[y.length - 1]) - y0;
    let excursion = 0;
    for (const v of y) excursion = Math.max(excursion, Math.abs(v - y0));
    extrema = o.extrema(Math.abs(change) <= NEAR_ZERO_CHANGE * excursion ? 0 : Math.sign(change));
  }
  return responseMetrics(time, y, {
    ...user,
    breaks: o.breaks,
    ...(extrema ? { extrema } : {}),
    ...(o.status !== 'ok' ? { incomplete: `${o.status}: ${o.message}` } : {}),
  });
}
