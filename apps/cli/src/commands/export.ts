import { runStudy, testVectorToJson } from '@loopwright/study';
import { all, has, numberFlag, one, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, WriteError, type Command } from '../io.ts';
import { checkSets, readDiagram } from './diagram-input.ts';

const help = `loopwright export FILE --block ID --lang c|st|coefficients [--out DIR] [--name NAME] [--set NAME=VALUE ...] [--json]

The code that implements a sampled controller block (a PID, lead-lag, transfer-function or gain
block with a sample time) of the diagram FILE (.loop.json; "-" reads standard input):

  c             NAME.h and NAME.c: a coefficient struct, a state struct and NAME_reset,
                NAME_step (one call per sample) and NAME_retune (bumpless parameter change);
                output limits and anti-windup as in the block; plus NAME_check.c, a program
                that replays the test vector and exits non-zero on a mismatch
  st            NAME.st: one IEC 61131-3 Structured Text function block
  coefficients  NAME.txt: the difference equation and its coefficients

Every export comes with a test vector NAME.vector.json: a deterministic input sequence and the
outputs the block gives for it, one per sample from rest, so that a port can be checked
(|u - expected| <= tolerance * max(1, |expected|), tolerance 1e-9).

  --block ID       the sampled controller block
  --lang L         c, st or coefficients
  --out DIR        write the files into the existing directory DIR (default: print them)
  --name NAME      identifier stem of the code (default: from the block id)
  --samples N      samples in the test vector (default 400)
  --set NAME=V     use V for the named parameter NAME (repeatable)
  --json           print {files: [{path, text}], testVector, summary} as JSON

The code does not add the computation delay: it is the time the hardware takes to apply the
output. Validate the controller on the real plant with limits and interlocks in place, and
follow the applicable functional-safety standards and local codes.

Example: npx loopwright export axis.loop.json --block speed-pi --lang c --out build/
`;

export const exportCommand: Command = {
  name: 'export',
  summary: 'C, Structured Text or coefficients of a sampled controller block, with a test vector',
  help,
  async run(argv, io) {
    const a = parseArgs(argv, ['block', 'lang', 'out', 'name', 'samples', 'set'], ['json']);
    if (a.positional.length !== 1) throw new UsageError('export needs exactly one diagram FILE (see loopwright export --help)');
    const block = one(a, 'block');
    if (!block) throw new UsageError('export: give the sampled controller block as --block ID', '--block');
    const lang = one(a, 'lang');
    if (lang !== 'c' && lang !== 'st' && lang !== 'coefficients')
      throw new UsageError(`export: --lang must be c, st or coefficients${lang ? `, not "${lang}"` : ''}`, '--lang');
    const overrides = parseAssignments(all(a, 'set'), 'set');
    const samples = numberFlag(a, 'samples');
    const name = one(a, 'name');
    const d = await readDiagram(io, a.positional[0]);
    checkSets(d, overrides);
    const res = runStudy(d, {
      kind: 'export',
      block,
      lang,
      overrides,
      ...(name !== undefined ? { name } : {}),
      ...(samples !== undefined ? { samples } : {}),
    });
    const files = [...res.files, { path: `${res.name}.vector.json`, text: testVectorToJson(res.testVector) + '\n' }];
    const out = one(a, 'out');
    if (out !== undefined) {
      const dir = out.replace(/\/+$/, '') || '/';
      for (const f of files) {
        const path = `${dir}/${f.path}`;
        try {
          await io.writeFile(path, f.text);
        } catch (err) {
          throw new WriteError(`cannot write ${path}: ${err instanceof Error ? err.message : String(err)}`, path);
        }
      }
    }
    if (has(a, 'json')) {
      io.stdout(
        toJson({
          block: res.block,
          name: res.name,
          lang: res.lang,
          files: out !== undefined ? files.map((f) => ({ path: `${out.replace(/\/+$/, '')}/${f.path}` })) : files,
          testVector: JSON.parse(testVectorToJson(res.testVector)),
          summary: res.summary,
        }),
      );
      return 0;
    }
    if (out !== undefined) {
      io.stdout(`${res.summary.trimEnd()}\n\nwrote ${files.map((f) => `${out.replace(/\/+$/, '')}/${f.path}`).join(', ')}\n`);
      return 0;
    }
    io.stdout(
      files
        .filter((f) => !f.path.endsWith('.vector.json') && !f.path.endsWith('_check.c'))
        .map((f) => `// ---- ${f.path}\n${f.text.trimEnd()}\n`)
        .join('\n'),
    );
    return 0;
  },
};
