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
  type InputInterpolation,
  type TestLogCsvOptions,
  type ProcessModelKind,
} from '@loopwright/fit';
import { InputError } from '@loopwright/lti';
import { part } from './part.ts';
import type { FitData, TestLogData } from './types.ts';

/** A CSV test log's text and how to read it (@loopwright/fit parseTestLogCsv's options). */
export interface TestLogRequest extends TestLogCsvOptions {
  /** The file's text. */
  csv: string;
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

export function testLogStudy(req: TestLogRequest): TestLogData {
  const t = testLogColumns(req.csv, req);
  const name = (ref: TestLogCsvOptions['time'], fallback: number) => {
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
  const { csv, models: _models, between, confidence, fittedAt: _date, ...options } = req;
  const log = parseTestLogCsv(csv, options);
  const fits = models.map((model) => ({
    model,
    result: part(() => {
      const fit = fitProcessModel(log, {
        model,
        ...(between ? { between } : {}),
        ...(confidence !== undefined ? { confidence } : {}),
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
