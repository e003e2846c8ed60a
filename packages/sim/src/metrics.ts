/**
 * Response metrics of a probe's trace. The figures themselves come from lti's
 * `responseMetrics` (one implementation for the whole project).
 */
export function probeMetrics(_time: number[], _y: number[]): unknown {
  return null; // wired to lti responseMetrics once it lands
}
