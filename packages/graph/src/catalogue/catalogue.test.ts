import { describe, expect, it } from 'vitest';
import { type Complex, InputError, tevalComplex } from '@loopwright/lti';
import type { Block, BlockKind, Diagram } from '../document-types.ts';
import { emptyDiagram } from '../document.ts';
import { linearForm, resolveParams } from '../resolve.ts';
import { blockKinds, blockSpec, catalogue } from './index.ts';

// The parameter names of every kind, as fixed in the cross-team contract.
const CONTRACT: Record<BlockKind, string[]> = {
  'transfer-function': ['expression', 'sampleTime', 'computeDelay', 'method', 'prewarp'],
  gain: ['k', 'sampleTime', 'computeDelay'],
  pid: [
    'form',
    'kp',
    'ti',
    'td',
    'ki',
    'kd',
    'n',
    'umin',
    'umax',
    'antiWindup',
    'tt',
    'sampleTime',
    'computeDelay',
    'integral',
    'derivative',
  ],
  'lead-lag': ['k', 'tLead', 'tLag', 'sampleTime', 'computeDelay', 'method', 'prewarp'],
  integrator: ['k'],
  'first-order-lag': ['k', 'tau'],
  'second-order': ['k', 'wn', 'zeta'],
  notch: ['frequency', 'frequencyUnit', 'depth', 'damping'],
  'dead-time': ['delay'],
  'summing-junction': ['signs'],
  saturation: ['lower', 'upper'],
  'rate-limit': ['rising', 'falling'],
  'dead-zone': ['lower', 'upper'],
  source: ['shape', 'amplitude', 'start', 'offset', 'omega', 'width', 'period'],
  probe: ['unit'],
};

// Plain complex arithmetic, written out here independently of lti's rational functions.
const c = (re: number, im = 0): Complex => ({ re, im });
const add = (a: Complex, b: Complex) => c(a.re + b.re, a.im + b.im);
const mul = (a: Complex, b: Complex) => c(a.re * b.re - a.im * b.im, a.re * b.im + a.im * b.re);
const div = (a: Complex, b: Complex) => {
  const d = b.re * b.re + b.im * b.im;
  return c((a.re * b.re + a.im * b.im) / d, (a.im * b.re - a.re * b.im) / d);
};
const S0 = c(0.3, 1.7); // an arbitrary test point off both axes

const block = (kind: BlockKind, params: Block['params'], id = 'b1'): Block => ({ id, kind, position: { x: 0, y: 0 }, params });
const diagramWith = (parameters: Diagram['parameters']): Diagram => ({ ...emptyDiagram(), parameters });
const D0 = diagramWith([]);

function tfAt(b: Block, d: Diagram = D0, overrides?: Record<string, number>): Complex {
  const f = linearForm(d, b, overrides);
  if (f.type !== 'transfer') throw new Error(`expected a transfer form, got ${f.type}`);
  return tevalComplex(f.tf, S0);
}
const close = (a: Complex, b: Complex, tol = 1e-12) => {
  expect(Math.abs(a.re - b.re)).toBeLessThanOrEqual(tol * (1 + Math.abs(b.re)));
  expect(Math.abs(a.im - b.im)).toBeLessThanOrEqual(tol * (1 + Math.abs(b.im)));
};

describe('catalogue', () => {
  it('has one spec per kind with exactly the contract parameter names', () => {
    expect([...blockKinds].sort()).toEqual(Object.keys(CONTRACT).sort());
    for (const spec of catalogue) expect(spec.params.map((p) => p.name)).toEqual(CONTRACT[spec.kind]);
  });
  it('defaults resolve and give a linear form for every kind', () => {
    for (const spec of catalogue) {
      const f = linearForm(D0, block(spec.kind, {}));
      expect(['transfer', 'sum', 'source', 'probe']).toContain(f.type);
    }
  });
  it('ports: single input "in" and output "out"; junction in1..inN; source no input; probe no output', () => {
    for (const spec of catalogue) {
      if (spec.kind === 'source') expect(spec.inputs({})).toEqual([]);
      else if (spec.kind === 'summing-junction') expect(spec.inputs({ signs: '+-+' })).toEqual(['in1', 'in2', 'in3']);
      else expect(spec.inputs({})).toEqual(['in']);
      expect(spec.outputs).toEqual(spec.kind === 'probe' ? [] : ['out']);
    }
  });
  it('refuses an unknown kind by name', () => {
    expect(() => blockSpec('mixer')).toThrow(/unknown block kind "mixer"/);
  });
});

