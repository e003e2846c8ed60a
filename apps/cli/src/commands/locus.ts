import type { Complex, RootLocus } from '@loopwright/lti';
import { expressionLocus, expressionSampledLocus, type PadeNote } from '@loopwright/study';
import type { ZPlaneLocus } from '@loopwright/sampled';
import { all, has, numberFlag, one, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, type CliIo, type Command } from '../io.ts';
import { checkSets, fmtNumber, fmtRoots, fmtRootsMarked, fmtTransfer, padeLegend, readDiagram } from './diagram-input.ts';
import { locusFromDiagram } from './locus-diagram.ts';
import { loopFromArgs, withCaret } from './loop-input.ts';

const help = `loopwright locus --loop "<expression>" [--param NAME=VALUE ...] [--negative] [--json]
loopwright locus --loop "<expression>" --sample-time T [--compute-delay D] [--json]
loopwright locus FILE --sweep PARAM [--set NAME=VALUE ...] [--negative] [--json]

Root locus: every closed-loop pole as a gain k varies.

Loop form: the roots of 1 + k·L(s) = 0 with L = N/D from --loop, for k > 0 (or k < 0 with
--negative): poles and zeros of L, asymptote centroid and angles, real-axis parts, breakaway
and break-in points (real and complex) with their gains, imaginary-axis crossings with the
exact gain and frequency, departure angles at complex poles and arrival angles at complex
zeros, and the branches (each point [re, im, k]; breakaways and crossings are exact members).

Diagram form: the locus of every closed-loop pole of the whole diagram as the named parameter
PARAM varies, all others fixed (exact geometry when PARAM enters the characteristic polynomial
affinely, e.g. a gain; otherwise a sampled parameter locus). Factors common to the swept and
the fixed part are closed-loop poles the sweep does not move: listed apart as fixed poles. A
negative PARAM traces the k < 0 locus (as does --negative).

  --loop EXPR      the loop L(s), e.g. "(s+3)/(s*(s+1)*(s+2)*(s+4))"
  --param NAME=V   value of a parameter used in EXPR (repeatable)
  --negative       trace k < 0 instead of k > 0
  --k-max K        largest |k| traced (default: far enough that branches reach zeros/asymptotes)
  --samples N      base gain samples (default 400; more are added where poles move fast)
  --pade-order N   a dead time in L is replaced by a Padé (N,N) approximant (default 3)
  FILE             a diagram (.loop.json; "-" reads standard input), with --sweep PARAM (a named
                   parameter, or block:ID.k for a gain block's k) and --set NAME=VALUE (repeatable)
  --json           machine-readable output; complex numbers are [re, im]
  --sample-time T  z-plane locus of the loop sampled every T seconds behind a zero-order hold:
                   the roots of 1 + k·G(z) = 0, G(z) the exact pulse transfer function of L(s)
                   (with --compute-delay D samples). The stability boundary is the unit circle:
                   "crossings" are the unit-circle crossings, each with its gain, the point z,
                   theta = ωT (rad, 0 … π) and ω; also the stable gain ranges and the critical
                   gain (Jury limit)
  --compute-delay D  computation delay in samples (with --sample-time; default 0)

Example: npx loopwright locus --loop "1/(s*(s+1)*(s+2))"
`;

/** The JSON shape of the loop form (see --help). */
export function locusJson(L: RootLocus, delayHandling: PadeNote) {
  const pair = (z: Complex) => [z.re, z.im];
  return {
    negative: L.negative,
    numeratorAscending: L.num,
    denominatorAscending: L.den,
    delayHandling,
    poles: L.poles.map(pair),
    zeros: L.zeros.map(pair),
    asymptotes: { centroid: L.asymptotes.centroid, anglesDeg: L.asymptotes.anglesDeg },
    realAxisSegments: L.realAxisSegments.map((s) => [s.from, s.to]),
    breakaway: L.breakaways.map((b) => ({ s: pair(b.s), gain: b.gain, branches: b.branches })),
    crossings: L.crossings.map((c) => ({ omega: c.omega, gain: c.gain })),
    departures: L.departures.map((d) => ({ at: pair(d.at), angleDeg: d.angleDeg, multiplicity: d.multiplicity, anglesDeg: d.anglesDeg })),
    arrivals: L.arrivals.map((d) => ({ at: pair(d.at), angleDeg: d.angleDeg, multiplicity: d.multiplicity, anglesDeg: d.anglesDeg })),
    kRange: L.kRange,
    degreeDropGain: L.degreeDropGain,
    branches: L.branches.map((br) => br.map((p) => [p.s.re, p.s.im, p.k])),
  };
}

/** The JSON shape of the sampled (z-plane) loop form: that of the s-plane form, crossings on the unit circle. */
export function zLocusJson(L: ZPlaneLocus, computeDelay: number) {
  const pair = (z: Complex) => [z.re, z.im];
  return {
    ...locusJson({ ...L, crossings: [] }, { mode: 'none' }),
    plane: 'z',
    sampleTime: L.sampleTime,
    computeDelay,
    crossings: L.crossings.map((c) => ({ gain: c.gain, omegaT: c.theta, omega: c.omega, z: pair(c.z) })),
    stableGainRanges: L.stableGainRanges,
    criticalGain: L.criticalGain,
  };
}

