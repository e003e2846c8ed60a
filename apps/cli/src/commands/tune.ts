import { emptyDiagram, serializeDiagram } from '@loopwright/graph';
import {
  TUNE_RULES,
  applyControllerPatch,
  runStudy,
  transferText,
  type CascadeData,
  type MarginsData,
  type TuneData,
} from '@loopwright/study';
import { all, has, numberFlag, one, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, WriteError, type Command } from '../io.ts';
import { checkSets, fmtNumber, fmtTransfer, jsonForm, readDiagram } from './diagram-input.ts';

const help = `loopwright tune (--model EXPR | FILE [--cut CUT]) --rule RULE [options] [--json]

Suggests PID settings for a loop, with the loop's predicted gain, phase and delay margins and
peak sensitivity Ms before anything is applied.

What is tuned:
  --model EXPR      what the controller sees, as an expression, e.g. "0.8*exp(-20*s)/(90*s+1)"
                    (the form "loopwright fit" prints)
  FILE --cut CUT    a loop of a diagram (.loop.json; "-" reads standard input), by its cut
                    (default: the diagram's active or first cut). The controller is the first
                    PID block on the loop after the junction the cut wire enters (or --block
                    ID); it sees P = L/C, the loop at the cut divided by the controller.
  --reading MODE    inner-first (default): the loops around this one opened, as a cascade is
                    commissioned; closed: every other loop closed
  FILE --cascade    every loop inner-first, innermost first, each with the tuned inner loops
                    closed; then the separation ratios (flagged below 3)

Rules (--rule):
  simc         SIMC (Skogestad 2003), --tau-c V (default θ)
  lambda       lambda / IMC, --lambda V (default: the largest lag; 3θ for an integrating process)
  amigo        AMIGO (Åström & Hägglund 2004)
  zn-step      Ziegler–Nichols step response
  zn-ultimate  Ziegler–Nichols ultimate gain: Ku and Pu from the loop's own exact jω crossing
  ms           largest integral gain with Ms ≤ --ms-max (default 1.4), optional --pm-min DEG
               and --gm-min V floors, on the full loop with its dead time
The model-based rules use P itself when it is first or second order (or integrating) with dead
time, else P reduced by Skogestad's half rule, else a least-squares fit to P's step response.

  --controller K    pi (default), pid, or p where the rule gives one
  --n N             the PID block's derivative filter (default: the block's, else 10)
  --block ID        the controller block (FILE: instead of the one found; FILE --model EXPR:
                    the block --write sets)
  --set NAME=V      override a named parameter of FILE (repeatable)
  --param NAME=V    value of a name used in --model (repeatable)
  --write OUT       write FILE with the suggestion applied to OUT (.loop.json)
  --json            rule, controller {kp, ti, td} in the PID block's ideal form
                    kp·(1 + 1/(ti·s) + td·s/(1 + td·s/n)) (ti null: no integral action), n,
                    model (the low-order model a rule used, or null), predicted {ms, gainMargin,
                    phaseMarginDeg, delayMargin, closedLoopStable}, today's figures, the tuned
                    loop as an expression "loopwright margins --loop" reads, notes

Suggested settings are starting points: commission them in small steps with output limits and
interlocks in place, and follow the applicable safety standards and licensed practice.
`;

const figures = (m: MarginsData) => ({
  ms: m.peakSensitivity,
  gainMargin: m.gainMargin,
  phaseMarginDeg: m.phaseMarginDeg,
  delayMargin: m.delayMargin,
  gainCrossover: m.gainCrossover,
  closedLoopStable: m.closedLoopStable,
});

const loopTf = (t: TuneData['loop']) => ({ rational: { num: t.num, den: t.den }, delay: t.delay });

export function tuneJson(r: TuneData) {
  return {
    rule: r.rule,
    controller: { kind: r.controller.kind, kp: r.controller.kp, ti: r.controller.ti, td: r.controller.td },
    n: r.derivativeFilter,
    model: r.model,
    modelFrom: r.modelFrom,
    settings: r.settings,
    ultimate: r.ultimate,
    predicted: figures(r.predicted),
    current: r.current ? figures(r.current) : null,
    source: r.source,
    cut: r.cut,
    reading: r.reading,
    opened: r.opened,
    block: r.block,
    process: transferText(loopTf(r.process)),
    processExact: r.processExact,
    loop: transferText(loopTf(r.loop)),
    apply: r.apply,
    notes: r.notes,
    caution: r.caution,
  };
}

