/**
 * Numbers as engineers read and type them: rounding to significant digits, engineering
 * notation (exponent a multiple of three) with an exponent or an SI prefix, and the reverse.
 * Pure, so the editor and the CLI can share them: the editor shows and reads parameter values
 * through these, so 5e-5 never reads "0.000" and a value picked with a slider is written as
 * 58.18, not 58.17581689930665.
 * Digits are rounded and shifted as decimal text, so a mantissa never picks up binary
 * rounding noise (0.1 * 3 style).
 */
import { InputError } from './errors.ts';

/** SI prefixes from 1e-15 to 1e15 (BIPM SI Brochure, 9th ed., Table 7). `u` is accepted for µ on input. */
export const SI_PREFIXES: ReadonlyArray<{ symbol: string; exponent: number }> = [
  { symbol: 'f', exponent: -15 },
  { symbol: 'p', exponent: -12 },
  { symbol: 'n', exponent: -9 },
  { symbol: 'µ', exponent: -6 },
  { symbol: 'm', exponent: -3 },
  { symbol: '', exponent: 0 },
  { symbol: 'k', exponent: 3 },
  { symbol: 'M', exponent: 6 },
  { symbol: 'G', exponent: 9 },
  { symbol: 'T', exponent: 12 },
  { symbol: 'P', exponent: 15 },
];

function checkDigits(digits: number): void {
  if (!Number.isInteger(digits) || digits < 1 || digits > 17) {
    throw new InputError(`digits: ${digits} is not a whole number from 1 to 17`, { field: 'digits' });
  }
}

/**
 * Mantissa digits and decimal exponent of a finite nonzero v rounded to `digits`:
 * 5e-5 → { sign: '', digits: '5', exp: -5 }. The rounding is done on the shortest decimal that
 * reads back as v (what the user sees), half away from zero: 1.005 → 1.01, as people round it
 * (toPrecision would round the binary value 1.00499999… down).
 */
function decimalParts(v: number, digits: number): { sign: string; digits: string; exp: number } {
  const [m, e] = Math.abs(v).toExponential().split('e');
  let d = m.replace('.', '');
  let exp = Number(e);
  if (d.length > digits) {
    const up = d.charCodeAt(digits) >= 53; // '5'
    d = d.slice(0, digits);
    if (up) {
      const inc = (BigInt(d) + 1n).toString();
      if (inc.length > d.length) exp += 1; // 9.99 → 10.0
      d = inc.slice(0, digits);
    }
  }
  return { sign: v < 0 ? '-' : '', digits: d.replace(/0+$/, '') || '0', exp };
}

/**
 * `v` rounded to `digits` significant decimal digits (half away from zero, on the shortest
 * decimal of v), returned as the nearest double. Zero, NaN and ±Infinity come back unchanged;
 * −0 becomes 0.
 */
export function roundSignificant(v: number, digits = 4): number {
  checkDigits(digits);
  if (!Number.isFinite(v)) return v;
  if (v === 0) return 0;
  const p = decimalParts(v, digits);
  return Number(`${p.sign}${p.digits}e${p.exp - p.digits.length + 1}`);
}

/** Inserts a decimal point after `intDigits` digits and drops trailing zeros: ('5000', 2) → '50'. */
function placePoint(d: string, intDigits: number): string {
  const padded = d.length < intDigits ? d + '0'.repeat(intDigits - d.length) : d;
  const int = padded.slice(0, intDigits);
  const frac = padded.slice(intDigits).replace(/0+$/, '');
  return frac ? `${int}.${frac}` : int;
}

export interface EngineeringOptions {
  /** Significant digits (default 4). */
  digits?: number;
  /**
   * 'exponent' (default): plain between 1e-3 and 1e4, else "50e-6" — always valid input text.
   * 'si': an SI prefix for every value outside [1, 1000): "50 µ", "15 m", "1.5 k"; exponent
   * form beyond the prefixes.
   */
  style?: 'exponent' | 'si';
  /** A unit written after the number (and after the prefix in 'si' style): "50 µs". */
  unit?: string;
}

