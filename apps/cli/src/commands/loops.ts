import { MIN_SEPARATION } from '@loopwright/graph';
import { runStudy, type LoopRow, type MarginsData, type TransferData } from '@loopwright/study';
import { all, has, numberFlag, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, type Command } from '../io.ts';
import { checkSets, fmtNumber, fmtRootsMarked, fmtTransfer, jsonForm, padeLegend, readDiagram } from './diagram-input.ts';

const help = `loopwright loops FILE [--set NAME=VALUE ...] [--pade-order N] [--json]

Every cut of a diagram (or, when it has none, one proposed on each feedback wire): the loop
transfer L(s) there with every other loop closed (1 + L = 0), its crossovers and margins, peak
sensitivity Ms and closed-loop bandwidth, and the number of open-loop right-half-plane poles of
L (with P of them, a stable loop encircles −1 P times: a negative phase margin read with the
outer loops closed can belong to a stable design); the same loop as tuned inner-first (the
loops around it opened); inner/outer separation ratios of nested loops (flagged below
${MIN_SEPARATION}: the usual 3–10× rule of thumb); and for every nested pair the outer loop with the
real inner loop against an ideal one, both read with the loops around the outer one opened.
FILE "-" reads standard input.

  --set NAME=V    override a named parameter (repeatable)
  --pade-order N  Padé order for dead times inside loops (default 3)
  --json          machine-readable output (coefficients ascending, complex numbers [re, im])
`;

const text = (t: TransferData) => fmtTransfer(t.num, t.den, t.delay);

const cutJson = (c: LoopRow) => ({
  cut: c.cutId,
  wire: c.wire,
  // The loop's one name (the cut's label, else its id), as the editor and the report show it.
  label: c.label,
  auto: c.auto,
  loopText: text(c.loop),
  numeratorAscending: c.loop.num,
  denominatorAscending: c.loop.den,
  delay: c.loop.delay,
  delayHandling: c.delayHandling,
  hiddenModes: c.hiddenModes,
  blocks: c.blocks,
  stable: c.stable,
  openLoopRhpPoles: c.openLoopRhpPoles,
  margins: c.margins,
  // Read inner-first; with no loop around it, the same reading (nothing opened).
  alone: c.alone
    ? { opened: c.alone.opened, loopText: text(c.alone.loop), openLoopRhpPoles: c.alone.openLoopRhpPoles, margins: c.alone.margins }
    : { opened: [], loopText: text(c.loop), openLoopRhpPoles: c.openLoopRhpPoles, margins: c.margins },
  advice: c.advice,
});

const f = (x: number | null, unit = '') => (x === null ? '—' : `${fmtNumber(x, 4)}${unit}`);
const gm = (m: MarginsData) => (m.gainMargin === null ? '∞' : `${fmtNumber(m.gainMargin, 4)} (${fmtNumber(m.gainMarginDb!, 3)} dB)`);
const row = (m: MarginsData, rhp?: number) =>
  `crossover ${f(m.gainCrossover, ' rad/s')}${m.gainCrossovers.length > 1 ? ` (all: ${m.gainCrossovers.map((w) => fmtNumber(w, 4)).join(', ')})` : ''}, ` +
  `PM ${f(m.phaseMarginDeg, '°')}, GM ${gm(m)}${m.lowerGainMargin !== null ? `, lower GM ${fmtNumber(m.lowerGainMargin, 4)}` : ''}, ` +
  `DM ${f(m.delayMargin, ' s')}, Ms ${f(m.peakSensitivity)}, bandwidth ${f(m.bandwidth, ' rad/s')}, ${m.closedLoopStable ? 'stable' : 'UNSTABLE'}` +
  (rhp ? `, L has ${rhp} open-loop RHP pole${rhp > 1 ? 's' : ''}` : '');

export const loopsCommand: Command = {
  name: 'loops',
  summary: 'every cut: crossovers, margins, Ms, stability; inner/outer separation ratios',
  help,
  async run(argv, io, budget = {}) {
    const a = parseArgs(argv, ['set', 'pade-order'], ['json']);
    if (a.positional.length !== 1) throw new UsageError('loops: give exactly one diagram FILE (see --help)');
    const sets = parseAssignments(all(a, 'set'), 'set');
    const padeOrder = numberFlag(a, 'pade-order');
    const d = await readDiagram(io, a.positional[0]);
    checkSets(d, sets);
    const rep = runStudy(d, { kind: 'loops', overrides: sets, ...(padeOrder !== undefined ? { padeOrder } : {}) }, budget);
    if (has(a, 'json')) {
      io.stdout(
        toJson(
          jsonForm({
            parameters: sets,
            cuts: rep.rows.map(cutJson),
            separations: rep.separations,
            outerVsIdeal: rep.outerVsIdeal.map((o) => ({
              outer: o.outer,
              inner: o.inner,
              opened: o.opened,
              real: o.realMargins,
              ideal: o.idealMargins,
              realLoopText: text(o.realLoop),
              idealLoopText: text(o.idealLoop),
            })),
            names: rep.names,
            closedLoopPoles: rep.closedLoopPoles,
            closedLoopPoleOrigin: rep.closedLoopPoleOrigin,
            stable: rep.stable,
            notes: rep.notes,
          }),
        ),
      );
      return 0;
    }
    const out: string[] = [];
    // One name per loop (the cut's label, else its id), as the editor and the report show it.
    const name = (id: string) => rep.names[id] ?? id;
    out.push(
      `closed loop: ${rep.stable ? 'stable' : 'NOT stable'}; poles ${fmtRootsMarked(rep.closedLoopPoles, rep.closedLoopPoleOrigin)}`,
    );
    const legend = padeLegend(rep.closedLoopPoleOrigin);
    if (legend) out.push(`  ${legend}`);
    for (const n of rep.notes) out.push(`note: ${n}`);
    for (const c of rep.rows) {
      out.push('', `${c.label}: cut ${c.cutId} on wire ${c.wire}${c.auto ? ' [proposed]' : ''}`);
      out.push(`  L(s) = ${text(c.loop)}`);
      out.push(
        `  every other loop closed: ${row(c.margins, c.openLoopRhpPoles)}${c.advice.actOn === 'all-closed' ? '   <- act on this' : ''}`,
      );
      if (c.alone)
        out.push(
          `  tuned inner-first (opened ${c.alone.opened.map(name).join(', ')}): ${row(c.alone.margins, c.alone.openLoopRhpPoles)}   <- act on this`,
        );
      out.push(`  ${c.advice.text}`);
      if (c.delayHandling.mode === 'pade') out.push(`  ${c.delayHandling.note}`);
    }
    if (rep.separations.length) {
      out.push('', 'separation (inner/outer, loops as tuned inner-first):');
      for (const s of rep.separations)
        out.push(
          `  ${name(s.inner)} in ${name(s.outer)}: ${s.ratio === null ? '—' : `${fmtNumber(s.ratio, 3)}×`} ${s.flag ? '[LOW] ' : ''}${s.note}`,
        );
    }
    for (const o of rep.outerVsIdeal) {
      out.push(
        '',
        `outer loop ${name(o.outer)} with inner loop ${name(o.inner)}${o.opened.length ? ` (opened ${o.opened.map(name).join(', ')})` : ''}:`,
      );
      out.push(`  real inner loop : ${row(o.realMargins)}`);
      out.push(`  ideal inner loop: ${row(o.idealMargins)}`);
    }
    io.stdout(out.join('\n') + '\n');
    return 0;
  },
};
