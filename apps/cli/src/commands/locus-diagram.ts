import { type Diagram, parseDiagram } from '@loopwright/graph';
import { InputError } from '@loopwright/lti';
import { documentValue, engineParameterName, locusStudy, parseTargetKey, type Cx } from '@loopwright/study';
import { parseAssignments } from '../args.ts';
import { checkSets } from './diagram-input.ts';

/**
 * The diagram form of `loopwright locus FILE --sweep PARAM`: the study's locus of every
 * closed-loop pole of the whole diagram as one quantity varies, all others fixed (`sets`
 * overrides them), in the JSON shape of the loop form —
 *   {poles, zeros, asymptotes: {centroid, anglesDeg}, breakaway: [{s: [re, im], gain}],
 *    crossings: [{omega, gain}], departures: [{at, angleDeg}], branches: [[[re, im, k], …], …]}
 * — plus `mode`, `parameter`, `value` and, for an exact locus, the characteristic polynomial
 * split D0 + k·N0 (`numeratorAscending` = N0, `denominatorAscending` = D0) and `fixedPoles`,
 * closed-loop poles that do not move with the parameter (left out of the geometry).
 * - mode "exact": poles/zeros are the roots of D0/N0 with common factors removed;
 * - mode "sampled": branches over the sweep range; `poles` are the roots at the range's
 *   start, `zeros` those at its end, and the geometric fields are empty.
 * PARAM is a named parameter or `block:ID.k` (a gain block's k). A negative value (or
 * `negative`) gives the k < 0 locus.
 *
 * `file` is the diagram's JSON text (as read from the FILE) or an already parsed Diagram.
 * `sets` is NAME=VALUE words or a record. Bad input throws InputError or UsageError (exit code 2).
 */
export function locusFromDiagram(
  file: string | Diagram,
  sweep: string,
  sets: Record<string, number> | string[] = {},
  negative = false,
  deadline?: number,
) {
  const d = typeof file === 'string' ? parseDiagram(file) : file;
  const overrides = Array.isArray(sets) ? parseAssignments(sets, 'set') : sets;
  checkSets(d, overrides);
  const target = parseTargetKey(sweep);
  if (!target) throw new InputError(`--sweep ${sweep}: expected a parameter name or block:ID.k`, { field: '--sweep' });
  const name = engineParameterName(target);
  const value = overrides[name] ?? documentValue(d, target);
  const L = locusStudy(d, { target, value, overrides, direction: negative ? 'negative' : 'auto' }, deadline);
  const pair = (z: Cx) => [z.re, z.im];
  const branches = L.branches.map((b) => b.re.map((re, i) => [re, b.im[i], b.k[i]]));
  const common = {
    parameter: name,
    value,
    negative: L.direction === 'negative',
    delayHandling: L.delayHandling,
  };
  if (L.mode === 'exact') {
    return {
      mode: 'exact' as const,
      ...common,
      numeratorAscending: L.n0!,
      denominatorAscending: L.d0!,
      fixedPoles: L.fixedPoles.map(pair),
      poles: L.poles.map(pair),
      zeros: L.zeros.map(pair),
      // How each was found: 'exact', or with a dead time inside a loop 'approximated' / 'approximant' (Padé).
      poleOrigin: L.poleOrigin,
      zeroOrigin: L.zeroOrigin,
      fixedOrigin: L.fixedOrigin,
      asymptotes: { centroid: L.asymptotes?.centroid ?? null, anglesDeg: L.asymptotes?.anglesDeg ?? [] },
      breakaway: L.breakaways.map((b) => ({ s: pair(b.s), gain: b.gain })),
      crossings: L.crossings.map((c) => ({ omega: c.omega, gain: c.gain })),
      departures: L.departures.map((a) => ({ at: pair(a.at), angleDeg: a.angleDeg })),
      arrivals: L.arrivals.map((a) => ({ at: pair(a.at), angleDeg: a.angleDeg })),
      branches,
    };
  }
  const first = L.branches.length ? Math.min(...L.branches.map((b) => b.k[0])) : L.range.min;
  const last = L.branches.length ? Math.max(...L.branches.map((b) => b.k[b.k.length - 1])) : L.range.max;
  return {
    mode: 'sampled' as const,
    ...common,
    reason: L.reason,
    range: [first, last],
    poles: L.branches.filter((b) => b.k[0] === first).map((b) => [b.re[0], b.im[0]]),
    poleOrigin: L.poleOrigin,
    zeros: L.branches.filter((b) => b.k[b.k.length - 1] === last).map((b) => [b.re[b.re.length - 1], b.im[b.im.length - 1]]),
    asymptotes: { centroid: null, anglesDeg: [] as number[] },
    breakaway: [] as { s: number[]; gain: number }[],
    crossings: [] as { omega: number; gain: number }[],
    departures: [] as { at: number[]; angleDeg: number }[],
    arrivals: [] as { at: number[]; angleDeg: number }[],
    branches,
  };
}
