import { type Diagram, type Finding, checkDiagram, findingSubject, parseDiagram } from '@loopwright/graph';
import { all, has, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, type CliIo, type Command } from '../io.ts';

const help = `loopwright check FILE [--set NAME=VALUE ...] [--json]

Loads a diagram (.loop.json) and lists every finding: structural ones (unconnected or
misdirected wires, unknown ports, duplicate ids, references to missing blocks, wires, cuts or
parameters, improper transfer functions, values out of range) and analytical ones (algebraic
loops, pole-zero cancellations, closed-loop stability).

  --set NAME=VALUE   use VALUE for the named parameter NAME (repeatable)
  --json             print the findings as JSON instead of one line each

Each line reads "<severity>  <subject>: <message>", e.g.
  error  block pid1: field kp: "Kq" uses an unknown parameter
Exit code 2 when the file does not load or any finding is an error, 0 otherwise.
`;

const line = (f: Finding) => {
  const subject = findingSubject(f);
  return `${f.severity}  ${subject ? `${subject}: ` : ''}${f.message}`;
};

function counts(fs: Finding[]) {
  return {
    error: fs.filter((f) => f.severity === 'error').length,
    warning: fs.filter((f) => f.severity === 'warning').length,
    info: fs.filter((f) => f.severity === 'info').length,
  };
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

export const checkCommand: Command = {
  name: 'check',
  summary: 'list structural and analytical findings of a diagram',
  help,
  async run(argv: string[], io: CliIo) {
    const args = parseArgs(argv, ['set'], ['json']);
    if (args.positional.length !== 1) throw new UsageError('check needs exactly one FILE (see loopwright check --help)');
    const file = args.positional[0];
    const json = has(args, 'json');
    const overrides = parseAssignments(all(args, 'set'), 'set');

    let text: string;
    try {
      text = await io.readFile(file);
    } catch (err) {
      const code = (err as { code?: string }).code;
      throw new UsageError(`cannot read ${file}${code === 'ENOENT' ? ': no such file' : `: ${err instanceof Error ? err.message : String(err)}`}`);
    }
    let d: Diagram;
    try {
      d = parseDiagram(text);
    } catch (err) {
      if (!(err instanceof Error) || (err as { inputError?: boolean }).inputError !== true) throw err;
      const problems = (err as { problems?: string[] }).problems ?? [err.message];
      if (json) io.stdout(toJson({ file, loaded: false, error: err.message, problems }));
      else io.stdout(`${file}: does not load\n${problems.map((p) => `error  ${p}`).join('\n')}\n`);
      return 2;
    }
    const known = new Set(d.parameters.map((p) => p.name));
    for (const name of Object.keys(overrides)) {
      if (!known.has(name)) {
        throw new UsageError(`--set ${name}: the diagram has no named parameter "${name}" (known: ${[...known].join(', ') || 'none'})`);
      }
    }

    const findings = checkDiagram(d, overrides);
    const n = counts(findings);
    if (json) {
      io.stdout(toJson({ file, loaded: true, overrides: { ...overrides }, counts: n, findings }));
    } else {
      const summary = findings.length === 0 ? 'no findings' : `${plural(n.error, 'error')}, ${plural(n.warning, 'warning')}, ${plural(n.info, 'note')}`;
      io.stdout(`${findings.map((f) => line(f) + '\n').join('')}${file}: ${summary}\n`);
    }
    return n.error > 0 ? 2 : 0;
  },
};
