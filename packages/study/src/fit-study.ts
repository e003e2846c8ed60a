/**
 * Test logs and fits as studies: a CSV test log's columns (for a column picker), and process
 * models fitted to it by @loopwright/fit (least squares on the input actually recorded, with
 * intervals, residuals and provenance). Neither depends on the diagram.
 */
import {
  FIT_CAUTION,
  PROCESS_MODEL_KINDS,
  fitProcessModel,
  fitProvenance,
  fitSummary,
  parseTestLogCsv,
  testLogColumns,
  type ColumnRef,
  type CsvSeparator,
  type InputInterpolation,
  type ProcessModelKind,
} from '@loopwright/fit';
import { InputError } from '@loopwright/lti';
import { part } from './part.ts';
import type { FitData, TestLogData } from './types.ts';

/** How to read a CSV test log (see @loopwright/fit parseTestLogCsv). */
export interface TestLogRequest {
  /** The file's text. */
  csv: string;
  fileName?: string;
  /** SHA-256 of the file's bytes when the caller hashed them (default: of the text's UTF-8). */
  sha256?: string;
  time?: ColumnRef;
  input?: ColumnRef;
  output?: ColumnRef;
  separator?: CsvSeparator | 'auto';
  decimal?: '.' | ',' | 'auto';
  header?: boolean | 'auto';
  timeUnit?: 's' | 'ms' | 'min' | 'h';
}

export interface FitRequest extends TestLogRequest {
  /** Models to fit (default: all three, fopdt, sopdt, ipdt). */
  models?: ProcessModelKind[];
  /** The input between samples (default 'linear'; 'hold' for a digital controller's output). */
  between?: InputInterpolation;
  confidence?: number;
  /** Date of the fit for its provenance, ISO 8601 (default: now). */
  fittedAt?: string;
}

const csvOptions = (r: TestLogRequest) => ({
  ...(r.separator !== undefined ? { separator: r.separator } : {}),
  ...(r.decimal !== undefined ? { decimal: r.decimal } : {}),
  ...(r.header !== undefined ? { header: r.header } : {}),
});

export function testLogStudy(req: TestLogRequest): TestLogData {
  const t = testLogColumns(req.csv, csvOptions(req));
  const name = (ref: ColumnRef | undefined, fallback: number) => {
    if (ref === undefined) return t.names[fallback - 1] ?? `column ${fallback}`;
    if (typeof ref === 'number') return t.names[ref - 1] ?? `column ${ref}`;
    return t.names.find((n) => n === ref) ?? t.names.find((n) => n.toLowerCase() === ref.toLowerCase()) ?? ref;
  };
  return {
    fileName: req.fileName ?? null,
    columns: t.names,
    header: t.header,
    separator: t.separator,
    decimal: t.decimal,
    rows: t.rows,
    chosen: { time: name(req.time, 1), input: name(req.input, 2), output: name(req.output, 3) },
  };
}

export function fitStudy(req: FitRequest): FitData {
  const models = req.models ?? [...PROCESS_MODEL_KINDS];
  if (!Array.isArray(models) || models.length === 0)
    throw new InputError('models: give at least one of fopdt, sopdt, ipdt', { field: 'models' });
  for (const m of models) {
    if (!PROCESS_MODEL_KINDS.includes(m))
      throw new InputError(`model: '${String(m)}' is not one of ${PROCESS_MODEL_KINDS.join(', ')}`, { field: 'model' });
  }
  const date = req.fittedAt === undefined ? new Date() : new Date(req.fittedAt);
  if (Number.isNaN(date.getTime())) throw new InputError(`fittedAt: '${req.fittedAt}' is not a date`, { field: 'fittedAt' });
  const log = parseTestLogCsv(req.csv, {
    ...csvOptions(req),
    ...(req.time !== undefined ? { time: req.time } : {}),
    ...(req.input !== undefined ? { input: req.input } : {}),
    ...(req.output !== undefined ? { output: req.output } : {}),
    ...(req.timeUnit !== undefined ? { timeUnit: req.timeUnit } : {}),
    ...(req.fileName !== undefined ? { fileName: req.fileName } : {}),
    ...(req.sha256 !== undefined ? { sha256: req.sha256 } : {}),
  });
  const fits = models.map((model) => ({
    model,
    result: part(() => {
      const fit = fitProcessModel(log, {
        model,
        ...(req.between ? { between: req.between } : {}),
        ...(req.confidence !== undefined ? { confidence: req.confidence } : {}),
      });
      return { ...fit, summary: fitSummary(fit), provenance: fitProvenance(log, fit, date) };
    }),
  }));
  return {
    log: {
      fileName: log.source.fileName,
      sha256: log.source.sha256,
      columns: { ...log.columns },
      samples: log.time.length,
      firstRow: log.rows ? log.rows[0] : null,
      lastRow: log.rows ? log.rows[log.rows.length - 1] : null,
      time: log.time,
      input: log.input,
      output: log.output,
    },
    fits,
    caution: FIT_CAUTION,
  };
}