describe('linear forms agree with their formulas (evaluated directly at a complex point)', () => {
  it('gain, integrator, first-order lag, lead-lag', () => {
    close(tfAt(block('gain', { k: -2.5 })), c(-2.5));
    close(tfAt(block('integrator', { k: 3 })), div(c(3), S0));
    close(tfAt(block('first-order-lag', { k: 2, tau: 0.4 })), div(c(2), add(mul(c(0.4), S0), c(1))));
    close(tfAt(block('lead-lag', { k: 2, tLead: 1.5, tLag: 0.2 })), mul(c(2), div(add(mul(c(1.5), S0), c(1)), add(mul(c(0.2), S0), c(1)))));
  });
  it('second-order k·wn²/(s² + 2ζwn s + wn²)', () => {
    const [k, wn, z] = [1.5, 4, 0.3];
    const den = add(add(mul(S0, S0), mul(c(2 * z * wn), S0)), c(wn * wn));
    close(tfAt(block('second-order', { k, wn, zeta: z })), div(c(k * wn * wn), den));
  });
  it('dead time e^(−sT)', () => {
    const T = 0.7;
    const expected = c(Math.exp(-S0.re * T) * Math.cos(-S0.im * T), Math.exp(-S0.re * T) * Math.sin(-S0.im * T));
    close(tfAt(block('dead-time', { delay: T })), expected);
  });
  it('PID ideal form kp(1 + 1/(ti s) + td s/(1 + td s/n))', () => {
    const [kp, ti, td, n] = [2, 0.8, 0.25, 8];
    const expected = mul(c(kp), add(add(c(1), div(c(1), mul(c(ti), S0))), div(mul(c(td), S0), add(c(1), mul(c(td / n), S0)))));
    close(tfAt(block('pid', { kp, ti, td, n })), expected);
  });
  it('PID ideal form with blank ti is PD (no integral action)', () => {
    const expected = mul(c(2), add(c(1), div(mul(c(0.5), S0), add(c(1), mul(c(0.05), S0)))));
    close(tfAt(block('pid', { kp: 2, ti: '', td: 0.5, n: 10 })), expected);
  });
  it('PID parallel form kp + ki/s + kd s/(1 + (kd/kp) s/n)', () => {
    const [kp, ki, kd, n] = [3, 1.5, 0.6, 5];
    const expected = add(add(c(kp), div(c(ki), S0)), div(mul(c(kd), S0), add(c(1), mul(c(kd / kp / n), S0))));
    close(tfAt(block('pid', { form: 'parallel', kp, ki, kd, n })), expected);
  });
  it('transfer-function block parses its expression over the named parameters', () => {
    const d = diagramWith([
      { name: 'K', value: 4 },
      { name: 'T', value: 0.5 },
    ]);
    const b = block('transfer-function', { expression: 'K/(s*(T*s + 1))' });
    close(tfAt(b, d), div(c(4), mul(S0, add(mul(c(0.5), S0), c(1)))));
    // overrides win over the stored value
    close(tfAt(b, d, { K: 1 }), div(c(1), mul(S0, add(mul(c(0.5), S0), c(1)))));
  });
  it('transfer-function block keeps exp(−T s) as a dead time', () => {
    const f = linearForm(D0, block('transfer-function', { expression: '2*exp(-0.5*s)/(3*s + 1)' }));
    expect(f.type === 'transfer' && f.tf.delay).toBe(0.5);
  });
  it('saturation, rate limit and dead zone pass the signal (gain 1)', () => {
    for (const kind of ['saturation', 'rate-limit', 'dead-zone'] as const) close(tfAt(block(kind, {})), c(1));
  });
  it('summing junction signs; source and probe', () => {
    expect(linearForm(D0, block('summing-junction', { signs: '+-+' }))).toEqual({ type: 'sum', signs: [1, -1, 1] });
    expect(linearForm(D0, block('source', { shape: 'ramp' }))).toEqual({ type: 'source' });
    expect(linearForm(D0, block('probe', {}))).toEqual({ type: 'probe' });
  });
});