/**
 * A number in engineering notation with `digits` significant digits and no trailing zeros:
 * 5e-5 → "50e-6", 1e-6 → "1e-6", 58.1758 → "58.18", 0.015 → "0.015"; with style 'si' and unit
 * 's': 5e-5 → "50 µs", 0.015 → "15 ms". NaN is "—", infinities "∞" and "-∞".
 */
export function formatEngineering(v: number, opts: EngineeringOptions = {}): string {
  const digits = opts.digits ?? 4;
  checkDigits(digits);
  const unit = opts.unit ? opts.unit : '';
  const withUnit = (s: string, prefix = '') => (unit || prefix ? `${s} ${prefix}${unit}` : s);
  if (Number.isNaN(v)) return '—';
  if (v === Infinity) return withUnit('∞');
  if (v === -Infinity) return withUnit('-∞');
  if (v === 0) return withUnit('0');
  const p = decimalParts(v, digits);
  const e3 = Math.floor(p.exp / 3) * 3;
  const mantissa = p.sign + placePoint(p.digits, p.exp - e3 + 1);
  if (opts.style === 'si') {
    const prefix = SI_PREFIXES.find((x) => x.exponent === e3);
    if (prefix) return withUnit(mantissa, prefix.symbol);
    return withUnit(`${mantissa}e${e3}`);
  }
  // Exponent style: the everyday range stays plain (0.015, 58.18, 1234).
  if (p.exp >= -3 && p.exp < 4) {
    const plain = p.exp >= 0 ? placePoint(p.digits, p.exp + 1) : `0.${'0'.repeat(-p.exp - 1)}${p.digits.replace(/0+$/, '')}`;
    return withUnit(p.sign + plain);
  }
  return withUnit(`${mantissa}e${e3}`);
}

const NUMBER_RE = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/;

/**
 * Reads a number typed as a plain or exponent number ("1e-6", "-0.5"), optionally followed by
 * an SI prefix ("50µ", "50 u", "2.2k", "3 m" = 3e-3, "3 M" = 3e6) and, when `unit` is given,
 * that unit ("15 ms" with unit "s"; with unit "m", "5 m" is 5 metres and "5 mm" is 5e-3).
 * A Unicode minus (−) is accepted. Anything else is an InputError with the position at fault.
 */
export function parseEngineering(text: string, opts: { unit?: string; field?: string } = {}): number {
  const field = opts.field ?? 'value';
  const src = text.replace(/\u2212/g, '-');
  const lead = src.length - src.trimStart().length;
  let rest = src.trim();
  if (rest === '') throw new InputError(`${field}: empty, expected a number`, { field, position: 0 });
  if (rest === '∞' || rest === '+∞') return Infinity;
  if (rest === '-∞') return -Infinity;
  const m = NUMBER_RE.exec(rest);
  if (!m) throw new InputError(`${field}: "${text}" is not a number`, { field, position: lead, length: 1 });
  let value = Number(m[0]);
  let at = lead + m[0].length;
  rest = rest.slice(m[0].length);
  const unit = opts.unit?.trim();
  if (unit && rest.endsWith(unit)) rest = rest.slice(0, -unit.length);
  const spaces = rest.length - rest.trimStart().length;
  rest = rest.trim();
  if (rest !== '') {
    const symbol = rest === 'u' || rest === 'μ' ? 'µ' : rest; // ASCII u and the Greek mu both stand for micro
    const prefix = SI_PREFIXES.find((x) => x.symbol !== '' && x.symbol === symbol);
    if (!prefix) {
      at += spaces;
      throw new InputError(
        `${field}: "${rest}" in "${text}" is not an SI prefix (f p n µ m k M G T P)${unit ? ` or the unit ${unit}` : ''}`,
        {
          field,
          position: at,
          length: rest.length,
        },
      );
    }
    // Scale through the decimal string so "50µ" is exactly 5e-5 (50 * 1e-6 is 4.9999999999999996e-5).
    value = Number(
      `${m[0]}e${prefix.exponent}`.replace(/[eE]([+-]?\d+)e(-?\d+)$/, (_all, a: string, b: string) => `e${Number(a) + Number(b)}`),
    );
  }
  if (!Number.isFinite(value))
    throw new InputError(`${field}: "${text}" is out of the range of numbers`, { field, position: lead, length: m[0].length });
  return value;
}
