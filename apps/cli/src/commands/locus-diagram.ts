import { type Diagram, parseDiagram, sweepLocus } from '@loopwright/graph';
import type { Complex } from '@loopwright/lti';
import { parseAssignments } from '../args.ts';
import { checkSets } from './diagram-input.ts';

/**
 * The diagram form of `loopwright locus FILE --sweep PARAM`: the locus of every closed-loop
 * pole of the whole diagram as one named parameter varies, all others fixed (`sets` overrides
 * them). Returns the same JSON shape as the loop form —
 *   {poles, zeros, asymptotes: {centroid, anglesDeg}, breakaway: [{s: [re, im], gain}],
 *    crossings: [{omega, gain}], departures: [{at, angleDeg}], branches: [[[re, im, k], …], …]}
 * — plus `mode`, `parameter`, `value` and, for an exact locus, the characteristic polynomial
 * split D0 + k·N0 (`numeratorAscending` = N0, `denominatorAscending` = D0) and `fixedPoles`,
 * closed-loop poles that do not move with the parameter (left out of the geometry).
 * - mode "exact": the parameter enters the characteristic polynomial affinely; poles/zeros are
 *   the roots of D0/N0 and the geometry is exact.
 * - mode "sampled": any other parameter; branches over the sweep range; `poles` are the roots
 *   at the range's start, `zeros` those at its end, and the geometric fields are empty.
 *
 * `file` is the diagram's JSON text (as read from the FILE) or an already parsed Diagram.
 * `sets` is NAME=VALUE words or a record. Bad input throws InputError or UsageError (exit code 2).
 */
export function locusFromDiagram(file: string | Diagram, sweep: string, sets: Record<string, number> | string[] = {}, negative = false) {
  const d = typeof file === 'string' ? parseDiagram(file) : file;
  const overrides = Array.isArray(sets) ? parseAssignments(sets, 'set') : sets;
  checkSets(d, overrides);
  const pair = (z: Complex) => [z.re, z.im];
  const sw = sweepLocus(d, sweep, overrides, { negative });
  if (sw.mode === 'exact') {
    const L = sw.locus;
    return {
      mode: 'exact' as const,
      parameter: sw.parameter,
      value: sw.value,
      negative,
      numeratorAscending: sw.n0,
      denominatorAscending: sw.d0,
      fixedPoles: sw.fixedPoles.map(pair),
      delayHandling: sw.delayHandling,
      poles: L.poles.map(pair),
      zeros: L.zeros.map(pair),
      asymptotes: { centroid: L.asymptotes.centroid, anglesDeg: L.asymptotes.anglesDeg },
      breakaway: L.breakaways.map((b) => ({ s: pair(b.s), gain: b.gain })),
      crossings: L.crossings.map((c) => ({ omega: c.omega, gain: c.gain })),
      departures: L.departures.map((a) => ({ at: pair(a.at), angleDeg: a.angleDeg })),
      arrivals: L.arrivals.map((a) => ({ at: pair(a.at), angleDeg: a.angleDeg })),
      branches: L.branches.map((br) => br.map((p) => [p.s.re, p.s.im, p.k])),
    };
  }
  const first = sw.branches.filter((b) => b[0].k === sw.values[0]).map((b) => pair(b[0].s));
  const last = sw.values[sw.values.length - 1];
  const end = sw.branches.filter((b) => b[b.length - 1].k === last).map((b) => pair(b[b.length - 1].s));
  return {
    mode: 'sampled' as const,
    parameter: sw.parameter,
    value: sw.value,
    negative,
    reason: sw.reason,
    range: [sw.values[0], last],
    delayHandling: sw.delayHandling,
    poles: first,
    zeros: end,
    asymptotes: { centroid: null, anglesDeg: [] as number[] },
    breakaway: [] as { s: number[]; gain: number }[],
    crossings: [] as { omega: number; gain: number }[],
    departures: [] as { at: number[]; angleDeg: number }[],
    arrivals: [] as { at: number[]; angleDeg: number }[],
    branches: sw.branches.map((br) => br.map((p) => [p.s.re, p.s.im, p.k])),
  };
}
