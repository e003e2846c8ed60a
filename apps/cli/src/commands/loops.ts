import { type CutAnalysis, MIN_SEPARATION, analyseLoops } from '@loopwright/graph';
import { type LoopMargins, marginFigures } from '@loopwright/lti';
import { all, has, numberFlag, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, type Command } from '../io.ts';
import { checkSets, fmtNumber, fmtRoots, fmtTransfer, jsonForm, readDiagram } from './diagram-input.ts';

const help = `loopwright loops FILE [--set NAME=VALUE ...] [--pade-order N] [--json]

Every cut of a diagram (or, when it has none, one proposed on each feedback wire): the loop
transfer L(s) there with every other loop closed (1 + L = 0), its crossovers and margins, peak
sensitivity Ms and closed-loop bandwidth; the same loop as tuned inner-first (the loops around
it opened); inner/outer separation ratios of nested loops (flagged below ${MIN_SEPARATION}: the usual
3–10× rule of thumb); and each outer loop with the real inner loop against an ideal one.

  --set NAME=V    override a named parameter (repeatable)
  --pade-order N  Padé order for dead times inside loops (default 3)
  --json          machine-readable output (coefficients ascending, complex numbers [re, im])
`;

const marginSummary = marginFigures;

const cutJson = (c: CutAnalysis) => ({
  cut: c.cut,
  wire: c.wire,
  label: c.label,
  auto: c.auto,
  loopText: fmtTransfer(c.loop.rational.num, c.loop.rational.den, c.loop.delay),
  numeratorAscending: c.loop.rational.num,
  denominatorAscending: c.loop.rational.den,
  delay: c.loop.delay,
  delayHandling: c.delayHandling,
  hiddenModes: c.hiddenModes,
  blocks: c.blocks,
  stable: c.stable,
  margins: marginSummary(c.margins),
  alone: {
    opened: c.alone.opened,
    loopText: fmtTransfer(c.alone.loop.rational.num, c.alone.loop.rational.den, c.alone.loop.delay),
    margins: marginSummary(c.alone.margins),
  },
});

const f = (x: number | null, unit = '') => (x === null ? '—' : `${fmtNumber(x, 4)}${unit}`);
const gm = (m: LoopMargins) => (m.gainMargin === null ? '∞' : `${fmtNumber(m.gainMargin, 4)} (${fmtNumber(m.gainMarginDb!, 3)} dB)`);
const row = (m: LoopMargins) =>
  `crossover ${f(m.gainCrossover, ' rad/s')}${m.gainCrossovers.length > 1 ? ` (all: ${m.gainCrossovers.map((w) => fmtNumber(w, 4)).join(', ')})` : ''}, ` +
  `PM ${f(m.phaseMarginDeg, '°')}, GM ${gm(m)}${m.lowerGainMargin !== null ? `, lower GM ${fmtNumber(m.lowerGainMargin, 4)}` : ''}, ` +
  `DM ${f(m.delayMargin, ' s')}, Ms ${f(m.peakSensitivity)}, bandwidth ${f(m.bandwidth, ' rad/s')}, ${m.closedLoopStable ? 'stable' : 'UNSTABLE'}`;

export const loopsCommand: Command = {
  name: 'loops',
  summary: 'every cut: crossovers, margins, Ms, stability; inner/outer separation ratios',
  help,
  async run(argv, io) {
    const a = parseArgs(argv, ['set', 'pade-order'], ['json']);
    if (a.positional.length !== 1) throw new UsageError('loops: give exactly one diagram FILE (see --help)');
    const sets = parseAssignments(all(a, 'set'), 'set');
    const padeOrder = numberFlag(a, 'pade-order');
    const d = await readDiagram(io, a.positional[0]);
    checkSets(d, sets);
    const rep = analyseLoops(d, sets, padeOrder !== undefined ? { padeOrder } : {});
    if (has(a, 'json')) {
      io.stdout(
        toJson(
          jsonForm({
            parameters: sets,
            cuts: rep.cuts.map(cutJson),
            separations: rep.separations,
            outerVsIdeal: rep.outerVsIdeal.map((o) => ({
              outer: o.outer,
              inner: o.inner,
              real: marginSummary(o.real),
              ideal: marginSummary(o.ideal),
              idealLoopText: fmtTransfer(o.idealLoop.rational.num, o.idealLoop.rational.den, o.idealLoop.delay),
            })),
            closedLoopPoles: rep.closedLoopPoles,
            stable: rep.stable,
            notes: rep.notes,
          }),
        ),
      );
      return 0;
    }
    const out: string[] = [];
    out.push(`closed loop: ${rep.stable ? 'stable' : 'NOT stable'}; poles ${fmtRoots(rep.closedLoopPoles)}`);
    for (const n of rep.notes) out.push(`note: ${n}`);
    for (const c of rep.cuts) {
      out.push('', `cut ${c.cut}${c.label !== c.cut ? ` (${c.label})` : ''} on wire ${c.wire}${c.auto ? ' [proposed]' : ''}`);
      out.push(`  L(s) = ${fmtTransfer(c.loop.rational.num, c.loop.rational.den, c.loop.delay)}`);
      out.push(`  every other loop closed: ${row(c.margins)}`);
      if (c.alone.opened.length) out.push(`  tuned inner-first (opened ${c.alone.opened.join(', ')}): ${row(c.alone.margins)}`);
      if (c.delayHandling.mode === 'pade') out.push(`  ${c.delayHandling.note}`);
    }
    if (rep.separations.length) {
      out.push('', 'separation (inner/outer, loops as tuned inner-first):');
      for (const s of rep.separations) out.push(`  ${s.inner} in ${s.outer}: ${s.ratio === null ? '—' : `${fmtNumber(s.ratio, 3)}×`} ${s.flag ? '[LOW] ' : ''}${s.note}`);
    }
    for (const o of rep.outerVsIdeal) {
      out.push('', `outer loop ${o.outer} with inner loop ${o.inner}:`);
      out.push(`  real inner loop : ${row(o.real)}`);
      out.push(`  ideal inner loop: ${row(o.ideal)}`);
    }
    io.stdout(out.join('\n') + '\n');
    return 0;
  },
};
