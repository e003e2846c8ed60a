// The generated Structured Text is run by a small translator (test-only) for the subset we emit,
// and must give the reference executor's outputs on a test vector; the C text is checked for its
// contract here and compiled with the system compiler in tests/unit/sampled-codegen-c.test.ts.
import { describe, expect, it } from 'vitest';
import { ST_NO_LIMIT, checkCodeName, cNumber, stNumber } from './codegen-common.ts';
import { generateC } from './codegen-c.ts';
import { generateStructuredText } from './codegen-st.ts';
import type { DiscreteController } from './controller.ts';
import { exportController } from './export.ts';
import type { PidCoefficients } from './pid.ts';
import { CASES } from './test-support/controller-cases.ts';
import { type TestVector, exerciseInput, makeTestVector } from './test-vector.ts';

type Vars = Record<string, number | boolean | number[]>;

/** Translates our Structured Text subset to a JS function over a variable record (test-only). */
function loadSt(text: string): { vars: Vars; run: (v: Vars) => void } {
  const src = text.replace(/\(\*[\s\S]*?\*\)/g, '');
  const vars: Vars = {};
  const declBlocks = [...src.matchAll(/\bVAR(?:_INPUT|_OUTPUT)?\b([\s\S]*?)\bEND_VAR\b/g)];
  for (const m of declBlocks) {
    for (const line of m[1].split(';')) {
      const d = line.trim().match(/^(\w+)\s*:\s*(ARRAY\[0\.\.(\d+)\] OF LREAL|LREAL|BOOL|INT)\s*(?::=\s*(.+))?$/);
      if (!d) {
        expect(line.trim()).toBe('');
        continue;
      }
      const [, name, type, hi, init] = d;
      if (type.startsWith('ARRAY')) vars[name] = init ? JSON.parse(init) : new Array(Number(hi) + 1).fill(0);
      else if (type === 'BOOL') vars[name] = init === 'TRUE';
      else vars[name] = init ? Number(init) : 0;
    }
  }
  const body = src.slice(src.lastIndexOf('END_VAR') + 'END_VAR'.length, src.indexOf('END_FUNCTION_BLOCK'));
  let js = body
    .replace(/:=/g, '⇐')
    .replace(/<>/g, '!=')
    .replace(/=/g, '==')
    .replace(/⇐/g, '=')
    .replace(/\bFOR (\w+) = (-?\d+) TO (-?\d+) BY -1 DO\b/g, 'for ($1 = $2; $1 >= $3; $1--) {')
    .replace(/\bFOR (\w+) = (-?\d+) TO (-?\d+) DO\b/g, 'for ($1 = $2; $1 <= $3; $1++) {')
    .replace(/\bEND_FOR;/g, '}')
    .replace(/\bELSIF\b/g, '} else if (')
    .replace(/\bIF\b/g, 'if (')
    .replace(/\bTHEN\b/g, ') {')
    .replace(/\bELSE\b/g, '} else {')
    .replace(/\bEND_IF;/g, '}')
    .replace(/\bAND\b/g, '&&')
    .replace(/\bOR\b/g, '||')
    .replace(/\bNOT\b/g, '!')
    .replace(/\bTRUE\b/g, 'true');
  js = js.replace(/\b([A-Z][A-Z0-9_]*)\b/g, (w) => {
    expect(w in vars, `undeclared identifier ${w}`).toBe(true);
    return `v.${w}`;
  });
  const fn = new Function('v', js) as (v: Vars) => void;
  return { vars, run: fn };
}

function runSt(c: DiscreteController, v: TestVector, name: string): number[] {
  const { vars, run } = loadSt(generateStructuredText(c, name).text);
  vars.U_INIT = v.initialOutput;
  const out: number[] = [];
  for (let k = 0; k < v.input.length; k++) {
    for (const r of v.retunes.filter((x) => x.atSample === k)) {
      if (c.kind === 'pid') {
        const p = r.coefficients as PidCoefficients;
        Object.assign(vars, { KP: p.kp, BI: p.bi, AD: p.ad, BD: p.bd, BR: p.br, UMIN: clampLimit(p.umin), UMAX: clampLimit(p.umax) });
      } else {
        const l = r.coefficients as { b: number[]; a: number[]; umin: number; umax: number };
        Object.assign(vars, { B: l.b.slice(), A: l.a.slice(), UMIN: clampLimit(l.umin), UMAX: clampLimit(l.umax) });
      }
    }
    vars.E = v.input[k];
    run(vars);
    out.push(vars.U as number);
  }
  return out;
}
const clampLimit = (x: number) => (x === Infinity ? ST_NO_LIMIT : x === -Infinity ? -ST_NO_LIMIT : x);

