import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { format as mathFormat } from 'mathjs';
import { InputError } from './errors.ts';
import { SI_PREFIXES, formatEngineering, parseEngineering, roundSignificant } from './number-format.ts';

/** mathjs' engineering notation (an independent implementation), trailing zeros dropped: "50.00e-6" → "50e-6". */
function mathjsEngineering(v: number, digits: number): { mantissa: number; exp: number } {
  const [m, e] = mathFormat(v, { notation: 'engineering', precision: digits }).split('e');
  return { mantissa: Number(m), exp: Number(e) };
}

describe('roundSignificant', () => {
  it('agrees with mathjs rounding to 4 significant digits', () => {
    // Reference: mathjs format(v, { precision: 4 }) (general-purpose library from npm).
    for (const v of [58.17581689930665, 5e-5, 1e-6, 0.015, 1234.5, -0.00123456, 9999.5, 1e-20, 123456789, -7.0000001]) {
      expect(roundSignificant(v, 4)).toBe(Number(mathFormat(v, { precision: 4 })));
    }
    // A tie in the decimal the user sees rounds away from zero, as by hand (the double 1.005 is 1.00499999…).
    expect(roundSignificant(1.005, 3)).toBe(1.01);
    expect(roundSignificant(-2.5, 1)).toBe(-3);
    expect(roundSignificant(9.9996, 4)).toBe(10);
    fc.assert(
      fc.property(
        fc.double({ min: -1e300, max: 1e300, noNaN: true }),
        fc.integer({ min: 1, max: 15 }),
        (v, n) => roundSignificant(v, n) === Number(mathFormat(v, { precision: n })),
      ),
    );
  });

  it('keeps at most the asked digits, is idempotent, and moves v by at most half a unit in the last digit', () => {
    // Definition of rounding to n significant digits (common practice, no source).
    fc.assert(
      fc.property(fc.double({ min: -1e30, max: 1e30, noNaN: true }), fc.integer({ min: 1, max: 8 }), (v, n) => {
        const r = roundSignificant(v, n);
        if (v === 0) return r === 0;
        // Digits of the shortest text that reads back as r (what a saved file and the panel show).
        const significant = String(Math.abs(r)).split('e')[0].replace('.', '').replace(/^0+/, '').replace(/0+$/, '').length;
        const ulp = Math.pow(10, Math.floor(Math.log10(Math.abs(v))) - n + 1);
        return (
          roundSignificant(r, n) === r &&
          // r printed with n digits reads back as r (it has no more than n significant digits)
          significant <= n &&
          Math.abs(r - v) <= 0.5 * ulp * (1 + 1e-12) + Math.abs(v) * 1e-15
        );
      }),
    );
  });

  it('leaves zero and non-finite numbers alone, refuses nonsense digit counts', () => {
    expect(roundSignificant(0)).toBe(0);
    expect(Object.is(roundSignificant(-0), 0)).toBe(true);
    expect(roundSignificant(Infinity)).toBe(Infinity);
    expect(Number.isNaN(roundSignificant(Number.NaN))).toBe(true);
    expect(() => roundSignificant(1, 0)).toThrow(InputError);
    expect(() => roundSignificant(1, 2.5)).toThrow(InputError);
  });
});

