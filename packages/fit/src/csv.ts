import { dsvFormat } from 'd3-dsv';
import { InputError } from '@loopwright/lti';
import { sha256 } from './sha256.ts';
import { type TestLog, type TimeFormat, TestLogError, checkTestLog } from './test-log.ts';

/**
 * Reading a test log from CSV text with d3-dsv (quoting and line endings handled there).
 *
 * - Separator: ',' ';' or tab; 'auto' (default) picks ';' if the first line has one, else tab,
 *   else ','.
 * - Decimal mark: '.' or ','; 'auto' (default) takes ',' only when the separator is not ',' and
 *   the first data rows write numbers with a comma and no point. No thousands separators.
 * - Header: true/false, or 'auto' (default): the first row is a header when one of its cells is
 *   neither a number nor a time.
 * - Columns: a header name (exact, then case-insensitive) or a 1-based column position (a
 *   number, or a string of digits that is no header's name). Defaults: columns 1, 2, 3 are time,
 *   input, output.
 * - Time: seconds (scaled by `timeUnit`), or clock times hh:mm:ss[.fff] (a day is added where
 *   the clock wraps past midnight), or ISO 8601 date-times YYYY-MM-DD[T ]hh:mm:ss[.fff][Z|±hh:mm];
 *   clock and date-times are converted to seconds after the first sample.
 * Lines starting with '#' and blank lines are skipped; a leading byte-order mark is dropped.
 * Every bad cell is a TestLogError naming the file row (1-based, header counted) and column.
 */
export type ColumnRef = string | number;
export type CsvSeparator = ',' | ';' | '\t';

export interface TestLogCsvOptions {
  time?: ColumnRef;
  input?: ColumnRef;
  output?: ColumnRef;
  separator?: CsvSeparator | 'auto';
  decimal?: '.' | ',' | 'auto';
  header?: boolean | 'auto';
  /** Unit of a numeric time column (default 's'). */
  timeUnit?: 's' | 'ms' | 'min' | 'h';
  /** The file's name, kept in the log's source (and so in a fit's provenance). */
  fileName?: string;
  /** The file's SHA-256 when the caller hashed its bytes; default: SHA-256 of the text's UTF-8. */
  sha256?: string;
}

const TIME_UNITS = { s: 1, ms: 1e-3, min: 60, h: 3600 } as const;
const CLOCK = /^(\d{1,2}):(\d{2}):(\d{2}(?:[.,]\d+)?)$/;
const ISO = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2}):(\d{2}(?:[.,]\d+)?)(Z|[+-]\d{2}:?\d{2})?$/;

function numberPattern(decimal: '.' | ','): RegExp {
  const d = decimal === '.' ? '\\.' : ',';
  return new RegExp(`^[+-]?(?:\\d+(?:${d}\\d*)?|${d}\\d+)(?:[eE][+-]?\\d+)?$`);
}

function parseNumber(cell: string, decimal: '.' | ',', pattern: RegExp): number | null {
  const c = cell.trim();
  if (!pattern.test(c)) return null;
  return Number(decimal === ',' ? c.replace(',', '.') : c);
}

/**
 * A clock time or ISO date-time as whole seconds (absolute) and a fraction, kept apart so
 * that differences between samples keep their sub-second digits (epoch seconds ~1.8e9 leave
 * only ~2e-7 s of resolution in one double).
 */
function parseTimeOfDay(cell: string): { whole: number; frac: number; format: TimeFormat } | null {
  const c = cell.trim();
  const seconds = (text: string) => {
    const s = Number(text.replace(',', '.'));
    return { whole: Math.floor(s), frac: s - Math.floor(s), ok: s < 61 };
  };
  let m = CLOCK.exec(c);
  if (m) {
    const [h, mi] = [Number(m[1]), Number(m[2])];
    const s = seconds(m[3]);
    if (h > 23 || mi > 59 || !s.ok) return null;
    return { whole: h * 3600 + mi * 60 + s.whole, frac: s.frac, format: 'clock' };
  }
  m = ISO.exec(c);
  if (m) {
    const [y, mo, d, h, mi] = [1, 2, 3, 4, 5].map((i) => Number(m![i]));
    const s = seconds(m[6]);
    if (mo < 1 || mo > 12 || d < 1 || d > 31 || h > 23 || mi > 59 || !s.ok) return null;
    let offset = 0;
    const z = m[7];
    if (z && z !== 'Z') {
      const digits = z.replace(':', '');
      offset = (z[0] === '-' ? -1 : 1) * (Number(digits.slice(1, 3)) * 3600 + Number(digits.slice(3, 5)) * 60);
    }
    return { whole: Date.UTC(y, mo - 1, d, h, mi, s.whole) / 1000 - offset, frac: s.frac, format: 'date-time' };
  }
  return null;
}