type LocusSummary = {
  poles: number[][];
  zeros: number[][];
  asymptotes: { centroid: number | null; anglesDeg: number[] };
  breakaway: { s: number[]; gain: number }[];
  crossings: { omega: number; gain: number }[];
  departures: { at: number[]; angleDeg: number }[];
  arrivals?: { at: number[]; angleDeg: number }[];
  branches: number[][][];
  poleOrigin?: string[];
  zeroOrigin?: string[];
};

const cplx = (p: number[]) => (p[1] === 0 ? fmtNumber(p[0]) : `${fmtNumber(p[0])} ${p[1] < 0 ? '-' : '+'} ${fmtNumber(Math.abs(p[1]))}j`);
const asRoots = (ps: number[][]): Complex[] => ps.map((p) => ({ re: p[0], im: p[1] }));

function humanSummary(j: LocusSummary, head: string[]): string {
  const lines = [...head];
  lines.push(`open-loop poles    ${j.poleOrigin ? fmtRootsMarked(asRoots(j.poles), j.poleOrigin) : fmtRoots(asRoots(j.poles))}`);
  lines.push(`open-loop zeros    ${j.zeroOrigin ? fmtRootsMarked(asRoots(j.zeros), j.zeroOrigin) : fmtRoots(asRoots(j.zeros))}`);
  const legend = padeLegend([...(j.poleOrigin ?? []), ...(j.zeroOrigin ?? [])]);
  if (legend) lines.push(`                   ${legend}`);
  lines.push(
    `asymptotes         ${j.asymptotes.centroid === null ? 'none (every branch ends at a finite zero)' : `centroid ${fmtNumber(j.asymptotes.centroid)}, angles ${j.asymptotes.anglesDeg.map((a) => `${fmtNumber(a, 5)}°`).join(', ')}`}`,
  );
  lines.push(
    `breakaway points   ${j.breakaway.length ? j.breakaway.map((b) => `s = ${cplx(b.s)} (k = ${fmtNumber(b.gain)})`).join('; ') : 'none'}`,
  );
  lines.push(
    `jω-axis crossings  ${j.crossings.length ? j.crossings.map((c) => `ω = ${fmtNumber(c.omega)} rad/s (k = ${fmtNumber(c.gain)})`).join('; ') : 'none'}`,
  );
  lines.push(
    `departure angles   ${j.departures.length ? j.departures.map((d) => `${fmtNumber(d.angleDeg, 5)}° from ${cplx(d.at)}`).join('; ') : 'none (no complex poles)'}`,
  );
  if (j.arrivals)
    lines.push(
      `arrival angles     ${j.arrivals.length ? j.arrivals.map((d) => `${fmtNumber(d.angleDeg, 5)}° at ${cplx(d.at)}`).join('; ') : 'none (no complex zeros)'}`,
    );
  const pts = j.branches.reduce((n, b) => n + b.length, 0);
  lines.push(`branches           ${j.branches.length} (${pts} points; --json lists them)`);
  return lines.join('\n') + '\n';
}

async function diagramForm(a: ReturnType<typeof parseArgs>, io: CliIo, deadline?: number): Promise<number> {
  if (a.positional.length !== 1) throw new UsageError('locus: give exactly one diagram FILE (see --help)');
  if (has(a, 'loop') || has(a, 'param')) throw new UsageError('locus: --loop/--param and a diagram FILE exclude each other');
  const sweep = one(a, 'sweep');
  if (!sweep) throw new UsageError('locus: the diagram form needs --sweep PARAM (the parameter to vary)', '--sweep');
  const sets = parseAssignments(all(a, 'set'), 'set');
  const d = await readDiagram(io, a.positional[0]);
  checkSets(d, sets);
  const j = locusFromDiagram(d, sweep, sets, has(a, 'negative'), deadline);
  if (has(a, 'json')) {
    io.stdout(toJson(j));
    return 0;
  }
  const head = [
    `locus of every closed-loop pole as ${j.parameter} varies (${j.mode === 'exact' ? 'exact geometry' : 'sampled'}; now ${fmtNumber(j.value)})${j.negative ? ', negative direction' : ''}`,
  ];
  if (j.mode === 'sampled') head.push(`reason: ${j.reason}`, `range ${fmtNumber(j.range[0])} … ${fmtNumber(j.range[1])}`);
  if (j.mode === 'exact' && j.fixedPoles.length)
    head.push(`fixed poles        ${fmtRootsMarked(asRoots(j.fixedPoles), j.fixedOrigin)} (closed-loop poles the sweep does not move)`);
  io.stdout(humanSummary(j, head));
  return 0;
}