const f = (x: number | null, unit = '', digits = 4) => (x === null ? '—' : `${fmtNumber(x, digits)}${unit}`);
const gm = (m: MarginsData) => (m.gainMargin === null ? '∞' : fmtNumber(m.gainMargin, 4));
const row = (name: string, m: MarginsData) =>
  `  ${name.padEnd(10)} GM ${gm(m).padEnd(8)} PM ${f(m.phaseMarginDeg, '°').padEnd(9)} DM ${f(m.delayMargin, ' s').padEnd(11)} Ms ${f(m.peakSensitivity).padEnd(7)} crossover ${f(m.gainCrossover, ' rad/s')}  ${m.closedLoopStable ? 'stable' : 'UNSTABLE'}`;
const setting = (s: TuneData['controller'], n: number) =>
  `kp = ${fmtNumber(s.kp, 5)}, ti = ${s.ti === null ? 'none' : `${fmtNumber(s.ti, 5)} s`}, td = ${fmtNumber(s.td, 5)} s${s.td > 0 ? ` (n = ${fmtNumber(n, 4)})` : ''}`;

function tuneText(r: TuneData): string {
  const out: string[] = [];
  if (r.cut)
    out.push(
      `loop: cut ${r.cut.id}${r.cut.label !== r.cut.id ? ` (${r.cut.label})` : ''} on wire ${r.cut.wire}, read ${r.reading}${r.opened.length ? ` (opened ${r.opened.join(', ')})` : ''}`,
    );
  if (r.block) out.push(`controller: block ${r.block.id}; today ${setting(r.block.current, r.block.derivativeFilter)}`);
  out.push(
    `process seen by the controller: P(s) = ${fmtTransfer(r.process.num, r.process.den, r.process.delay)}${r.processExact ? '' : '  (divided by today’s controller)'}`,
  );
  if (r.model)
    out.push(
      `model used (${r.modelFrom}): ${r.model.kind.toUpperCase()} gain ${fmtNumber(r.model.gain, 5)}, lags ${r.model.timeConstants.map((t) => `${fmtNumber(t, 5)} s`).join(', ') || 'none'}, dead time ${fmtNumber(r.model.deadTime, 5)} s`,
    );
  if (r.ultimate)
    out.push(`ultimate gain Ku = ${fmtNumber(r.ultimate.ku, 6)}, period Pu = ${fmtNumber(r.ultimate.pu, 6)} s (${r.ultimate.from})`);
  out.push('', `${r.rule}: ${setting(r.controller, r.derivativeFilter)}`, '');
  if (r.current) out.push(row('today', r.current));
  out.push(row('suggested', r.predicted));
  if (r.notes.length) out.push('', ...r.notes.map((n) => `note: ${n}`));
  out.push('', r.caution);
  return out.join('\n') + '\n';
}

function cascadeText(c: CascadeData): string {
  const out: string[] = [`cascade, innermost first, rule ${c.rule}:`];
  for (const s of c.steps) {
    out.push('', `${s.cut}${s.label !== s.cut ? ` (${s.label})` : ''}, ${s.depth} loop${s.depth === 1 ? '' : 's'} around it:`);
    if (!s.result.ok) {
      out.push(`  not tuned: ${s.result.error}`);
      continue;
    }
    const r = s.result.value;
    out.push(`  block ${r.block?.id}: ${setting(r.controller, r.derivativeFilter)}`, row('inner-first', r.predicted));
  }
  out.push('', 'with every suggestion applied, every other loop closed:');
  for (const x of c.final) out.push(row(x.cut, x.margins));
  for (const s of c.separations)
    out.push(`  separation ${s.inner} in ${s.outer}: ${s.ratio === null ? '—' : `${fmtNumber(s.ratio, 3)}×`}${s.flag ? ' [LOW]' : ''}`);
  if (c.notes.length) out.push('', ...c.notes.map((n) => `note: ${n}`));
  out.push('', c.caution);
  return out.join('\n') + '\n';
}

