/** The recorder: every point in order, each signal read at its index. */
import { describe, expect, it } from 'vitest';
import { Recorder } from './recorder.ts';

describe('recorder', () => {
  const sig = Float64Array.from([10, 20, 30]);
  const run = (points: number) => {
    const rec = new Recorder(['a', 'b'], Int32Array.from([2, 0]), 0.1);
    for (let k = 0; k < points; k++) {
      sig[0] = k;
      if (rec.isNew(k * 0.1)) rec.record(k * 0.1, sig);
      rec.record(k * 0.1 + 0.05, sig); // an event between grid points
    }
    return rec;
  };

  it('keeps every point in order, grid points and events between them', () => {
    for (const points of [1, 4, 7]) {
      const rec = run(points);
      expect(rec.time).toEqual(Array.from({ length: 2 * points }, (_, i) => Math.floor(i / 2) * 0.1 + (i % 2) * 0.05));
      expect(rec.cols[0]).toEqual(Array.from({ length: 2 * points }, () => 30));
      expect(rec.cols[1]).toEqual(Array.from({ length: 2 * points }, (_, i) => Math.floor(i / 2)));
    }
  });

  it('a first point is always new, however early', () => {
    const rec = new Recorder(['a'], Int32Array.from([0]), 0.1);
    expect(rec.isNew(-1e300)).toBe(true);
    rec.record(0, sig);
    expect(rec.isNew(0)).toBe(false);
  });
});