export const locusCommand: Command = {
  name: 'locus',
  summary: 'root locus of a loop, or of a whole diagram as one parameter varies',
  help,
  async run(argv, io, budget = {}) {
    const a = parseArgs(
      argv,
      ['loop', 'param', 'sweep', 'set', 'k-max', 'samples', 'pade-order', 'sample-time', 'compute-delay'],
      ['negative', 'json'],
    );
    if (a.positional.length > 0) {
      if (has(a, 'sample-time') || has(a, 'compute-delay'))
        throw new UsageError(
          'locus: --sample-time applies to the --loop form (a diagram takes the sample time of its blocks)',
          '--sample-time',
        );
      return diagramForm(a, io, budget.deadline);
    }
    if (has(a, 'sweep') || has(a, 'set')) throw new UsageError('locus: --sweep and --set need a diagram FILE (locus FILE --sweep PARAM)');
    const loop = loopFromArgs(a, 'locus');
    const kMax = numberFlag(a, 'k-max');
    const samples = numberFlag(a, 'samples');
    const sampleTime = numberFlag(a, 'sample-time');
    if (sampleTime === undefined && has(a, 'compute-delay'))
      throw new UsageError('locus: --compute-delay needs --sample-time T', '--sample-time');
    if (sampleTime !== undefined) return sampledForm(a, io, loop, sampleTime, { kMax, samples });
    const padeOrder = numberFlag(a, 'pade-order') ?? 3;
    const {
      loop: tf,
      locus: L,
      delayHandling,
    } = withCaret(loop, () =>
      expressionLocus(loop, {
        negative: has(a, 'negative'),
        padeOrder,
        ...budget,
        ...(kMax !== undefined ? { kMax } : {}),
        ...(samples !== undefined ? { samples } : {}),
      }),
    );
    const j = locusJson(L, delayHandling);
    if (has(a, 'json')) {
      io.stdout(toJson(j));
      return 0;
    }
    const head = [
      `root locus of 1 + k·L(s) = 0 for k ${L.negative ? '< 0' : '> 0'}, |k| up to ${fmtNumber(Math.abs(L.kRange[1]))}`,
      `L(s) = ${fmtTransfer(tf.rational.num, tf.rational.den, tf.delay)}`,
    ];
    if (delayHandling.mode === 'pade')
      head.push(`dead time ${fmtNumber(tf.delay)} s replaced by a Padé (${padeOrder},${padeOrder}) approximant for the poles`);
    const segs = L.realAxisSegments.map((s) => `[${fmtNumber(s.from)}, ${fmtNumber(s.to)}]`).join(', ');
    head.push(`real-axis parts    ${segs || 'none'}`);
    io.stdout(humanSummary(j, head));
    return 0;
  },
};

async function sampledForm(
  a: ReturnType<typeof parseArgs>,
  io: CliIo,
  loop: ReturnType<typeof loopFromArgs>,
  sampleTime: number,
  o: { kMax: number | undefined; samples: number | undefined },
): Promise<number> {
  if (has(a, 'pade-order'))
    throw new UsageError('locus: --pade-order does not apply to a sampled loop (a dead time is exact in G(z))', '--pade-order');
  const computeDelay = numberFlag(a, 'compute-delay') ?? 0;
  const { loop: tf, locus: L } = withCaret(loop, () =>
    expressionSampledLocus(
      loop,
      { sampleTime, computeDelay },
      {
        negative: has(a, 'negative'),
        ...(o.kMax !== undefined ? { kMax: o.kMax } : {}),
        ...(o.samples !== undefined ? { samples: o.samples } : {}),
      },
    ),
  );
  const j = zLocusJson(L, computeDelay);
  if (has(a, 'json')) {
    io.stdout(toJson(j));
    return 0;
  }
  const head = [
    `z-plane root locus of 1 + k·G(z) = 0 for k ${L.negative ? '< 0' : '> 0'}, |k| up to ${fmtNumber(Math.abs(L.kRange[1]))}`,
    `L(s) = ${fmtTransfer(tf.rational.num, tf.rational.den, tf.delay)} sampled every T = ${fmtNumber(sampleTime)} s (zero-order hold, computation delay ${fmtNumber(computeDelay)} samples)`,
    `unit-circle crossings ${L.crossings.length ? L.crossings.map((c) => `k = ${fmtNumber(c.gain)} at ωT = ${fmtNumber(c.theta, 5)} rad (ω = ${fmtNumber(c.omega)} rad/s)`).join('; ') : 'none'}`,
    `critical gain      ${L.criticalGain === null ? 'none (stable for every gain traced, or unstable from the start)' : fmtNumber(L.criticalGain)}`,
    `stable gains       ${L.stableGainRanges.length ? L.stableGainRanges.map((r) => `${fmtNumber(r.from)} … ${r.to === null ? '∞' : fmtNumber(r.to)}`).join(', ') : 'none'}`,
  ];
  const { crossings: _c, ...rest } = j;
  io.stdout(humanSummary({ ...rest, crossings: [] }, head).replace(/^jω-axis crossings.*\n/m, ''));
  return 0;
}