describe('resolveParams', () => {
  const d = diagramWith([
    { name: 'Kp', value: 2.5 },
    { name: 'Kv', value: 4 },
  ]);
  it('evaluates expression strings over named parameters and overrides', () => {
    const p = resolveParams(d, block('pid', { kp: 'Kp', ti: '2*Kv', td: 0 }));
    expect(p.kp).toBe(2.5);
    expect(p.ti).toBe(8);
    expect(resolveParams(d, block('pid', { kp: 'Kp' }), { Kp: 7 }).kp).toBe(7);
  });
  it('fills defaults and blanks (no output limits → ±Infinity)', () => {
    const p = resolveParams(d, block('pid', {}));
    expect(p.form).toBe('ideal');
    expect(p.umin).toBe(-Infinity);
    expect(p.umax).toBe(Infinity);
    expect(resolveParams(d, block('saturation', { lower: '', upper: 5 })).lower).toBe(-Infinity);
  });
  it('blank tracking time: √(ti·td) with derivative action, ti without', () => {
    // Åström & Hägglund, Advanced PID Control (2006), back-calculation tracking time rule of thumb (from memory)
    expect(resolveParams(d, block('pid', { ti: 4, td: 1 })).tt).toBeCloseTo(Math.sqrt(4 * 1), 12);
    expect(resolveParams(d, block('pid', { ti: 4, td: 0 })).tt).toBe(4);
    expect(resolveParams(d, block('pid', { ti: 4, td: 1, tt: 0.3 })).tt).toBe(0.3);
  });
  const refuse = (b: Block, pattern: RegExp) => {
    let err: unknown;
    try {
      resolveParams(d, b);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    expect((err as Error).message).toMatch(pattern);
    return err as InputError;
  };
  it('errors name the block and field', () => {
    refuse(block('pid', { kp: 'Kq' }, 'pid1'), /^block pid1 field kp: "Kq": /);
    refuse(block('first-order-lag', { tau: -1 }, 'lag'), /^block lag field tau: -1 s must be at least 0 s/);
    refuse(block('second-order', { wn: 0 }, 'so'), /^block so field wn: 0 rad\/s must be above 0 rad\/s/);
    refuse(block('gain', { k: '' }, 'g'), /^block g field k: a value is required/);
    refuse(block('pid', { form: 'series' }, 'p'), /^block p field form: "series" is not one of "ideal", "parallel"/);
    refuse(block('gain', { k: '2*s' }, 'g'), /^block g field k: "2\*s": /);
  });
  it('keeps the expression position of the fault', () => {
    const err = refuse(block('gain', { k: '1 + Kx' }, 'g'), /^block g field k:/);
    expect(err.details.position).toBe(4);
  });
  it('linear-form errors name the block and field', () => {
    expect(() => linearForm(d, block('saturation', { lower: 2, upper: 1 }, 'sat'))).toThrow(
      /^block sat field lower: lower \(2\) must be below upper \(1\)/,
    );
    expect(() => linearForm(d, block('pid', { umin: 5, umax: -5 }, 'c'))).toThrow(/^block c field umin:/);
    expect(() => linearForm(d, block('pid', { form: 'parallel', kp: 0, kd: 1 }, 'c'))).toThrow(/^block c field kp:/);
    expect(() => linearForm(d, block('transfer-function', { expression: '1/(s+' }, 'tf'))).toThrow(
      /^block tf field expression: "1\/\(s\+":/,
    );
  });
  it('a parameter called like an Object.prototype member is an ordinary name', () => {
    const d2 = diagramWith([{ name: 'toString', value: 3 }]);
    expect(resolveParams(d2, block('gain', { k: 'toString' })).k).toBe(3);
    expect(() => resolveParams(D0, block('gain', { k: 'hasOwnProperty' }))).toThrow(InputError);
  });
});

describe('defaults and the parser-free shortcut', () => {
  it('a block of each kind with every default written out loads and passes the structural checks of its fields', async () => {
    const { validateDiagram } = await import('../document.ts');
    const { checkStructure } = await import('../checks/structure.ts');
    const d = {
      ...emptyDiagram(),
      blocks: catalogue.map((s, i) => block(s.kind, Object.fromEntries(s.params.map((p) => [p.name, p.default])), `b${i}`)),
    };
    const loaded = validateDiagram(JSON.parse(JSON.stringify(d)));
    const bad = checkStructure(loaded).filter(
      (f) => f.code === 'invalid-parameter' || f.code === 'improper-block' || f.code === 'invalid-expression',
    );
    expect(bad).toEqual([]);
  });
  it('bare names and plain numbers resolve exactly as lti parseScalar evaluates them (fast-check)', async () => {
    const fc = (await import('fast-check')).default;
    const { parseScalar } = await import('@loopwright/lti');
    const name = fc
      .stringMatching(/^[A-Za-z_][A-Za-z0-9_]{0,6}$/)
      .filter(
        (n) =>
          ![
            's',
            'exp',
            'e',
            'pi',
            'mod',
            'to',
            'in',
            'and',
            'or',
            'not',
            'xor',
            'true',
            'false',
            'null',
            'undefined',
            'NaN',
            'Infinity',
          ].includes(n),
      );
    const numberText = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e12, max: 1e12 }).map(String),
      fc.integer().map(String),
      fc.constantFrom('0.5', '.25', '1e-3', '2E+2', ' 7 ', '-0', '+3'),
    );
    fc.assert(
      fc.property(name, fc.double({ noNaN: true, noDefaultInfinity: true }), numberText, (n, value, text) => {
        const d = diagramWith([{ name: n, value }]);
        expect(resolveParams(d, block('gain', { k: n })).k).toBe(parseScalar(n, { [n]: value }));
        let viaParser: number | undefined;
        try {
          viaParser = parseScalar(text, {});
        } catch {
          viaParser = undefined;
        }
        if (viaParser !== undefined) expect(resolveParams(d, block('gain', { k: text })).k).toBe(viaParser);
      }),
      { numRuns: 300 },
    );
  });
});
