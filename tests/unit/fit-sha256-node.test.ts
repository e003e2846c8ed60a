// Our pure SHA-256 (packages/fit) against Node's crypto module on texts of every length around
// the block boundaries and with multi-byte characters: two independent implementations.
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { sha256 } from '@loopwright/fit';

describe('sha256 = node:crypto sha256 of the UTF-8 bytes', () => {
  it('lengths 0 … 200 (padding across one and two blocks)', () => {
    for (let n = 0; n <= 200; n++) {
      const text = 'ab°€'.repeat(60).slice(0, n);
      expect(sha256(text)).toBe(createHash('sha256').update(text, 'utf8').digest('hex'));
    }
  });
  it('any text (property)', () => {
    fc.assert(
      fc.property(
        fc.string({ unit: 'binary', maxLength: 300 }),
        (text) => sha256(text) === createHash('sha256').update(text, 'utf8').digest('hex'),
      ),
    );
  });
});