function detectSeparator(firstLine: string): CsvSeparator {
  if (firstLine.includes(';')) return ';';
  if (firstLine.includes('\t')) return '\t';
  return ',';
}

const sepName = (s: string) => (s === '\t' ? 'tab' : `'${s}'`);

interface CsvTable {
  separator: CsvSeparator;
  decimal: '.' | ',';
  pattern: RegExp;
  header: boolean;
  names: string[];
  data: { row: number; cells: string[] }[];
  width: number;
}

/** Records of the text (comments and blank lines skipped) with separator, decimal mark and header decided. */
function readTable(text: string, options: Pick<TestLogCsvOptions, 'separator' | 'decimal' | 'header'>): CsvTable {
  if (typeof text !== 'string') throw new InputError('test log: the CSV content must be text', { field: 'test log' });
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const firstLine = body.split(/\r\n|\r|\n/).find((l) => l.trim() !== '' && !l.trimStart().startsWith('#')) ?? '';
  if (firstLine === '') throw new TestLogError('test log: the file has no rows', null, null);
  const separator = !options.separator || options.separator === 'auto' ? detectSeparator(firstLine) : options.separator;
  if (![',', ';', '\t'].includes(separator)) {
    throw new InputError(`separator: '${separator}' is not one of ',' ';' or tab`, { field: 'separator' });
  }

  // Records with their 1-based file row (d3 counts records; a quoted newline keeps one record).
  const records: { row: number; cells: string[] }[] = [];
  dsvFormat(separator)
    .parseRows(body)
    .forEach((cells, i) => {
      if (cells.every((c) => c.trim() === '')) return;
      if (cells[0].trimStart().startsWith('#')) return;
      records.push({ row: i + 1, cells });
    });
  if (records.length === 0) throw new TestLogError('test log: the file has no rows', null, null);

  const decimal = chooseDecimal(options.decimal ?? 'auto', separator, records);
  const pattern = numberPattern(decimal);
  const isValue = (c: string) => parseNumber(c, decimal, pattern) !== null || parseTimeOfDay(c) !== null;
  const header = options.header === undefined || options.header === 'auto' ? !records[0].cells.every(isValue) : options.header;
  const names = header ? records[0].cells.map((c) => c.trim()) : [];
  const data = header ? records.slice(1) : records;
  const width = Math.max(...records.map((r) => r.cells.length));
  return { separator, decimal, pattern, header, names, data, width };
}

/**
 * The columns of a CSV test log before any is chosen (for a column picker): their names (the
 * header's, else "column N"), how the file was read, and the number of data rows.
 */
export interface TestLogColumns {
  names: string[];
  header: boolean;
  separator: CsvSeparator;
  decimal: '.' | ',';
  rows: number;
}

export function testLogColumns(text: string, options: Pick<TestLogCsvOptions, 'separator' | 'decimal' | 'header'> = {}): TestLogColumns {
  const t = readTable(text, options);
  const names = Array.from({ length: t.width }, (_, i) => (t.header && t.names[i] ? t.names[i] : `column ${i + 1}`));
  return { names, header: t.header, separator: t.separator, decimal: t.decimal, rows: t.data.length };
}

