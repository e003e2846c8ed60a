import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { BudgetError, InputError } from './errors.ts';
import { budgetNow, deadlineIn } from './budget.ts';
import { parseTransferFunction } from './parse.ts';
import { loopMargins } from './margins.ts';
import { rootLocus } from './locus.ts';
import { relativeDegree } from './rational.ts';

/**
 * In-process fuzzing that reaches the analysis (issue 10): generated loop expressions — extreme
 * gains and dead times (1e-320 … 1e308), repeated and near-repeated factors, high powers,
 * integrators, right-half-plane roots, sums — go through margins and the root locus. Each case
 * must end within its time limit with either a clean InputError or a result holding no NaN
 * (Infinity and null only where documented). A case that runs past its deadline is a failure
 * (a BudgetError here means a hang the guards did not prevent).
 */
const CASES = Number(process.env.LOOPWRIGHT_FUZZ_RUNS ?? 2000);
const SEED = Number(process.env.LOOPWRIGHT_FUZZ_SEED ?? 20261202);
const PER_CASE_MS = 4000;

const num = fc.constantFrom('1e-320', '1e-300', '1e-12', '0.001', '0.5', '1', '2', '7.5', '1e6', '1e300', '1e308', '4');
const small = fc.constantFrom('0.01', '0.1', '0.5', '1', '2', '3', '10', '100', '1e5');
const delay = fc.constantFrom('0', '1e-9', '0.1', '0.5', '1', '3', '1e5', '1e308');
const factor = fc.oneof(
  fc.tuple(small).map(([a]) => `(s+${a})`),
  fc.tuple(small).map(([a]) => `(s-${a})`),
  fc.tuple(small, small).map(([a, b]) => `(s^2+${a}*s+${b})`),
  fc.tuple(small).map(([a]) => `(${a}*s+1)`),
  fc.constant('s'),
  fc.tuple(small, fc.integer({ min: 2, max: 8 })).map(([a, n]) => `(s+${a})^${n}`),
);
const product = fc.array(factor, { minLength: 0, maxLength: 4 }).map((fs) => (fs.length ? fs.join('*') : '1'));
const expression = fc.tuple(num, product, product, delay, fc.boolean(), fc.boolean()).map(([k, n, d, T, sum, neg]) => {
  const body = `${neg ? '-' : ''}${k}*${n}/(${d})`;
  const withSum = sum ? `(${body} + 1/(s+1))` : body;
  return T === '0' ? withSum : `${withSum}*exp(-${T}*s)`;
});

/** Every number in a result is finite, or ±Infinity / null where the API documents it; never NaN. */
function noNaN(x: unknown, path = 'result'): string | null {
  if (typeof x === 'number') return Number.isNaN(x) ? path : null;
  if (Array.isArray(x)) {
    for (let i = 0; i < x.length; i++) {
      const bad = noNaN(x[i], `${path}[${i}]`);
      if (bad) return bad;
    }
    return null;
  }
  if (x && typeof x === 'object') {
    for (const [k, v] of Object.entries(x)) {
      const bad = noNaN(v, `${path}.${k}`);
      if (bad) return bad;
    }
  }
  return null;
}

describe('expression fuzzing through margins and the root locus', () => {
  it(`${CASES} generated loops: a clean InputError or a NaN-free result, each within ${PER_CASE_MS} ms`, () => {
    const stats = { cases: 0, inputErrors: 0, results: 0, worstMs: 0, worst: '' };
    const times: [number, string][] = [];
    fc.assert(
      fc.property(expression, (text) => {
        stats.cases++;
        const t0 = budgetNow();
        const deadline = deadlineIn(PER_CASE_MS);
        try {
          const tf = parseTransferFunction(text);
          const m = loopMargins(tf, { deadline });
          const bad = noNaN(m);
          if (bad) throw new Error(`${text}: margins hold NaN at ${bad}`);
          if (!m.closedLoopPoles.every((p) => Number.isFinite(p.re) && Number.isFinite(p.im)))
            throw new Error(`${text}: a closed-loop pole is not finite`);
          if (relativeDegree(tf.rational) >= 0) {
            const L = rootLocus(tf.rational.num, tf.rational.den, { samples: 24, deadline });
            const badL = noNaN({ branches: L.branches, crossings: L.crossings, breakaways: L.breakaways, gains: L.gains });
            if (badL) throw new Error(`${text}: locus holds NaN at ${badL}`);
          }
          stats.results++;
        } catch (err) {
          if (err instanceof BudgetError)
            throw new Error(`${text}: ran past its ${PER_CASE_MS} ms deadline (${err.message})`, { cause: err });
          if (!(err instanceof InputError)) throw err;
          expect(err.message.length).toBeGreaterThan(10);
          stats.inputErrors++;
        }
        const ms = budgetNow() - t0;
        if (process.env.LOOPWRIGHT_FUZZ_PROFILE) times.push([ms, text]);
        if (ms > stats.worstMs) {
          stats.worstMs = ms;
          stats.worst = text;
        }
        expect(ms).toBeLessThan(PER_CASE_MS);
      }),
      { numRuns: CASES, seed: SEED, endOnFailure: true },
    );
    if (process.env.LOOPWRIGHT_FUZZ_PROFILE)
      console.log(
        times
          .sort((a, b) => b[0] - a[0])
          .slice(0, 15)
          .map(([t, x]) => `${t.toFixed(0)} ms ${x}`)
          .join('\n'),
      );
    console.log(
      `expression fuzz: ${stats.cases} cases, ${stats.results} results, ${stats.inputErrors} clean input errors, worst ${stats.worstMs.toFixed(0)} ms (${stats.worst})`,
    );
    expect(stats.cases).toBe(CASES);
  }, 600_000);
});