export const tuneCommand: Command = {
  name: 'tune',
  summary: 'PID settings for a loop or a model: published rules or an Ms bound, with predicted margins',
  help,
  async run(argv, io) {
    const a = parseArgs(
      argv,
      [
        'model',
        'cut',
        'rule',
        'tau-c',
        'lambda',
        'ms-max',
        'pm-min',
        'gm-min',
        'controller',
        'n',
        'reading',
        'block',
        'set',
        'param',
        'write',
        'pade-order',
      ],
      ['json', 'cascade'],
    );
    const rule = one(a, 'rule');
    if (rule === undefined) throw new UsageError(`tune: give the rule as --rule ${TUNE_RULES.join('|')}`, '--rule');
    if (!(TUNE_RULES as readonly string[]).includes(rule))
      throw new UsageError(`--rule: "${rule}" is not one of ${TUNE_RULES.join(', ')}`, '--rule');
    const controller = one(a, 'controller');
    if (controller !== undefined && !['p', 'pi', 'pid'].includes(controller))
      throw new UsageError(`--controller: "${controller}" is not one of p, pi, pid`, '--controller');
    const reading = one(a, 'reading');
    if (reading !== undefined && reading !== 'inner-first' && reading !== 'closed')
      throw new UsageError(`--reading: "${reading}" is not inner-first or closed`, '--reading');
    const model = one(a, 'model');
    const file = a.positional[0];
    if (a.positional.length > 1) throw new UsageError(`tune: unexpected argument "${a.positional[1]}"`);
    if (model === undefined && file === undefined) throw new UsageError('tune: give --model "<expression>" or a diagram FILE (see --help)');
    if (model !== undefined && (has(a, 'cut') || has(a, 'cascade')))
      throw new UsageError(
        'tune: --cut and --cascade read a loop of the diagram; --model tunes the expression instead',
        has(a, 'cut') ? '--cut' : '--cascade',
      );
    const write = all(a, 'write');
    if (write.length > 1) throw new UsageError('flag --write given more than once', '--write');
    if (has(a, 'cascade') && has(a, 'cut')) throw new UsageError('tune: --cascade tunes every loop; leave out --cut', '--cut');
    const opt = (flag: string, key: string) => {
      const v = numberFlag(a, flag);
      return v === undefined ? {} : { [key]: v };
    };
    const common = {
      rule: rule as TuneData['rule'],
      ...(controller !== undefined ? { controller: controller as 'p' | 'pi' | 'pid' } : {}),
      ...opt('tau-c', 'tauC'),
      ...opt('lambda', 'lambda'),
      ...opt('ms-max', 'msMax'),
      ...opt('pm-min', 'pmMinDeg'),
      ...opt('gm-min', 'gmMin'),
      ...opt('n', 'derivativeFilter'),
      ...opt('pade-order', 'padeOrder'),
    };
    const block = one(a, 'block');
    const d = file !== undefined ? await readDiagram(io, file) : emptyDiagram();
    const sets = parseAssignments(all(a, 'set'), 'set');
    checkSets(d, sets);
    if (has(a, 'cascade')) {
      const c = runStudy(d, { kind: 'cascade', ...common, overrides: sets, responses: false });
      if (write.length) await writeTuned(io, write[0], c.apply.reduce(applyControllerPatch, d));
      io.stdout(
        has(a, 'json')
          ? toJson(
              jsonForm({
                ...c,
                steps: c.steps.map((s) => ({ ...s, result: s.result.ok ? { ok: true, value: tuneJson(s.result.value) } : s.result })),
              }),
            )
          : cascadeText(c),
      );
      return 0;
    }
    const r = runStudy(d, {
      kind: 'tune',
      ...common,
      ...(model !== undefined
        ? { model, params: parseAssignments(all(a, 'param'), 'param') }
        : { cut: one(a, 'cut') ?? null, overrides: sets }),
      ...(reading !== undefined ? { reading: reading as 'inner-first' | 'closed' } : {}),
      ...(block !== undefined ? { block } : {}),
      responses: false,
    });
    if (write.length) {
      if (!r.apply)
        throw new UsageError('tune --write: there is no controller block to write (with --model, name it with --block)', '--write');
      await writeTuned(io, write[0], applyControllerPatch(d, r.apply));
    }
    io.stdout(has(a, 'json') ? toJson(jsonForm(tuneJson(r))) : tuneText(r));
    return 0;
  },
};

async function writeTuned(io: Parameters<Command['run']>[1], path: string, d: Parameters<typeof serializeDiagram>[0]): Promise<void> {
  try {
    await io.writeFile(path, serializeDiagram(d));
  } catch (err) {
    throw new WriteError(`cannot write ${path}: ${err instanceof Error ? err.message : String(err)}`, path);
  }
}