export function parseTestLogCsv(text: string, options: TestLogCsvOptions = {}): TestLog {
  const { separator, decimal, pattern, header, names, data, width } = readTable(text, options);
  const unit = options.timeUnit ?? 's';
  if (!(unit in TIME_UNITS)) throw new InputError(`time unit: '${unit}' is not one of s, ms, min, h`, { field: 'timeUnit' });

  const pick = (ref: ColumnRef | undefined, fallback: number, role: string): { index: number; name: string } => {
    const r = ref ?? fallback;
    let index: number;
    if (typeof r === 'number') {
      if (!Number.isInteger(r) || r < 1)
        throw new InputError(`${role} column: ${r} is not a column position (1, 2, 3, …)`, { field: role });
      index = r - 1;
    } else {
      const want = r.trim();
      index = names.indexOf(want);
      if (index < 0) index = names.findIndex((n) => n.toLowerCase() === want.toLowerCase());
      if (index < 0 && /^\d+$/.test(want)) index = Number(want) - 1;
      if (index < 0) {
        const have = header
          ? `the header names ${names.map((n) => `'${n}'`).join(', ')}`
          : 'the file has no header row; give a position 1, 2, 3, …';
        throw new InputError(`${role} column: no column named '${want}' (${have})`, { field: role });
      }
    }
    if (index >= width)
      throw new InputError(`${role} column: position ${index + 1} is beyond the ${width} column(s) of the file`, { field: role });
    return { index, name: header && names[index] ? names[index] : `column ${index + 1}` };
  };
  const tCol = pick(options.time, 1, 'time');
  const uCol = pick(options.input, 2, 'input');
  const yCol = pick(options.output, 3, 'output');
  const distinct = new Set([tCol.index, uCol.index, yCol.index]);
  if (distinct.size < 3)
    throw new InputError(`time, input and output must be three different columns (got ${tCol.name}, ${uCol.name}, ${yCol.name})`, {
      field: 'columns',
    });

  const cell = (rec: { row: number; cells: string[] }, col: { index: number; name: string }) => {
    const c = rec.cells[col.index];
    if (c === undefined)
      throw new TestLogError(
        `row ${rec.row} has ${rec.cells.length} field(s) with separator ${sepName(separator)}; column '${col.name}' (${col.index + 1}) is missing`,
        rec.row,
        col.name,
      );
    if (c.trim() === '') throw new TestLogError(`row ${rec.row}, column '${col.name}': the cell is empty`, rec.row, col.name);
    return c;
  };
  const value = (rec: { row: number; cells: string[] }, col: { index: number; name: string }) => {
    const c = cell(rec, col);
    const v = parseNumber(c, decimal, pattern);
    if (v === null) {
      const hint = /^\s*[+-]?(nan|inf|infinity)\s*$/i.test(c)
        ? ' (not a finite number)'
        : decimal === '.' && /\d,\d/.test(c)
          ? " (decimal comma? use decimal ',')"
          : '';
      throw new TestLogError(`row ${rec.row}, column '${col.name}': '${c.trim()}' is not a number${hint}`, rec.row, col.name);
    }
    return v;
  };

  // Time: numbers, or clock / date-time text, decided by the first data row.
  let timeFormat: TimeFormat = 'seconds';
  const time: number[] = [];
  if (data.length > 0 && parseNumber(cell(data[0], tCol), decimal, pattern) === null && parseTimeOfDay(cell(data[0], tCol))) {
    timeFormat = parseTimeOfDay(cell(data[0], tCol))!.format;
    let day = 0;
    let prev = -Infinity;
    let first: { whole: number; frac: number } | null = null;
    for (const rec of data) {
      const c = cell(rec, tCol);
      const p = parseTimeOfDay(c);
      if (!p || p.format !== timeFormat) {
        throw new TestLogError(
          `row ${rec.row}, column '${tCol.name}': '${c.trim()}' is not a ${timeFormat === 'clock' ? 'clock time hh:mm:ss' : 'date-time YYYY-MM-DD hh:mm:ss'} like the first row's`,
          rec.row,
          tCol.name,
        );
      }
      let whole = p.whole + day;
      if (timeFormat === 'clock' && whole + p.frac < prev - 12 * 3600) {
        day += 86400; // past midnight
        whole += 86400;
      }
      prev = whole + p.frac;
      first ??= { whole, frac: p.frac };
      time.push(whole - first.whole + (p.frac - first.frac));
    }
  } else {
    for (const rec of data) time.push(value(rec, tCol) * TIME_UNITS[unit]);
  }
  const input = data.map((rec) => value(rec, uCol));
  const output = data.map((rec) => value(rec, yCol));
  const log: TestLog = {
    time,
    input,
    output,
    rows: data.map((r) => r.row),
    columns: { time: tCol.name, input: uCol.name, output: yCol.name },
    source: {
      fileName: options.fileName ?? null,
      sha256: options.sha256 ?? sha256(text),
      separator,
      decimal,
      header,
      timeFormat,
    },
  };
  checkTestLog(log);
  return log;
}

function chooseDecimal(choice: '.' | ',' | 'auto', separator: string, records: { cells: string[] }[]): '.' | ',' {
  if (choice === '.' || choice === ',') {
    if (choice === separator) throw new InputError(`decimal mark ',' cannot be used with the separator ','`, { field: 'decimal' });
    return choice;
  }
  if (choice !== 'auto') throw new InputError(`decimal mark: '${String(choice)}' is not '.' or ','`, { field: 'decimal' });
  if (separator === ',') return '.';
  let comma = 0;
  let point = 0;
  for (const r of records.slice(0, 20)) {
    for (const c of r.cells) {
      if (/^\s*[+-]?\d*,\d+([eE][+-]?\d+)?\s*$/.test(c)) comma++;
      if (/^\s*[+-]?\d*\.\d+([eE][+-]?\d+)?\s*$/.test(c)) point++;
    }
  }
  return comma > 0 && point === 0 ? ',' : '.';
}
