/** Replies of one generation applied together (reply-batch.ts). */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { ReplyBatch } from './reply-batch.ts';

interface S {
  held: Record<string, number>;
  n: number;
}

function store() {
  let state: S = { held: {}, n: 0 };
  const sets: Partial<S>[] = [];
  const batch = new ReplyBatch<S>(
    () => state,
    (p) => {
      sets.push(p);
      state = { ...state, ...p };
    },
    40,
  );
  return { batch, sets, state: () => state };
}
const answer = (ch: string, gen: number) => (s: S) => ({ held: { ...s.held, [ch]: gen }, n: s.n + 1 });

describe('reply batch', () => {
  afterEach(() => vi.useRealTimers());

  it('applies a reply at once when nothing else is expected', () => {
    const { batch, sets, state } = store();
    batch.add(answer('analysis', 1), false);
    expect(sets).toHaveLength(1);
    expect(state().held).toEqual({ analysis: 1 });
  });

  it('holds a reply until the expected one arrives, then applies both in one update, each made from the state the first left', () => {
    const { batch, sets, state } = store();
    batch.add(answer('analysis', 2), true);
    expect(sets).toHaveLength(0);
    batch.add(answer('response', 2), false);
    expect(sets).toHaveLength(1);
    expect(state()).toEqual({ held: { analysis: 2, response: 2 }, n: 2 });
  });

  it('applies a held reply when the wait runs out, and nothing twice', () => {
    vi.useFakeTimers();
    const { batch, sets, state } = store();
    batch.add(answer('analysis', 3), true);
    vi.advanceTimersByTime(39);
    expect(sets).toHaveLength(0);
    vi.advanceTimersByTime(1);
    expect(sets).toHaveLength(1);
    expect(state().held).toEqual({ analysis: 3 });
    batch.flush();
    vi.runAllTimers();
    expect(sets).toHaveLength(1);
  });

  it('drops what it holds when disposed', () => {
    vi.useFakeTimers();
    const { batch, sets } = store();
    batch.add(answer('analysis', 4), true);
    batch.dispose();
    vi.runAllTimers();
    expect(sets).toHaveLength(0);
  });
});
