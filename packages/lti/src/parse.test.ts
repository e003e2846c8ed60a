import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { InputError } from './errors.ts';
import { expressionParameters, formatExpressionError, parseScalar, parseTransferFunction, requireProper } from './parse.ts';
import { revalReal } from './rational.ts';
import { tevalComplex } from './transfer.ts';
import { cx } from './complex.ts';

/** The InputError thrown by f, or a failure. */
function errorOf(f: () => unknown): InputError {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw new Error(`expected InputError, got ${String(e)}`, { cause: e });
  }
  throw new Error('expected InputError, got success');
}

describe('parseTransferFunction: values', () => {
  // Check: the parsed rational evaluated at real points equals the same formula computed
  // directly in floating point (independent of the parser).
  const points = [-0.7, 0.3, 1.9, 5];

  it('PI controller times plant, with parameters', () => {
    const p = { Kp: 2.5, Ti: 0.8 };
    const tf = parseTransferFunction('Kp*(1 + 1/(Ti*s)) * 4/(s*(0.25*s+1))', p);
    expect(tf.delay).toBe(0);
    for (const s of points) {
      const direct = (p.Kp * (1 + 1 / (p.Ti * s)) * 4) / (s * (0.25 * s + 1));
      expect(revalReal(tf.rational, s)).toBeCloseTo(direct, 10);
    }
    expect(expressionParameters('Kp*(1 + 1/(Ti*s)) * 4/(s*(0.25*s+1))')).toEqual(['Kp', 'Ti']);
  });

  it('first-order lag with dead time keeps the delay exactly', () => {
    const tf = parseTransferFunction('2*exp(-0.5*s)/(3*s+1)', {});
    expect(tf.delay).toBe(0.5);
    expect(tf.rational.num).toEqual([2 / 3]);
    expect(tf.rational.den).toEqual([1 / 3, 1]);
    // e^(−jωT)·2/(3jω+1) at ω = 1.3, computed directly.
    const w = 1.3;
    const g = tevalComplex(tf, cx(0, w));
    const d = { re: 1, im: 3 * w };
    const mag = 2 / Math.hypot(d.re, d.im);
    const ph = -Math.atan2(d.im, d.re) - 0.5 * w;
    expect(g.re).toBeCloseTo(mag * Math.cos(ph), 12);
    expect(g.im).toBeCloseTo(mag * Math.sin(ph), 12);
  });

  it('dead-time forms: exp(-T*s), exp(-s*T), exp(-(T)*s), exp(-s/T), anywhere in a product', () => {
    for (const text of [
      'exp(-T*s)/(s+1)',
      'exp(-s*T)/(s+1)',
      'exp(-(T)*s)/(s+1)',
      '1/(s+1)*exp(-T*s)',
      '1/(s+1)*exp(T*-s)',
      '(exp(-T*s)/(s+1))^1',
    ]) {
      const tf = parseTransferFunction(text, { T: 0.4 });
      expect(tf.delay).toBeCloseTo(0.4, 15);
      expect(tf.rational.den).toEqual([1, 1]);
    }
    expect(parseTransferFunction('exp(-s/T)', { T: 4 }).delay).toBe(0.25);
    expect(parseTransferFunction('exp(-0.1*s)*exp(-0.2*s)*2', {}).delay).toBeCloseTo(0.3, 15);
    // Equal delays may be summed: e^(−sT)(a + b).
    const sum = parseTransferFunction('exp(-s)/(s+1) + exp(-s)*2', {});
    expect(sum.delay).toBe(1);
    expect(revalReal(sum.rational, 2)).toBeCloseTo(1 / 3 + 2, 12);
    // The zero function carries no dead time.
    expect(parseTransferFunction('0*exp(-s)', {}).delay).toBe(0);
    // A dead time divided by a smaller one leaves the difference.
    expect(parseTransferFunction('exp(-2*s)/exp(-0.5*s)', {}).delay).toBe(1.5);
  });

  it('implicit multiplication: 2s, 2 s, (s+1)(s+2), K(s+1), s(s+1), 0.25s+1', () => {
    const e = (t: string, p = {}) => parseTransferFunction(t, p).rational;
    expect(e('2s').num).toEqual([0, 2]);
    expect(e('2 s').num).toEqual([0, 2]);
    expect(e('(s+1)(s+2)').num).toEqual([2, 3, 1]);
    expect(e('K(s+1)', { K: 3 }).num).toEqual([3, 3]);
    expect(e('s(s+1)').num).toEqual([0, 1, 1]);
    expect(e('1/(0.25s+1)').den).toEqual([4, 1]);
  });

  it('unary signs, powers (negative too), and left-to-right division', () => {
    const e = (t: string) => parseTransferFunction(t, {}).rational;
    expect(e('-s^2').num).toEqual([0, 0, -1]); // −(s²), mathjs precedence
    expect(e('+-s').num).toEqual([0, -1]);
    expect(e('(s+1)^3').num).toEqual([1, 3, 3, 1]);
    expect(revalReal(e('(s+2)^-2'), 1)).toBeCloseTo(1 / 9, 14);
    expect(revalReal(e('8/2/2'), 0)).toBe(2);
    expect(revalReal(e('2^-3'), 0)).toBe(0.125);
    expect(revalReal(e('s^60'), 1.01)).toBeCloseTo(1.01 ** 60, 8);
    expect(e('1e-3s + 2.5E+2').num).toEqual([250, 1e-3]);
  });

  it('sums share common denominator factors instead of multiplying them in twice', () => {
    // 1/s + 1/(s(s+1)) = (s + 2)/(s(s + 1)): exact powers of s.
    const a = parseTransferFunction('1/s + 1/(s*(s+1))', {}).rational;
    expect(a.den).toEqual([0, 1, 1]);
    expect(a.num).toEqual([2, 1]);
    // A shared complex pair: 1/((s+1)(s²+2s+5)) + 1/(s²+2s+5) = (s + 2)/((s+1)(s²+2s+5)).
    const b = parseTransferFunction('1/((s+1)*(s^2+2*s+5)) + 1/(s^2+2*s+5)', {}).rational;
    expect(b.den.length).toBe(4);
    for (const x of [0.3, 2.2]) expect(revalReal(b, x)).toBeCloseTo((x + 2) / ((x + 1) * (x * x + 2 * x + 5)), 12);
    // Nothing shared: the plain product.
    expect(parseTransferFunction('1/(s+1) + 1/(s+2)', {}).rational.den).toEqual([2, 3, 1]);
  });

  it('parseScalar evaluates numbers over parameters, and refuses s', () => {
    expect(parseScalar('2*Kv', { Kv: 1.5 })).toBe(3);
    expect(parseScalar('1/(4*zeta)^2', { zeta: 0.5 })).toBe(0.25);
    expect(parseScalar('-3', {})).toBe(-3);
    const e = errorOf(() => parseScalar('2*s', {}));
    expect(e.details.position).toBe(2);
    expect(e.message).toMatch(/'s' is not allowed/);
    expect(errorOf(() => parseScalar('exp(-s)', {})).details.position).toBe(5);
  });

  it('a text parsed again (kept parse tree) takes the values of its new parameters, and its errors again', () => {
    for (const kv of [1.5, 4, -2]) expect(parseScalar('2*Kv', { Kv: kv })).toBe(2 * kv);
    for (const p of [
      { Kp: 2, T: 0.5 },
      { Kp: 3, T: 0.25 },
    ]) {
      const tf = parseTransferFunction('Kp/(T*s + 1)', p);
      for (const s of points) expect(revalReal(tf.rational, s)).toBeCloseTo(p.Kp / (p.T * s + 1), 12);
    }
    // a name missing from the parameters is found by the evaluation, every time, at its place
    for (let i = 0; i < 2; i++) expect(errorOf(() => parseScalar('1 + 2*Kv', {})).details.position).toBe(6);
  });

  it('expressionParameters lists names once, without s and exp', () => {
    expect(expressionParameters('K*exp(-T*s)/(tau*s + 1) + K')).toEqual(['K', 'T', 'tau']);
    expect(expressionParameters('Kc(1 + 1/(Ti s))')).toEqual(['Kc', 'Ti']);
    expect(expressionParameters('3*s')).toEqual([]);
  });

  it('requireProper names the field of an improper function', () => {
    expect(() => requireProper(parseTransferFunction('1/(s+1)', {}), 'block P1 field expression')).not.toThrow();
    expect(() => requireProper(parseTransferFunction('(s+1)/(s+2)', {}), 'x')).not.toThrow();
    const e = errorOf(() => requireProper(parseTransferFunction('s^2/(s+1)', {}), 'block C1 field expression'));
    expect(e.message).toMatch(/block C1 field expression is improper/);
    expect(e.details.field).toBe('block C1 field expression');
  });
});

