import { checkTarget, parseTargetKey, runStudy, targetKey } from '@loopwright/study';
import { all, has, numberFlag, one, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, WriteError, type Command } from '../io.ts';
import { checkSets, readDiagram } from './diagram-input.ts';

const help = `loopwright report FILE --out REPORT.html [--sweep PARAM] [--set NAME=VALUE ...] [--json]

The design report of a diagram (.loop.json; "-" reads standard input) as one self-contained
HTML file — the same report as the editor's Report button, from the same engine: a summary
that says which reading of each loop to act on, the diagram, findings, parameters, the loops
table (every loop with the other loops closed and inner-first, with the open-loop
right-half-plane poles of each L), separation, the outer loops against ideal inner loops, the
closed-loop poles marked by how they were found (Padé approximations said so), the locus with
its geometry, Bode, Nyquist and |S|/|T| of every loop, the response in small multiples with
its figures, and the safety caution. Charts are inline SVG; the file needs nothing else.

  --out PATH        where to write the report (required; "-" writes it to standard output)
  --sweep PARAM     the swept quantity shown on the locus (a named parameter or block:ID.k;
                    default: the diagram's active sweep)
  --set NAME=V      override a named parameter (repeatable)
  --pade-order N    Padé order for dead times inside loops (default 3)
  --date TEXT       the date printed in the report (default: now; fixed text makes it reproducible)
  --json            print {out, title, fingerprint, bytes, problems} instead of the words

Exit code 0 when the report is written (parts that could not be computed are listed in it and
on standard error), 2 for bad input or a path that cannot be written.
`;

export const reportCommand: Command = {
  name: 'report',
  summary: 'the design report of a diagram as one self-contained HTML file',
  help,
  async run(argv, io) {
    const a = parseArgs(argv, ['out', 'sweep', 'set', 'pade-order', 'date'], ['json']);
    if (a.positional.length !== 1) throw new UsageError('report: give exactly one diagram FILE (see --help)');
    const out = one(a, 'out');
    if (!out) throw new UsageError('report: --out PATH is needed (where to write the HTML; "-" for standard output)', '--out');
    if (out === '-' && has(a, 'json'))
      throw new UsageError('report: --out - writes the HTML to standard output; it cannot carry --json too', '--json');
    const sets = parseAssignments(all(a, 'set'), 'set');
    const padeOrder = numberFlag(a, 'pade-order');
    const sweep = one(a, 'sweep');
    const d = await readDiagram(io, a.positional[0]);
    checkSets(d, sets);
    let key: string | null = null;
    if (sweep !== undefined) {
      const target = parseTargetKey(sweep);
      if (!target) throw new UsageError(`--sweep ${sweep}: expected a parameter name or block:ID.k`, '--sweep');
      checkTarget(d, target);
      key = targetKey(target);
    }
    const r = runStudy(d, {
      kind: 'report',
      overrides: sets,
      sweep: key,
      ...(padeOrder !== undefined ? { padeOrder } : {}),
      ...(one(a, 'date') !== undefined ? { generatedAt: one(a, 'date')! } : {}),
    });
    if (out === '-') io.stdout(r.html);
    else {
      try {
        await io.writeFile(out, r.html);
      } catch (err) {
        const why = (err as { code?: string }).code ?? (err instanceof Error ? err.message : String(err));
        throw new WriteError(`cannot write the report to ${out}: ${why}`, out);
      }
    }
    for (const p of r.problems) io.stderr(`loopwright report: not in the report: ${p}\n`);
    if (has(a, 'json')) io.stdout(toJson({ out, title: r.title, fingerprint: r.fingerprint, bytes: r.html.length, problems: r.problems }));
    else if (out !== '-')
      io.stdout(
        `report of "${r.title}" written to ${out} (${Math.round(r.html.length / 1024)} kB${r.problems.length ? `; ${r.problems.length} part(s) could not be computed, see the report` : ''})\n`,
      );
    return 0;
  },
};
