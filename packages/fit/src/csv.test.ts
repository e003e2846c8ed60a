import { describe, expect, it } from 'vitest';
import { InputError } from '@loopwright/lti';
import { parseTestLogCsv, testLogColumns } from './csv.ts';
import { TestLogError } from './test-log.ts';

const rows = (n: number, f: (i: number) => string) => Array.from({ length: n }, (_, i) => f(i)).join('\n');
/** Twelve samples: a step in the input at sample 3, a lagging output. */
const sample = (i: number) => ({ t: i * 0.5, u: i >= 3 ? 2 : 1, y: i >= 4 ? 10 + (i - 3) * 0.25 : 10 });

function thrown(f: () => unknown): TestLogError | InputError {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error('expected an InputError');
}

describe('parseTestLogCsv', () => {
  it('reads a comma file with a header, columns by default position', () => {
    const text = 'time,valve,temp\n' + rows(12, (i) => `${sample(i).t},${sample(i).u},${sample(i).y}`);
    const log = parseTestLogCsv(text, { fileName: 'bump.csv' });
    expect(log.time).toEqual(Array.from({ length: 12 }, (_, i) => sample(i).t));
    expect(log.input[3]).toBe(2);
    expect(log.output[5]).toBe(10.5);
    expect(log.columns).toEqual({ time: 'time', input: 'valve', output: 'temp' });
    expect(log.rows?.[0]).toBe(2); // row 1 is the header
    expect(log.source).toMatchObject({ fileName: 'bump.csv', separator: ',', decimal: '.', header: true, timeFormat: 'seconds' });
    expect(log.source.sha256).toMatch(/^[0-9a-f]{64}$/);
  });

  it('reads semicolons with decimal commas, columns chosen by name in any order and case', () => {
    const text =
      'Temp;Zeit;Ventil\n' +
      rows(12, (i) => `${String(sample(i).y).replace('.', ',')};${String(sample(i).t).replace('.', ',')};${sample(i).u}`);
    const log = parseTestLogCsv(text, { time: 'zeit', input: 'VENTIL', output: 'Temp' });
    expect(log.source).toMatchObject({ separator: ';', decimal: ',' });
    expect(log.time[3]).toBe(1.5);
    expect(log.output[6]).toBe(10.75);
    expect(log.columns).toEqual({ time: 'Zeit', input: 'Ventil', output: 'Temp' });
  });

  it('reads a file without a header, columns by 1-based position (number or digits), tabs, minutes', () => {
    const text = rows(12, (i) => `${sample(i).y}\t${sample(i).u}\t${sample(i).t}`);
    const log = parseTestLogCsv(text, { time: 3, input: '2', output: 1, timeUnit: 'min' });
    expect(log.source.header).toBe(false);
    expect(log.source.separator).toBe('\t');
    expect(log.time[2]).toBe(60);
    expect(log.columns).toEqual({ time: 'column 3', input: 'column 2', output: 'column 1' });
    expect(log.rows?.[0]).toBe(1);
  });

  it('skips comments, blank lines and a byte-order mark; handles CRLF and quoted cells', () => {
    const text =
      '\ufeff# logged by the plant historian\r\n"time","u","y"\r\n\r\n' +
      rows(12, (i) => `"${sample(i).t}",${sample(i).u},${sample(i).y}`).replace(/\n/g, '\r\n') +
      '\r\n';
    const log = parseTestLogCsv(text);
    expect(log.time.length).toBe(12);
    expect(log.rows?.[0]).toBe(4);
  });

  it('converts clock times (through midnight) and ISO date-times to seconds after the first sample', () => {
    const hms = (sec: number) => {
      const x = sec % 86400;
      return [Math.floor(x / 3600), Math.floor(x / 60) % 60, x % 60].map((v) => String(v).padStart(2, '0')).join(':');
    };
    // 23:59:50, 23:59:52, …, 00:00:00, 00:00:02, …
    const clock = 'time,u,y\n' + rows(12, (i) => `${hms(86390 + 2 * i)},${sample(i).u},${sample(i).y}`);
    const log = parseTestLogCsv(clock);
    expect(log.source.timeFormat).toBe('clock');
    expect(log.time).toEqual(Array.from({ length: 12 }, (_, i) => 2 * i));
    const iso =
      'time;u;y\n' +
      rows(12, (i) => `2026-03-01T10:00:${String(i).padStart(2, '0')}.${(i * 37) % 1000}+01:00;${sample(i).u};${sample(i).y}`);
    const log2 = parseTestLogCsv(iso);
    expect(log2.source.timeFormat).toBe('date-time');
    // Sub-second digits survive: the fractions are kept apart from the epoch seconds.
    for (let i = 0; i < 12; i++) expect(Math.abs(log2.time[i] - (i + Number(`0.${(i * 37) % 1000}`)))).toBeLessThanOrEqual(1e-12);
  });

  it('names the row and column of a bad cell', () => {
    const good = (i: number) => `${sample(i).t},${sample(i).u},${sample(i).y}`;
    const text = 'time,valve,temp\n' + rows(12, (i) => (i === 6 ? `${sample(i).t},${sample(i).u},abc` : good(i)));
    const e = thrown(() => parseTestLogCsv(text)) as TestLogError;
    expect(e).toBeInstanceOf(TestLogError);
    expect(e.row).toBe(8);
    expect(e.column).toBe('temp');
    expect(e.message).toContain("row 8, column 'temp': 'abc' is not a number");
    const nan = thrown(() =>
      parseTestLogCsv('time,valve,temp\n' + rows(12, (i) => (i === 2 ? `${sample(i).t},NaN,1` : good(i)))),
    ) as TestLogError;
    expect(nan.message).toContain("row 4, column 'valve': 'NaN' is not a number (not a finite number)");
    const empty = thrown(() =>
      parseTestLogCsv('time,valve,temp\n' + rows(12, (i) => (i === 9 ? `${sample(i).t},,1` : good(i)))),
    ) as TestLogError;
    expect(empty.message).toContain("row 11, column 'valve': the cell is empty");
    const short = thrown(() =>
      parseTestLogCsv('time,valve,temp\n' + rows(12, (i) => (i === 9 ? `${sample(i).t},1` : good(i)))),
    ) as TestLogError;
    expect(short.message).toContain("row 11 has 2 field(s) with separator ','; column 'temp' (3) is missing");
    const comma = thrown(() =>
      parseTestLogCsv('time,valve,temp\n' + rows(12, (i) => (i === 1 ? `${sample(i).t},"1,5",1` : good(i)))),
    ) as TestLogError;
    expect(comma.message).toContain("(decimal comma? use decimal ',')");
  });

  it('names the row where time stops increasing', () => {
    const text = 'time,valve,temp\n' + rows(12, (i) => `${i === 5 ? 1.5 : sample(i).t},${sample(i).u},${sample(i).y}`);
    const e = thrown(() => parseTestLogCsv(text)) as TestLogError;
    expect(e.row).toBe(7);
    expect(e.column).toBe('time');
    expect(e.message).toContain("row 7, column 'time': time 1.5 is not after the previous sample's 2 (time must increase)");
  });

  it('rejects unknown columns, repeated columns and bad options with the field named', () => {
    const text = 'time,valve,temp\n' + rows(12, (i) => `${sample(i).t},${sample(i).u},${sample(i).y}`);
    expect(thrown(() => parseTestLogCsv(text, { output: 'flow' })).message).toContain(
      "output column: no column named 'flow' (the header names 'time', 'valve', 'temp')",
    );
    expect(thrown(() => parseTestLogCsv(text, { output: 7 })).message).toContain('position 7 is beyond the 3 column(s)');
    expect(thrown(() => parseTestLogCsv(text, { output: 2 })).message).toContain('three different columns');
    expect(thrown(() => parseTestLogCsv(text, { decimal: ',', separator: ',' })).details.field).toBe('decimal');
    expect(thrown(() => parseTestLogCsv('')).message).toContain('no rows');
  });
});

describe('testLogColumns', () => {
  it('lists the header names, or "column N" without a header, and how the file reads', () => {
    const text =
      '# logged 2026-04-13\ntime;valve;temp;flow\n' +
      rows(12, (i) => `${sample(i).t};${sample(i).u};${sample(i).y};3.5`.replaceAll('.', ','));
    expect(testLogColumns(text)).toEqual({
      names: ['time', 'valve', 'temp', 'flow'],
      header: true,
      separator: ';',
      decimal: ',',
      rows: 12,
    });
    const bare = rows(12, (i) => `${sample(i).t},${sample(i).u},${sample(i).y}`);
    expect(testLogColumns(bare)).toEqual({
      names: ['column 1', 'column 2', 'column 3'],
      header: false,
      separator: ',',
      decimal: '.',
      rows: 12,
    });
  });
  it('refuses an empty file as parseTestLogCsv does', () => {
    expect(thrown(() => testLogColumns('\n# nothing\n')).message).toBe('test log: the file has no rows');
  });
});
