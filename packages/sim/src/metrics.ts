import { responseMetrics, type MetricsOptions, type ResponseMetrics } from '@loopwright/lti';

/**
 * Response metrics of a probe's trace, from lti's `responseMetrics` (one implementation for
 * the whole project). null when the trace cannot be measured (fewer than two samples, or a
 * diverged run with non-finite values).
 */
export function probeMetrics(time: number[], y: number[], opts?: MetricsOptions): ResponseMetrics | null {
  if (time.length < 2 || !y.every(Number.isFinite)) return null;
  return responseMetrics(time, y, opts);
}