describe('generated Structured Text runs the test vector to 1e-9', () => {
  for (const c of CASES) {
    it(c.label, () => {
      const ctrl = c.make();
      const v = makeTestVector(ctrl, exerciseInput(400, 3), {
        name: 'axis_ctrl',
        initialOutput: 0.25,
        retunes: [{ atSample: 230, coefficients: c.retune().coefficients }],
      });
      const got = runSt(ctrl, v, 'axis_ctrl');
      got.forEach((u, k) => expect(Math.abs(u - v.output[k])).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(v.output[k]))));
      // the vector exercises the limits where there are any
      const k = ctrl.coefficients;
      if (Number.isFinite(k.umax)) expect(v.output.some((u) => u === k.umax)).toBe(true);
    });
  }
  it('the function block has the IEC structure and our names', () => {
    const st = generateStructuredText(CASES[4].make(), 'speed_pid').text;
    expect(st).toMatch(/^FUNCTION_BLOCK SPEED_PID$/m);
    expect(st.trimEnd().endsWith('END_FUNCTION_BLOCK')).toBe(true);
    expect((st.match(/\bIF\b/g) ?? []).length).toBe((st.match(/\bEND_IF;/g) ?? []).length);
    expect(st).toMatch(/Caution/);
  });
});

describe('generated C: contract', () => {
  it('header and source declare the state struct, the coefficient struct and reset/step/retune', () => {
    const g = generateC(CASES[0].make(), 'pos_loop');
    expect(g.header.path).toBe('pos_loop.h');
    for (const w of [
      'pos_loop_state',
      'pos_loop_coeffs',
      'pos_loop_reset',
      'pos_loop_step',
      'pos_loop_retune',
      'pos_loop_design',
      '#ifndef POS_LOOP_H',
    ])
      expect(g.header.text).toContain(w);
    expect(g.source.text).toContain('#include "pos_loop.h"');
    expect(g.header.text).toMatch(/Caution/);
  });
  it('generated C and Structured Text are plain ASCII', () => {
    for (const c of CASES) {
      const ctrl = c.make();
      const g = generateC(ctrl, 'a1');
      for (const t of [g.header.text, g.source.text, generateStructuredText(ctrl, 'a1').text]) expect(t).toMatch(/^[\t\n\r\x20-\x7e]*$/);
    }
  });
  it('numbers round-trip and infinite limits are written as HUGE_VAL / ±1.0E308', () => {
    for (const x of [0.1, -2.5e-7, 1 / 3, 12345678.9, 3]) {
      expect(Number(cNumber(x))).toBe(x);
      expect(Number(stNumber(x))).toBe(x);
      expect(stNumber(x)).toMatch(/^-?\d+\.\d+(E-?\d+)?$/);
    }
    expect(cNumber(Infinity)).toBe('HUGE_VAL');
    expect(stNumber(-Infinity)).toBe('-1.0E308');
  });
  it('identifier stems: letters, digits, single underscores; no keywords', () => {
    expect(checkCodeName('speed_pi2')).toBe('speed_pi2');
    for (const bad of ['2pi', 'speed__pi', 'pi_', 'double', 'VAR', 'a-b', '']) expect(() => checkCodeName(bad)).toThrow(/name/);
  });
  it('export gives the files for each language', () => {
    const c = CASES[0].make();
    expect(exportController(c, 'c', 'x1').map((f) => f.path)).toEqual(['x1.h', 'x1.c']);
    expect(exportController(c, 'st', 'x1').map((f) => f.path)).toEqual(['x1.st']);
    const txt = exportController(c, 'coefficients', 'x1')[0];
    expect(txt.path).toBe('x1.txt');
    expect(txt.text).toContain('b[0] = ');
    expect(() => exportController(c, 'fortran' as never, 'x1')).toThrow(/lang/);
  });
});
