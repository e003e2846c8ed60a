import { type Diagram, type Finding, parseDiagram } from '@loopwright/graph';
import { checkStudy, errorAt, findingText } from '@loopwright/study';
import { all, has, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, type CliIo, type Command } from '../io.ts';
import { checkSets, readDiagramText } from './diagram-input.ts';

const help = `loopwright check FILE [--set NAME=VALUE ...] [--json]

Loads a diagram (.loop.json; "-" reads standard input) and lists every finding: structural ones (unconnected or
misdirected wires, unknown ports, duplicate ids, references to missing blocks, wires, cuts or
parameters, improper transfer functions, values out of range) and analytical ones (algebraic
loops, pole-zero cancellations, closed-loop stability).

  --set NAME=VALUE   use VALUE for the named parameter NAME (repeatable)
  --json             print the findings as JSON instead of one line each

Each line reads "<severity>  <subject>: <message>", e.g.
  error  block pid1: field kp: "Kq" uses an unknown parameter
Exit code 2 when the file does not load or any finding is an error, 0 otherwise. Every
other command (reduce, loops, locus, simulate) refuses a diagram with an error finding,
with the same message.
`;

const line = (f: Finding) => `${f.severity}  ${findingText(f)}`;

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

export const checkCommand: Command = {
  name: 'check',
  summary: 'list structural and analytical findings of a diagram',
  help,
  async run(argv: string[], io: CliIo, budget: { deadline?: number } = {}) {
    const args = parseArgs(argv, ['set'], ['json']);
    if (args.positional.length !== 1) throw new UsageError('check needs exactly one FILE (see loopwright check --help)');
    const file = args.positional[0];
    const json = has(args, 'json');
    const overrides = parseAssignments(all(args, 'set'), 'set');

    const text = await readDiagramText(io, file);
    let d: Diagram;
    try {
      d = parseDiagram(text);
    } catch (err) {
      if (!(err instanceof Error) || (err as { inputError?: boolean }).inputError !== true) throw err;
      const problems = (err as { problems?: string[] }).problems ?? [err.message];
      if (json) io.stdout(toJson({ file, loaded: false, error: { message: err.message, at: errorAt(err) }, problems }));
      else io.stdout(`${file}: does not load\n${problems.map((p) => `error  ${p}`).join('\n')}\n`);
      return 2;
    }
    checkSets(d, overrides);

    const { findings, counts: n } = checkStudy(d, overrides, budget.deadline);
    if (json) {
      io.stdout(toJson({ file, loaded: true, overrides: { ...overrides }, counts: n, findings }));
    } else {
      const summary =
        findings.length === 0 ? 'no findings' : `${plural(n.error, 'error')}, ${plural(n.warning, 'warning')}, ${plural(n.info, 'note')}`;
      io.stdout(`${findings.map((f) => line(f) + '\n').join('')}${file}: ${summary}\n`);
    }
    return n.error > 0 ? 2 : 0;
  },
};
