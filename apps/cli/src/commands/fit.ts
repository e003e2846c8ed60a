import { emptyDiagram } from '@loopwright/graph';
import { InputError } from '@loopwright/lti';
import { runStudy, type FittedModel } from '@loopwright/study';
import { has, one, parseArgs, toJson } from '../args.ts';
import { UsageError, type Command } from '../io.ts';
import { fmtNumber, readDiagramText } from './diagram-input.ts';

const help = `loopwright fit DATA.csv [--model fopdt|sopdt|ipdt|all] [--time COL --input COL --output COL] [--json]

Fits a process model to a logged plant test (a test log: CSV with time, input and output
columns; "-" reads standard input) by nonlinear least squares on the response to the input
actually recorded, in deviations from the initial steady state:

  fopdt   K·e^(-θs)/(τs + 1)              first order plus dead time (the default)
  sopdt   K·e^(-θs)/((τ1·s + 1)(τ2·s + 1)) second order plus dead time, two real lags
  ipdt    K·e^(-θs)/s                      integrating plus dead time
  all     the three, one after the other

Reported: the parameters with approximate 95 % intervals (from the Jacobian), the normalised
RMS error (RMS residual over the output's range), warnings about the fit, and the model as an
expression the editor and --model of "loopwright tune" accept.

  --time COL, --input COL, --output COL   columns by header name or 1-based position
                                          (default 1, 2, 3)
  --separator SEP    "," ";" or "tab" (default: from the first line)
  --decimal MARK     "." or "," (default: from the data)
  --time-unit U      unit of a numeric time column: s (default), ms, min, h
  --between MODE     the input between samples: linear (default) or hold (a digital
                     controller's output)
  --json             machine-readable: model, gain, timeConstants (largest first; empty for
                     ipdt), deadTime, nrmse, intervals, confidence, expression, warnings, and
                     the test log's file name, SHA-256, columns and samples

A fitted model is only as good as the test behind it: check the residuals and intervals.
`;

const SEPARATORS: Record<string, ',' | ';' | '\t'> = { ',': ',', ';': ';', tab: '\t', '\t': '\t' };

function fitJson(f: FittedModel) {
  const p = f.provenance.source;
  return {
    ...f.summary,
    testLog: { fileName: p.fileName, sha256: p.sha256, columns: p.columns, samples: p.samples, firstRow: p.firstRow, lastRow: p.lastRow },
  };
}

const interval = (i: [number, number] | null) => (i ? `[${fmtNumber(i[0], 4)}, ${fmtNumber(i[1], 4)}]` : '(not determined)');

function fitText(f: FittedModel): string {
  const m = f.model;
  const lines = [`${m.kind.toUpperCase()}  ${f.expression}`];
  lines.push(`  gain          ${fmtNumber(m.gain, 5)}  ${interval(f.intervals.gain)}`);
  m.timeConstants.forEach((t, i) => lines.push(`  lag ${i + 1}         ${fmtNumber(t, 5)} s  ${interval(f.intervals.timeConstants[i])}`));
  lines.push(`  dead time     ${fmtNumber(m.deadTime, 5)} s  ${interval(f.intervals.deadTime)}`);
  lines.push(
    `  NRMSE         ${fmtNumber(100 * f.nrmse, 3)} % of the output's range (${f.samples} samples, intervals at ${100 * f.confidence} %)`,
  );
  for (const w of f.warnings) lines.push(`  warning: ${w}`);
  return lines.join('\n');
}

export const fitCommand: Command = {
  name: 'fit',
  summary: 'fit a process model (FOPDT, SOPDT, IPDT) to a logged plant test',
  help,
  async run(argv, io) {
    const a = parseArgs(argv, ['model', 'time', 'input', 'output', 'separator', 'decimal', 'time-unit', 'between'], ['json']);
    if (a.positional.length !== 1) throw new UsageError('fit: give exactly one test log DATA.csv (see --help)');
    const file = a.positional[0];
    const model = one(a, 'model') ?? 'fopdt';
    const kinds = model === 'all' ? (['fopdt', 'sopdt', 'ipdt'] as const) : [model];
    for (const k of kinds)
      if (!['fopdt', 'sopdt', 'ipdt'].includes(k)) throw new UsageError(`--model: "${k}" is not one of fopdt, sopdt, ipdt, all`, '--model');
    const sep = one(a, 'separator');
    if (sep !== undefined && !(sep in SEPARATORS)) throw new UsageError(`--separator: "${sep}" is not one of "," ";" tab`, '--separator');
    const decimal = one(a, 'decimal');
    if (decimal !== undefined && decimal !== '.' && decimal !== ',')
      throw new UsageError(`--decimal: "${decimal}" is not "." or ","`, '--decimal');
    const unit = one(a, 'time-unit');
    if (unit !== undefined && !['s', 'ms', 'min', 'h'].includes(unit))
      throw new UsageError(`--time-unit: "${unit}" is not one of s, ms, min, h`, '--time-unit');
    const between = one(a, 'between');
    if (between !== undefined && between !== 'linear' && between !== 'hold')
      throw new UsageError(`--between: "${between}" is not linear or hold`, '--between');
    const col = (name: string) => {
      const v = one(a, name);
      return v === undefined ? {} : { [name]: /^\d+$/.test(v) ? Number(v) : v };
    };
    const csv = await readDiagramText(io, file);
    const r = runStudy(emptyDiagram(), {
      kind: 'fit',
      csv,
      fileName: file === '-' ? 'standard input' : file.replace(/^.*[\\/]/, ''),
      models: kinds as ('fopdt' | 'sopdt' | 'ipdt')[],
      ...col('time'),
      ...col('input'),
      ...col('output'),
      ...(sep !== undefined ? { separator: SEPARATORS[sep] } : {}),
      ...(decimal !== undefined ? { decimal: decimal as '.' | ',' } : {}),
      ...(unit !== undefined ? { timeUnit: unit as 's' } : {}),
      ...(between !== undefined ? { between: between as 'linear' | 'hold' } : {}),
    });
    const fits = r.fits.map((f) => {
      if (!f.result.ok) {
        if (f.result.reason === 'internal') throw new Error(f.result.error.replace(/^internal error: /, ''));
        throw new InputError(`${f.model}: ${f.result.error}`, f.result.at ? { field: f.result.at } : {});
      }
      return f.result.value;
    });
    if (has(a, 'json')) {
      io.stdout(toJson(model === 'all' ? { fits: fits.map(fitJson), caution: r.caution } : { ...fitJson(fits[0]), caution: r.caution }));
      return 0;
    }
    const log = r.log;
    const out = [
      `${log.fileName}: ${log.samples} samples (rows ${log.firstRow}–${log.lastRow}), time '${log.columns.time}', input '${log.columns.input}', output '${log.columns.output}'`,
      '',
    ];
    out.push(fits.map(fitText).join('\n\n'), '', r.caution);
    io.stdout(out.join('\n') + '\n');
    return 0;
  },
};
