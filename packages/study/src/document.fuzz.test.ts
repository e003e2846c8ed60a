import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { demoDiagrams, parseDiagram, serializeDiagram, type Diagram } from '@loopwright/graph';
import { InputError, budgetNow } from '@loopwright/lti';
import { runStudies, runStudy, type StudyRequest } from './study.ts';
import { coolingReverseActing, firstNaN, furnaceCascade, tankFeedforward, unityLoop } from './testing.ts';

/**
 * In-process fuzzing that reaches the analysis (issue 10 "tests that can fail"): documents
 * mutated where it matters to the mathematics — parameter values from 1e-320 to 1e308, zero
 * and negative time constants, new transfer expressions (high order, unstable, improper, dead
 * times), wires added and removed (new loops, algebraic loops), junction signs — are loaded and
 * sent through the checks, a closed-loop form (reduce), the loops table and a simulation run. Each case runs
 * under a deadline; every part must come back as a result holding no NaN or as a clean refusal
 * (reason 'input', the message naming what is wrong). A part that failed for any other reason
 * is a crash; one that ran into the deadline ('budget') is a hang. Set LOOPWRIGHT_FUZZ_RUNS for
 * a longer run (the seed stays fixed unless LOOPWRIGHT_FUZZ_SEED is given; LOOPWRIGHT_FUZZ_PROFILE=1
 * prints a crash's stack).
 */
const RUNS = Number(process.env.LOOPWRIGHT_FUZZ_RUNS ?? 2000);
const SEED = Number(process.env.LOOPWRIGHT_FUZZ_SEED ?? 20261202);
const PER_CASE_MS = 5000;

const bases: Diagram[] = [
  unityLoop(2),
  unityLoop(5, '(s + 3)/(s*(s + 1)*(s + 2))'),
  unityLoop(1, '2*exp(-0.4*s)/((3*s + 1)*(s + 1))'),
  furnaceCascade(),
  tankFeedforward(),
  coolingReverseActing(),
  ...demoDiagrams.map((x) => x.diagram),
];

const extreme = fc.constantFrom(0, -1, 1e-320, 1e-12, 1e-3, 0.5, 2, 7, 1e3, 1e6, 1e12, 1e308, -1e308, -0.5);
const small = fc.constantFrom('0.01', '0.5', '1', '2', '10', '1e4');
const expression = fc
  .tuple(
    fc.constantFrom('1', '2', '1e-300', '1e300', '-3', 'K'),
    fc.array(
      fc.oneof(
        small.map((a) => `(s+${a})`),
        small.map((a) => `(s-${a})`),
        fc.constant('s'),
        fc.tuple(small, fc.integer({ min: 2, max: 25 })).map(([a, n]) => `(s+${a})^${n}`),
      ),
      { maxLength: 4 },
    ),
    fc.array(
      fc.oneof(
        small.map((a) => `(s+${a})`),
        fc.constant('s'),
      ),
      { maxLength: 3 },
    ),
    fc.constantFrom('', '*exp(-s)', '*exp(-1e5*s)', '*exp(-1e-9*s)', '*exp(-0.3*s)'),
  )
  .map(([k, den, num, delay]) => `${k}${num.length ? `*${num.join('*')}` : ''}/(${den.length ? den.join('*') : '1'})${delay}`);

const mutation = fc.oneof(
  { weight: 4, arbitrary: fc.record({ op: fc.constant('param' as const), at: fc.nat(), key: fc.nat(), value: extreme }) },
  { weight: 2, arbitrary: fc.record({ op: fc.constant('named' as const), at: fc.nat(), value: extreme }) },
  { weight: 3, arbitrary: fc.record({ op: fc.constant('expression' as const), at: fc.nat(), text: expression }) },
  {
    weight: 2,
    arbitrary: fc.record({ op: fc.constant('wire' as const), a: fc.nat(), b: fc.nat(), port: fc.constantFrom('in', 'in1', 'in2', 'in3') }),
  },
  { weight: 1, arbitrary: fc.record({ op: fc.constant('unwire' as const), at: fc.nat() }) },
  {
    weight: 1,
    arbitrary: fc.record({
      op: fc.constant('signs' as const),
      at: fc.nat(),
      signs: fc.constantFrom('+', '-', '++', '+-', '-+', '--', '+++', '+-+'),
    }),
  },
  {
    weight: 1,
    arbitrary: fc.record({
      op: fc.constant('junk' as const),
      at: fc.nat(),
      key: fc.nat(),
      value: fc.constantFrom<unknown>(null, '', 'x', -Infinity, '1/(s+', [], {}, 'exp(-s)'),
    }),
  },
);
type Mutation = typeof mutation extends fc.Arbitrary<infer T> ? T : never;

