/** The recorder: arrays made at the expected size, cut to what was recorded. */
import { describe, expect, it } from 'vitest';
import { Recorder } from './recorder.ts';

describe('recorder', () => {
  const sig = Float64Array.from([10, 20, 30]);
  const run = (expected: number, points: number) => {
    const rec = new Recorder(['a', 'b'], Int32Array.from([2, 0]), 0.1, expected);
    for (let k = 0; k < points; k++) {
      sig[0] = k;
      if (rec.isNew(k * 0.1)) rec.record(k * 0.1, sig);
      rec.record(k * 0.1 + 0.05, sig); // an event between grid points
    }
    rec.finish();
    return rec;
  };

  it('keeps every point, in order, whether the run records fewer or more than expected', () => {
    for (const [expected, points] of [
      [100, 4],
      [3, 7],
      [0, 5],
    ]) {
      const rec = run(expected, points);
      expect(rec.time).toEqual(Array.from({ length: 2 * points }, (_, i) => Math.floor(i / 2) * 0.1 + (i % 2) * 0.05));
      expect(rec.cols[0]).toEqual(Array.from({ length: 2 * points }, () => 30));
      expect(rec.cols[1]).toEqual(Array.from({ length: 2 * points }, (_, i) => Math.floor(i / 2)));
    }
  });

  it('a first point is always new, however early', () => {
    const rec = new Recorder(['a'], Int32Array.from([0]), 0.1, 10);
    expect(rec.isNew(-1e300)).toBe(true);
    rec.record(0, sig);
    expect(rec.isNew(0)).toBe(false);
  });
});
