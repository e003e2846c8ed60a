import { responseMetrics, type MetricsOptions, type ResponseMetrics } from '@loopwright/lti';
import type { SimStatus } from './types.ts';

/**
 * Response metrics of a probe's trace, from lti's `responseMetrics` (one implementation for
 * the whole project). null when the trace cannot be measured (fewer than two samples, or a
 * diverged run with non-finite values).
 */
export function probeMetrics(
  time: number[],
  y: number[],
  o: { user?: MetricsOptions; breaks: number[]; extrema: { time: number; value: number }[]; status: SimStatus; message: string },
): ResponseMetrics | null {
  if (time.length < 2 || !y.every(Number.isFinite)) return null;
  return responseMetrics(time, y, o.user);
}
