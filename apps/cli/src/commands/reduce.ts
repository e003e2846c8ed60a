import { describeRef } from '@loopwright/graph';
import { poly } from '@loopwright/lti';
import { runStudy } from '@loopwright/study';
import { all, has, numberFlag, one, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, type Command } from '../io.ts';
import {
  checkSets,
  fmtNumber,
  fmtRoots,
  fmtRootsMarked,
  fmtTransfer,
  jsonForm,
  padeLegend,
  readDiagram,
  signalRef,
} from './diagram-input.ts';

const help = `loopwright reduce FILE --from A --to B [--set NAME=VALUE ...] [--pade-order N] [--bode] [--step] [--json]

Closed-loop transfer function of a diagram from A to B, every loop closed, exact as a rational
function (times a dead time where it factors out of every path). FILE "-" reads standard input.

  FILE            a diagram (.loop.json)
  --from A        where a signal is injected: a source block, any block (added to its output)
                  or a wire (added on that wire); write block:ID or wire:ID if an id is both
  --to B          what is measured: a probe, a block's output or a wire
  --set NAME=V    override a named parameter (repeatable)
  --pade-order N  Padé order for dead times inside loops (default 3)
  --bode, --step  with --json: also the Bode data and the exact step response
  --json          machine-readable output: numeratorAscending/denominatorAscending are
                  coefficients in ascending powers of s; "text" is highest power first

Example: npx loopwright reduce axis.loop.json --from ref --to pos --set Kpos=40
`;

export const reduceCommand: Command = {
  name: 'reduce',
  summary: 'closed-loop transfer function between two points of a diagram',
  help,
  async run(argv, io, budget = {}) {
    const a = parseArgs(argv, ['from', 'to', 'set', 'pade-order'], ['json', 'bode', 'step']);
    if (a.positional.length !== 1) throw new UsageError('reduce: give exactly one diagram FILE (see --help)');
    const fromText = one(a, 'from');
    const toText = one(a, 'to');
    if (!fromText || !toText) throw new UsageError('reduce: both --from and --to are needed (see --help)', fromText ? '--to' : '--from');
    const sets = parseAssignments(all(a, 'set'), 'set');
    const padeOrder = numberFlag(a, 'pade-order');
    const d = await readDiagram(io, a.positional[0]);
    checkSets(d, sets);
    const from = signalRef(d, fromText, 'from');
    const to = signalRef(d, toText, 'to');
    const r = runStudy(
      d,
      {
        kind: 'closed-loop',
        from,
        to,
        overrides: sets,
        bode: has(a, 'bode'),
        step: has(a, 'step'),
        ...(padeOrder !== undefined ? { padeOrder } : {}),
      },
      budget,
    );
    const { num: numA, den: denA, delay } = r.transfer;
    const text = fmtTransfer(numA, denA, delay);
    if (has(a, 'json')) {
      io.stdout(
        toJson(
          jsonForm({
            from: describeRef(from),
            to: describeRef(to),
            parameters: sets,
            numeratorAscending: numA,
            denominatorAscending: denA,
            text,
            poles: r.poles,
            zeros: r.zeros,
            poleOrigin: r.poleOrigin,
            zeroOrigin: r.zeroOrigin,
            gain: r.gain,
            staticGain: r.staticGain,
            delay,
            delayHandling: r.delayHandling,
            hiddenModes: r.hiddenModes,
            ...(r.bode ? { bode: r.bode } : {}),
            ...(r.step ? { step: r.step } : {}),
          }),
        ),
      );
      return 0;
    }
    const lines = [
      `T(s) from ${describeRef(from)} to ${describeRef(to)}:`,
      `  T(s) = ${text}`,
      `  numerator   (highest power first): ${poly.format(numA)}`,
      `  denominator (highest power first): ${poly.format(denA)}`,
      `  poles: ${fmtRootsMarked(r.poles, r.poleOrigin)}`,
      `  zeros: ${fmtRootsMarked(r.zeros, r.zeroOrigin)}`,
      `  gain (leading coefficient): ${fmtNumber(r.gain)}   static gain T(0): ${fmtNumber(r.staticGain)}`,
      `  dead time: ${delay > 0 ? `${fmtNumber(delay)} s` : 'none'}   (${r.delayHandling.note})`,
    ];
    const legend = padeLegend([...r.poleOrigin, ...r.zeroOrigin]);
    if (legend) lines.push(`  ${legend}`);
    if (r.hiddenModes.length) lines.push(`  cancelled (hidden) modes: ${fmtRoots(r.hiddenModes)}`);
    io.stdout(lines.join('\n') + '\n');
    return 0;
  },
};
