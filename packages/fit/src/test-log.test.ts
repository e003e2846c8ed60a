import { describe, expect, it } from 'vitest';
import { InputError } from '@loopwright/lti';
import { MIN_SAMPLES, TestLogError, checkTestLog, testLogFromArrays } from './test-log.ts';

const time = Array.from({ length: 12 }, (_, i) => i);
const input = time.map((t) => (t >= 3 ? 1 : 0));
const output = time.map((t) => (t >= 4 ? 1 - Math.exp(-(t - 4)) : 0));

function message(f: () => unknown): string {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    expect(e).toBeInstanceOf(TestLogError);
    return (e as Error).message;
  }
  throw new Error('expected a TestLogError');
}

describe('checkTestLog', () => {
  it('accepts a log that has what a fit needs', () => {
    expect(testLogFromArrays({ time, input, output }).time).toEqual(time);
  });

  it(`needs at least ${MIN_SAMPLES} samples`, () => {
    expect(message(() => testLogFromArrays({ time: time.slice(0, 9), input: input.slice(0, 9), output: output.slice(0, 9) }))).toBe(
      'the test log has 9 samples; a fit needs at least 10',
    );
  });

  it('names the sample (or file row) with NaN or a non-increasing time', () => {
    expect(message(() => testLogFromArrays({ time, input, output: output.map((v, i) => (i === 7 ? NaN : v)) }))).toBe(
      "sample 8, column 'output': NaN is not a finite number",
    );
    const rows = time.map((_, i) => i + 2);
    const e = message(() =>
      checkTestLog({ time: time.map((t, i) => (i === 4 ? 3 : t)), input, output, rows, columns: { time: 't', input: 'u', output: 'y' } }),
    );
    expect(e).toBe("row 6, column 't': time 3 is not after the previous sample's 3 (time must increase)");
  });

  it('rejects an input that never changes and an output that never moves', () => {
    expect(message(() => testLogFromArrays({ time, input: time.map(() => 35), output }))).toBe(
      "column 'input' (input): the input never changes (every sample is 35), so there is no test to fit",
    );
    expect(message(() => testLogFromArrays({ time, input, output: time.map(() => 62.5) }))).toBe(
      "column 'output' (output): the output never moves (every sample is 62.5), so there is no response to fit",
    );
  });

  it('with a known operating point, a log that starts at the step is accepted', () => {
    expect(() =>
      checkTestLog(
        { time, input: time.map(() => 1), output, rows: null, columns: { time: 't', input: 'u', output: 'y' } },
        { input: 0, output: 0 },
      ),
    ).not.toThrow();
    expect(
      message(() =>
        checkTestLog(
          { time, input: time.map(() => 0), output, rows: null, columns: { time: 't', input: 'u', output: 'y' } },
          { input: 0, output: 0 },
        ),
      ),
    ).toContain('every sample is 0, the operating point');
  });
});