function apply(d: Diagram, m: Mutation): void {
  const pick = <T>(xs: T[], i: number): T | undefined => (xs.length ? xs[i % xs.length] : undefined);
  const b = 'at' in m ? pick(d.blocks, m.at) : undefined;
  switch (m.op) {
    case 'param':
    case 'junk': {
      if (!b) return;
      const keys = Object.keys(b.params);
      const key = pick(keys, m.key);
      if (key) (b.params as Record<string, unknown>)[key] = m.value;
      return;
    }
    case 'named': {
      const p = pick(d.parameters, m.at);
      if (p) p.value = m.value;
      return;
    }
    case 'expression': {
      const tf = d.blocks.filter((x) => x.kind === 'transfer-function');
      const t = pick(tf, m.at);
      if (t) t.params.expression = m.text;
      return;
    }
    case 'wire': {
      const from = pick(d.blocks, m.a);
      const to = pick(d.blocks, m.b);
      if (from && to)
        d.wires.push({ id: `fz${d.wires.length}`, from: { block: from.id, port: 'out' }, to: { block: to.id, port: m.port } });
      return;
    }
    case 'unwire': {
      if (d.wires.length) d.wires.splice(m.at % d.wires.length, 1);
      return;
    }
    case 'signs': {
      const j = pick(
        d.blocks.filter((x) => x.kind === 'summing-junction'),
        m.at,
      );
      if (j) j.params.signs = m.signs;
      return;
    }
  }
}

function studiesOf(d: Diagram): StudyRequest[] {
  const source = d.blocks.find((x) => x.kind === 'source');
  const probe = d.blocks.find((x) => x.kind === 'probe');
  const reqs: StudyRequest[] = [{ kind: 'check' }];
  if (source && probe) reqs.push({ kind: 'closed-loop', from: { block: source.id }, to: { block: probe.id } });
  reqs.push({ kind: 'loops' });
  // A short run with a small step budget: the simulator's own stop reasons (diverged, stiff,
  // budget) are results; what is tested is that it ends and reports one.
  reqs.push({ kind: 'run', maxSteps: 2000, maxWallMs: 500 });
  return reqs;
}

describe('document fuzzing through loops, reduce and simulate', () => {
  it(`${RUNS} mutated documents: every part a NaN-free result or a clean refusal, each case within ${PER_CASE_MS} ms`, () => {
    const perKind: Record<string, number> = {};
    const stats = { cases: 0, parts: 0, results: 0, refused: 0, loadRefused: 0, crashes: 0, hangs: 0, runsStopped: 0, worstMs: 0 };
    fc.assert(
      fc.property(fc.nat(), fc.array(mutation, { minLength: 1, maxLength: 3 }), (which, ms) => {
        stats.cases++;
        const doc = structuredClone(bases[which % bases.length]);
        for (const m of ms) apply(doc, m);
        const t0 = budgetNow();
        let d: Diagram;
        try {
          d = parseDiagram(serializeDiagram(doc));
        } catch (err) {
          if (!(err instanceof InputError)) throw err;
          stats.loadRefused++;
          return;
        }
        const reqs = studiesOf(d);
        const parts = reqs.map((r) => {
          const t = budgetNow();
          const p = runStudies(d, [r], { deadline: t0 + PER_CASE_MS })[0];
          perKind[r.kind] = (perKind[r.kind] ?? 0) + budgetNow() - t;
          return p;
        });
        parts.forEach((p, i) => {
          stats.parts++;
          const kind = reqs[i].kind;
          if (p.ok) {
            const bad = firstNaN(p.value);
            if (bad) throw new Error(`${kind}: NaN at ${bad} (mutations ${JSON.stringify(ms)})`);
            if (p.value.kind === 'run' && p.value.value.run.status !== 'ok') stats.runsStopped++;
            stats.results++;
            return;
          }
          if (p.reason === 'budget') {
            stats.hangs++;
            throw new Error(`${kind}: ran into the ${PER_CASE_MS} ms deadline: ${p.error} (mutations ${JSON.stringify(ms)})`);
          }
          if (p.reason !== 'input') {
            stats.crashes++;
            // The stack of the crash, for the one who debugs it.
            if (process.env.LOOPWRIGHT_FUZZ_PROFILE) {
              try {
                runStudy(d, reqs[i] as never);
              } catch (e) {
                console.log((e as Error).stack);
              }
            }
            throw new Error(`${kind}: crashed: ${p.error} (mutations ${JSON.stringify(ms)})`);
          }
          expect(p.error.length).toBeGreaterThan(10);
          stats.refused++;
        });
        const ms_ = budgetNow() - t0;
        stats.worstMs = Math.max(stats.worstMs, ms_);
        expect(ms_).toBeLessThan(PER_CASE_MS);
      }),
      { numRuns: RUNS, seed: SEED, endOnFailure: true },
    );
    console.log(
      `document fuzz: ${JSON.stringify({ ...stats, worstMs: Math.round(stats.worstMs) })}; ms per study kind ${JSON.stringify(perKind, (_, v) => (typeof v === 'number' ? Math.round(v) : v))}`,
    );
    expect(stats.cases).toBe(RUNS);
    // The mutations must reach the analysis, not only the loader.
    expect(stats.results).toBeGreaterThan(RUNS / 2);
  }, 900_000);
});