describe('formatEngineering', () => {
  it('the cases the Parameters panel showed as "0.000", and everyday values', () => {
    // Engineering notation: exponent a multiple of 3, mantissa in [1, 1000) (common practice, no source).
    expect(formatEngineering(5e-5)).toBe('50e-6');
    expect(formatEngineering(1e-6)).toBe('1e-6');
    expect(formatEngineering(58.17581689930665)).toBe('58.18');
    expect(formatEngineering(0.015)).toBe('0.015');
    expect(formatEngineering(0.001)).toBe('0.001');
    expect(formatEngineering(1234)).toBe('1234');
    expect(formatEngineering(9999.5)).toBe('10e3');
    expect(formatEngineering(-2.2e7)).toBe('-22e6');
    expect(formatEngineering(0)).toBe('0');
    expect(formatEngineering(Number.NaN)).toBe('—');
  });

  it('SI prefixes with a unit, per the SI Brochure prefix table', () => {
    // Prefix symbols and factors: BIPM SI Brochure, 9th ed. (2019), Table 7.
    expect(formatEngineering(5e-5, { style: 'si', unit: 's' })).toBe('50 µs');
    expect(formatEngineering(1e-6, { style: 'si', unit: 'H' })).toBe('1 µH');
    expect(formatEngineering(0.015, { style: 'si', unit: 's' })).toBe('15 ms');
    expect(formatEngineering(1500, { style: 'si', unit: 'rpm' })).toBe('1.5 krpm');
    expect(formatEngineering(4.7e-9, { style: 'si', unit: 'F' })).toBe('4.7 nF');
    expect(formatEngineering(58.18, { style: 'si', unit: 'V' })).toBe('58.18 V');
    expect(formatEngineering(2.5, { style: 'si' })).toBe('2.5');
    expect(formatEngineering(3e-20, { style: 'si', unit: 'm' })).toBe('30e-21 m'); // beyond the prefixes
    const table: Record<string, number> = { f: -15, p: -12, n: -9, µ: -6, m: -3, k: 3, M: 6, G: 9, T: 12, P: 15 };
    for (const [symbol, exponent] of Object.entries(table)) expect(SI_PREFIXES.find((p) => p.symbol === symbol)?.exponent).toBe(exponent);
  });

  it('mantissa and exponent agree with mathjs engineering notation for any double', () => {
    // Reference: mathjs format(v, { notation: 'engineering', precision }) (npm).
    fc.assert(
      fc.property(
        fc.double({ min: -1e40, max: 1e40, noNaN: true }).filter((v) => v !== 0),
        fc.integer({ min: 1, max: 10 }),
        (v, n) => {
          const text = formatEngineering(v, { digits: n });
          const ref = mathjsEngineering(v, n);
          // The same number; in exponent form also the same mantissa and exponent (the plain range drops the exponent).
          const same = Number(text) === Number(`${ref.mantissa}e${ref.exp}`);
          if (!text.includes('e')) return same && Math.abs(v) >= 1e-3 && Math.abs(v) < 1e4;
          const [m, e] = text.split('e');
          return same && Number(m) === ref.mantissa && Number(e) === ref.exp;
        },
      ),
    );
  });

  it('what it prints in exponent style reads back as the rounded value', () => {
    fc.assert(
      fc.property(fc.double({ min: -1e300, max: 1e300, noNaN: true }), fc.integer({ min: 1, max: 12 }), (v, n) => {
        return parseEngineering(formatEngineering(v, { digits: n })) === roundSignificant(v, n);
      }),
    );
  });
});

describe('parseEngineering', () => {
  it('reads plain, exponent and SI-prefixed numbers exactly as their decimal value', () => {
    expect(parseEngineering('50e-6')).toBe(5e-5);
    expect(parseEngineering('50µ')).toBe(5e-5);
    expect(parseEngineering('50 u')).toBe(5e-5);
    expect(parseEngineering('2.2k')).toBe(2200);
    expect(parseEngineering('3 m')).toBe(0.003);
    expect(parseEngineering('3 M')).toBe(3e6);
    expect(parseEngineering('−0.5')).toBe(-0.5);
    expect(parseEngineering(' 1e-6 ')).toBe(1e-6);
    expect(parseEngineering('5e2k')).toBe(5e5);
  });

  it('a trailing unit is read as the unit, not as a prefix', () => {
    expect(parseEngineering('15 ms', { unit: 's' })).toBe(0.015);
    expect(parseEngineering('5 m', { unit: 'm' })).toBe(5);
    expect(parseEngineering('5 mm', { unit: 'm' })).toBe(0.005);
    expect(parseEngineering('5 mm', { unit: 'mm' })).toBe(5);
  });

  it('bad text is an InputError at the character at fault', () => {
    const fails = (t: string) => {
      try {
        parseEngineering(t, { field: 'Value of Kp' });
      } catch (e) {
        expect(e).toBeInstanceOf(InputError);
        expect((e as InputError).message).toMatch(/^Value of Kp: /);
        return (e as InputError).details.position;
      }
      throw new Error(`"${t}" was accepted`);
    };
    expect(fails('')).toBe(0);
    expect(fails('abc')).toBe(0);
    expect(fails('12 x')).toBe(3);
    expect(fails('1.5kk')).toBe(3);
    expect(fails('1e999')).toBe(0);
  });
});
