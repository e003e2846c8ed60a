import { describe, expect, it } from 'vitest';
import { sha256, utf8Bytes } from './sha256.ts';

describe('sha256', () => {
  it('matches the FIPS 180-2 test vectors', () => {
    // FIPS 180-2, Appendix B.1 and B.2 (one-block and two-block messages); the empty string's
    // digest as published with the standard's examples (from memory).
    expect(sha256('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    expect(sha256('abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq')).toBe(
      '248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1',
    );
    expect(sha256('')).toBe('e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855');
  });

  it('encodes text as UTF-8 (1- to 4-byte characters)', () => {
    expect(Array.from(utf8Bytes('a°€😀'))).toEqual([0x61, 0xc2, 0xb0, 0xe2, 0x82, 0xac, 0xf0, 0x9f, 0x98, 0x80]);
  });
});
