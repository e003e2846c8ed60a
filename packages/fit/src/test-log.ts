import { InputError } from '@loopwright/lti';

/**
 * A test log: a logged plant test (e.g. a bump test) as three aligned series, in the units of
 * the log (time in seconds). `rows` are the 1-based rows of the source file (header counted)
 * so that every later error can point at the file; `columns` name the columns as the file does.
 */
export interface TestLog {
  time: number[];
  input: number[];
  output: number[];
  /** The 1-based file row of each sample (null when the log did not come from a file). */
  rows: number[] | null;
  columns: { time: string; input: string; output: string };
  /** The source: file name as given, SHA-256 of its text (hex), and how it was read. */
  source: {
    fileName: string | null;
    sha256: string | null;
    separator: string | null;
    decimal: '.' | ',' | null;
    header: boolean;
    timeFormat: TimeFormat;
  };
}

export type TimeFormat = 'seconds' | 'clock' | 'date-time';

/** The fewest samples a fit accepts. */
export const MIN_SAMPLES = 10;

/**
 * An InputError about a test log that names the file row (1-based, header counted) and the
 * column (as the file names it) at fault; `row`/`column` are null where the fault is not
 * tied to one. The CLI and editor treat it like any InputError.
 */
export class TestLogError extends InputError {
  constructor(
    message: string,
    readonly row: number | null,
    readonly column: string | null,
  ) {
    super(message, { field: column ?? 'test log' });
  }
}

const where = (log: Pick<TestLog, 'rows'>, i: number) => (log.rows ? `row ${log.rows[i]}` : `sample ${i + 1}`);

/**
 * Checks a log for what a fit needs and throws TestLogError naming row and column: at least
 * MIN_SAMPLES samples, finite numbers, strictly increasing time, an input that changes and an
 * output that moves. With a known initial steady state `from` (a log that starts at the step),
 * input and output need only differ from it somewhere.
 */
export function checkTestLog(
  log: Pick<TestLog, 'time' | 'input' | 'output' | 'rows' | 'columns'>,
  from?: { input: number; output: number },
): void {
  const { time, input, output, columns } = log;
  const n = time.length;
  if (input.length !== n || output.length !== n) {
    throw new TestLogError(
      `the test log's columns differ in length: time ${n}, input ${input.length}, output ${output.length}`,
      null,
      null,
    );
  }
  if (n < MIN_SAMPLES) {
    throw new TestLogError(`the test log has ${n} sample${n === 1 ? '' : 's'}; a fit needs at least ${MIN_SAMPLES}`, null, null);
  }
  const series: [number[], string][] = [
    [time, columns.time],
    [input, columns.input],
    [output, columns.output],
  ];
  for (let i = 0; i < n; i++) {
    for (const [s, name] of series) {
      if (!Number.isFinite(s[i]))
        throw new TestLogError(`${where(log, i)}, column '${name}': ${s[i]} is not a finite number`, log.rows?.[i] ?? null, name);
    }
    if (i > 0 && !(time[i] > time[i - 1])) {
      throw new TestLogError(
        `${where(log, i)}, column '${columns.time}': time ${time[i]} is not after the previous sample's ${time[i - 1]} (time must increase)`,
        log.rows?.[i] ?? null,
        columns.time,
      );
    }
  }
  const u0 = from ? from.input : input[0];
  const y0 = from ? from.output : output[0];
  const against = from ? ', the operating point' : '';
  if (input.every((v) => v === u0)) {
    throw new TestLogError(
      `column '${columns.input}' (input): the input never changes (every sample is ${u0}${against}), so there is no test to fit`,
      null,
      columns.input,
    );
  }
  if (output.every((v) => v === y0)) {
    throw new TestLogError(
      `column '${columns.output}' (output): the output never moves (every sample is ${y0}${against}), so there is no response to fit`,
      null,
      columns.output,
    );
  }
}

/** A test log from arrays already in memory (checked as checkTestLog does). */
export function testLogFromArrays(
  data: { time: readonly number[]; input: readonly number[]; output: readonly number[] },
  columns: TestLog['columns'] = { time: 'time', input: 'input', output: 'output' },
): TestLog {
  const log: TestLog = {
    time: [...data.time],
    input: [...data.input],
    output: [...data.output],
    rows: null,
    columns: { ...columns },
    source: { fileName: null, sha256: null, separator: null, decimal: null, header: false, timeFormat: 'seconds' },
  };
  checkTestLog(log);
  return log;
}
