import { describe, expect, it } from 'vitest';
import { separationCheck } from './cascade.ts';

describe('separationCheck', () => {
  it('flags an inner loop less than 3 times faster than the outer one (common practice, no source)', () => {
    expect(separationCheck(10, 2)).toMatchObject({ ratio: 5, ok: true });
    const slow = separationCheck(5, 2);
    expect(slow.ok).toBe(false);
    expect(slow.message).toContain('only 2.5 times faster');
    expect(separationCheck(6, 2).ok).toBe(true);
    expect(() => separationCheck(0, 1)).toThrow();
  });
});
