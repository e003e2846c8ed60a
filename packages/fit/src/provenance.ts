import type { ProcessFit } from './fit.ts';
import type { ProcessModel } from './process-model.ts';
import type { InputInterpolation } from './response.ts';
import type { TestLog } from './test-log.ts';

/**
 * Where a fitted model came from, as plain data a diagram can store beside the block it set:
 * the test log's file name and SHA-256 (of its text's UTF-8 bytes, or of the file's bytes when
 * the caller hashed those), the columns and samples used, the model and its expression, the
 * fit quality and intervals, and the date of the fit (ISO 8601, UTC).
 */
export interface FitProvenance {
  kind: 'fit';
  source: {
    fileName: string | null;
    sha256: string | null;
    columns: TestLog['columns'];
    samples: number;
    firstRow: number | null;
    lastRow: number | null;
  };
  model: ProcessModel;
  expression: string;
  quality: { nrmse: number; rmse: number; confidence: number };
  intervals: ProcessFit['intervals'];
  method: { between: InputInterpolation; operatingPoint: ProcessFit['operatingPoint'] };
  fittedAt: string;
}

export function fitProvenance(log: Pick<TestLog, 'rows' | 'columns' | 'source'>, fit: ProcessFit, date: Date = new Date()): FitProvenance {
  return {
    kind: 'fit',
    source: {
      fileName: log.source.fileName,
      sha256: log.source.sha256,
      columns: { ...log.columns },
      samples: fit.samples,
      firstRow: log.rows ? log.rows[0] : null,
      lastRow: log.rows ? log.rows[log.rows.length - 1] : null,
    },
    model: { ...fit.model, timeConstants: [...fit.model.timeConstants] },
    expression: fit.expression,
    quality: { nrmse: fit.nrmse, rmse: fit.rmse, confidence: fit.confidence },
    intervals: structuredCopy(fit.intervals),
    method: { between: fit.between, operatingPoint: { ...fit.operatingPoint } },
    fittedAt: date.toISOString(),
  };
}

const structuredCopy = <T>(x: T): T => JSON.parse(JSON.stringify(x)) as T;

/** The caution shown beside every fit (editor, CLI, report). */
export const FIT_CAUTION =
  'A fitted model is only as good as the test behind it: check the residuals and the intervals, and repeat the test around other operating points before relying on it.';
