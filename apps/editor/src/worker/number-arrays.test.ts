/**
 * Packed number arrays survive the trip through a structured clone (node's `structuredClone`,
 * the algorithm a worker's postMessage uses) unchanged: a real response reply of the demo
 * diagram, and the edge cases — special values, short arrays, mixed arrays, nesting.
 */
import { describe, expect, it } from 'vitest';
import { demoDiagrams } from '@loopwright/graph';
import { resolveSweep } from '@loopwright/study';
import { packNumberArrays, unpackNumberArrays } from './number-arrays.ts';
import { computeReply } from './compute.ts';
import { channelStudies } from '../analysis/driver.ts';

/** What the page receives for a message the worker posts. */
const trip = <T>(m: T): T => {
  const { message, transfer } = packNumberArrays(m);
  return unpackNumberArrays(structuredClone(message, { transfer }));
};

describe('number arrays across the worker boundary', () => {
  it('a response reply arrives equal, its traces moved as buffers', () => {
    const d = demoDiagrams.find((x) => x.id === 'positioning-axis')!.diagram;
    const sweep = resolveSweep(d, { key: null, liveValue: null });
    const inputs = { diagram: d, sweep, live: sweep.live, cutId: null, closedLoop: null };
    const studies = channelStudies(inputs, { frequency: false, opposite: false });
    const reply = computeReply({ channel: 'response', id: 1, diagram: d, studies: studies.response });
    expect(reply.ok).toBe(true);
    const before = JSON.stringify(reply);
    const { transfer } = packNumberArrays(reply);
    // at least the time grid and every trace of both runs (the run as drawn and the linear overlay)
    const r = (reply as { results: { ok: boolean; value: { value: unknown } }[] }).results[0].value.value as {
      run: { traces: Record<string, number[]> };
      linear: { traces: Record<string, number[]> };
    };
    const runs = [r.run, r.linear];
    expect(transfer.length).toBeGreaterThanOrEqual(runs.reduce((n, x) => n + 1 + Object.keys(x.traces).length, 0));
    expect(trip(reply)).toEqual(reply);
    // the worker's own objects (its caches may hold them) are not touched
    expect(JSON.stringify(reply)).toBe(before);
  });

  it('keeps special values, short and mixed arrays, and nesting', () => {
    const long = Array.from({ length: 40 }, (_, i) => i / 3);
    long[3] = NaN;
    long[4] = Infinity;
    long[5] = -Infinity;
    long[6] = -0;
    const m = {
      a: long,
      short: [1, 2, 3],
      mixed: [...long.slice(0, 35), null],
      nested: [{ t: long.slice(), label: 'x' }, [long.slice()]],
      text: 'f64',
      n: 4,
      none: null,
    };
    const back = trip(m);
    expect(back).toEqual(m);
    expect(Object.is(back.a[6], -0)).toBe(true);
    expect(Array.isArray(back.a)).toBe(true);
    expect(Array.isArray((back.nested[1] as number[][])[0])).toBe(true);
    // an array that holds anything but numbers is posted as it is
    const { message } = packNumberArrays(m);
    expect(message.mixed).toBe(m.mixed);
    expect(message.short).toBe(m.short);
    expect(ArrayBuffer.isView(Object.values(message.a as object)[0])).toBe(true);
  });
});