describe('parseTransferFunction: bad input names the problem and the place', () => {
  const cases: [string, Record<string, number>, RegExp, number, number][] = [
    // text, params, message, position, length
    ['', {}, /empty/, 0, 0],
    ['   ', {}, /empty/, 0, 3],
    ['2*sin(s)', {}, /unknown function 'sin'/, 2, 3],
    ['K*s + Q', { K: 1 }, /unknown parameter 'Q'/, 6, 1],
    ['Q(s+1)', {}, /unknown parameter 'Q'/, 0, 1],
    ['1/(2^s)', {}, /exponent .*depends on 's'/, 5, 1],
    ['s^1.5', {}, /not an integer/, 2, 3],
    ['s^n', { n: 0.5 }, /not an integer/, 2, 1],
    ['(s+1)^61', {}, /above the limit/, 6, 2],
    ['s^-61', {}, /above the limit/, 3, 2],
    ['1/0', {}, /division by zero/, 2, 1],
    ['3 + 1/(s-s)', {}, /division by zero/, 7, 3],
    ['0^-1', {}, /division by zero/, 0, 4],
    ['1e999*s', {}, /not finite/, 0, 5],
    ['NaN*s', {}, /not a finite number/, 0, 3],
    ['Infinity', {}, /not a finite number/, 0, 8],
    ['K*s', { K: NaN }, /parameter 'K' .*not a finite number/, 0, 1],
    ['1/(s + K)', { K: Infinity }, /parameter 'K' .*not a finite number/, 7, 1],
    ['exp(s)', {}, /T ≥ 0/, 4, 1],
    ['exp(-s^2)', {}, /not a constant times s/, 5, 3],
    ['exp(2)', {}, /not a constant times s/, 4, 1],
    ['exp(-T*s)', { T: -1 }, /T ≥ 0/, 5, 3],
    ['exp(-s) + 1/(s+1)', {}, /different dead times/, 0, 16],
    ['1/exp(-s)', {}, /e\^\(\+sT\)/, 2, 6],
    ['(s+1)^40*(s+2)^30', {}, /order 70 is above the limit of 60/, 1, 16],
    ['(s^2)^40', {}, /order 80 is above/, 1, 7],
    ['s^2^40', {}, /power 1099511627776 is above the limit/, 2, 4], // right-associative: s^(2^40)
    ['1/(s+', {}, /syntax error at the end/, 5, 0],
    ['2 3', {}, /syntax error at column 3/, 2, 1],
    ['s = 2', {}, /unexpected character '='/, 2, 1],
    ['[1,2]', {}, /unexpected character '\['/, 0, 1],
    ['5%', {}, /unexpected character '%'/, 1, 1],
    ['s mod 2', {}, /'mod' is not supported/, 2, 3],
    ['0x10', {}, /hexadecimal/, 0, 2],
    ['s.^2', {}, /unexpected character '\.'/, 1, 1],
    ['1\n+\n', {}, /syntax error/, 4, 0],
  ];
  for (const [text, params, msg, pos, len] of cases) {
    it(`${JSON.stringify(text)} → ${msg.source}`, () => {
      const e = errorOf(() => parseTransferFunction(text, params));
      expect(e.message).toMatch(msg);
      expect(e.details.position).toBe(pos);
      expect(e.details.length).toBe(len);
    });
  }

  it('too-long text and deep nesting are refused without hanging', () => {
    const long = 's+'.repeat(5000) + '1';
    const e = errorOf(() => parseTransferFunction(long, {}));
    expect(e.message).toMatch(/above the limit of 10000/);
    expect(e.details.position).toBe(10000);
    const deep = '('.repeat(3000) + 's' + ')'.repeat(3000);
    expect(errorOf(() => parseTransferFunction(deep, {})).message).toMatch(/nested more than/);
    // A long flat chain within the limit parses (5,000 terms).
    const chain = Array.from({ length: 4999 }, () => '1').join('+') + '+s';
    expect(parseTransferFunction(chain, {}).rational.num).toEqual([4999, 1]);
  });

  it('the k-th occurrence of a name is located, not the first', () => {
    const e = errorOf(() => parseTransferFunction('K*s + K*sin(s) + sin(s)', { K: 1 }));
    expect(e.details.position).toBe(8);
    const e2 = errorOf(() => parseTransferFunction('exp(-s)*exp(s)', {}));
    expect(e2.details.position).toBe(12);
  });

  it('formatExpressionError draws a caret under the fault', () => {
    const text = 'Kp*(1 + sin(s))';
    const msg = formatExpressionError(
      text,
      errorOf(() => parseTransferFunction(text, { Kp: 1 })),
    );
    expect(msg.split('\n')).toEqual([text, '        ^^^', expect.stringMatching(/unknown function 'sin'/)]);
  });

  it('fuzz: arbitrary unicode strings and parseScalar/expressionParameters also end in success or InputError', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 30, unit: 'binary' }), (text) => {
        for (const f of [
          () => parseTransferFunction(text, { K: 1 }),
          () => parseScalar(text, { K: 1 }),
          () => expressionParameters(text),
        ]) {
          try {
            f();
          } catch (e) {
            if (!(e instanceof InputError)) throw e;
          }
        }
      }),
      { numRuns: 1000 },
    );
  });

  it('fuzz: random strings give a transfer function or an InputError, never anything else', () => {
    const alphabet = ['s', 'K', 'T', '1', '2', '0', '.', 'e', '+', '-', '*', '/', '^', '(', ')', ' ', 'exp(', 'x', '6', ','];
    fc.assert(
      fc.property(fc.array(fc.constantFrom(...alphabet), { maxLength: 24 }), (parts) => {
        const text = parts.join('');
        try {
          const tf = parseTransferFunction(text, { K: 2, T: 0.5 });
          expect(tf.delay).toBeGreaterThanOrEqual(0);
          for (const c of [...tf.rational.num, ...tf.rational.den]) expect(Number.isFinite(c)).toBe(true);
        } catch (e) {
          if (!(e instanceof InputError)) throw e;
          const p = e.details.position!;
          expect(p).toBeGreaterThanOrEqual(0);
          expect(p).toBeLessThanOrEqual(text.length);
          expect(p + (e.details.length ?? 0)).toBeLessThanOrEqual(text.length);
        }
      }),
      { numRuns: 1000 },
    );
  });
});
