import { InputError } from '@loopwright/lti';
import type { DiscreteController } from './controller.ts';
import { dtFormat } from './discrete.ts';

// Words a generated identifier may not be (C keywords and IEC 61131-3 keywords, compared case-insensitively).
const RESERVED = new Set(
  (
    'auto break case char const continue default do double else enum extern float for goto if inline int long register restrict return short ' +
    'signed sizeof static struct switch typedef union unsigned void volatile while bool true false ' +
    'and or not xor mod function function_block program var var_input var_output var_in_out end_var end_function_block end_if ' +
    'end_for end_while end_case then elsif by to of array real lreal sint dint lint usint uint udint ulint word dword time ' +
    'string exit repeat until end_repeat at task configuration resource'
  ).split(' '),
);

/** Checks the identifier stem of generated code: a C and Structured Text identifier, not a keyword. */
export function checkCodeName(name: string): string {
  if (typeof name !== 'string' || !/^[A-Za-z][A-Za-z0-9_]{0,23}$/.test(name) || /__/.test(name) || name.endsWith('_')) {
    throw new InputError(
      `name: "${name}" cannot name generated code: use 1–24 letters, digits and single underscores, starting with a letter`,
      { field: 'name' },
    );
  }
  if (RESERVED.has(name.toLowerCase()))
    throw new InputError(`name: "${name}" is a reserved word in C or Structured Text`, { field: 'name' });
  return name;
}

/** A double literal for C that round-trips (shortest form; ±Infinity → ±HUGE_VAL from math.h). */
export function cNumber(v: number): string {
  if (v === Infinity) return 'HUGE_VAL';
  if (v === -Infinity) return '-HUGE_VAL';
  if (!Number.isFinite(v)) throw new InputError(`cannot write ${v} as a coefficient`);
  const s = String(v === 0 ? 0 : v);
  return /[.e]/.test(s) ? s : `${s}.0`;
}

/** No infinity literal exists in Structured Text: an absent limit is written as ±1.0E308. */
export const ST_NO_LIMIT = 1e308;

/** An LREAL literal for Structured Text: digits on both sides of the point, exponent with E. */
export function stNumber(v: number): string {
  if (v === Infinity) return stNumber(ST_NO_LIMIT);
  if (v === -Infinity) return stNumber(-ST_NO_LIMIT);
  if (!Number.isFinite(v)) throw new InputError(`cannot write ${v} as a coefficient`);
  const s = String(v === 0 ? 0 : v);
  const [mant, exp] = s.split('e');
  const m = mant.includes('.') ? mant : `${mant}.0`;
  return exp === undefined ? m : `${m}E${exp.startsWith('+') ? exp.slice(1) : exp}`;
}

const KIND_TEXT = { pid: 'PID', 'lead-lag': 'lead-lag', gain: 'gain', 'transfer-function': 'transfer-function' } as const;
const INTEGRAL_TEXT = { backward: 'backward difference', forward: 'forward difference', tustin: 'trapezoidal (Tustin)' } as const;
const METHOD_TEXT = { zoh: 'zero-order-hold equivalent', tustin: 'Tustin (bilinear)', matched: 'matched pole-zero' } as const;

/** Plain-text lines describing a controller for the head of generated files. */
export function describeController(c: DiscreteController, name: string): string[] {
  const lines: string[] = [];
  const T = c.sampleTime;
  if (c.kind === 'pid') {
    lines.push(`${name}: sampled PID controller, position form.`);
    lines.push(
      `Integral: ${INTEGRAL_TEXT[c.integral]}; derivative filter: ${c.derivative === 'tustin' ? 'Tustin' : 'backward difference'}; anti-windup: ${c.antiWindup}.`,
    );
  } else {
    lines.push(`${name}: sampled ${KIND_TEXT[c.source]} controller, order ${c.coefficients.a.length - 1}, ${METHOD_TEXT[c.method]}.`);
    lines.push(`Anti-windup: ${c.antiWindup === 'limited-feedback' ? 'recursion on the limited output' : 'off'}.`);
  }
  lines.push(`Sample time T = ${T} s: call the step function exactly once every T.`);
  lines.push(
    c.computeDelay === 0
      ? 'Computation delay assumed in the analysis: none (output applied at the sampling instant).'
      : `Computation delay assumed in the analysis: ${c.computeDelay} sample(s) (${c.computeDelay * T} s from sampling to output); this code does not add it.`,
  );
  lines.push(`C(z) = ${dtFormat(c.transfer, 10)} (limits ignored).`);
  lines.push('Input e = setpoint - measurement; output u limited to [umin, umax].');
  lines.push('Caution: a design aid. Validate on the real plant with limits, interlocks and emergency');
  lines.push('stops in place, and follow the applicable functional-safety standards and local codes.');
  return lines;
}

/** Generated code is plain ASCII (embedded toolchains and PLC editors); typographic signs are spelled out. */
export function asciiOnly(text: string): string {
  const out = text.replace(/[—–−]/g, '-').replace(/·/g, '*').replace(/Σ/g, 'sum ').replace(/≤/g, '<=').replace(/≥/g, '>=');
  const bad = out.match(/[^\t\n\r\x20-\x7e]/);
  if (bad) throw new Error(`generated code holds a non-ASCII character ${JSON.stringify(bad[0])}`);
  return out;
}

/** Human-readable coefficient listing (the `coefficients` export). */
export function coefficientsText(c: DiscreteController, name: string): string {
  const lines = describeController(c, name).map((l) => `# ${l}`);
  const f = (v: number) => (Number.isFinite(v) ? String(v) : v > 0 ? 'none (+Infinity)' : 'none (−Infinity)');
  if (c.kind === 'pid') {
    const k = c.coefficients;
    lines.push('', 'Position form (per sample, in this order):');
    lines.push('  D = ad·D + bd·(e − e_prev)');
    lines.push(
      c.integral === 'forward'
        ? '  v = kp·e + I + D;  I = I + bi·e (after the output)'
        : c.integral === 'tustin'
          ? '  I_new = I + bi·(e + e_prev)/2;  v = kp·e + I_new + D'
          : '  I_new = I + bi·e;  v = kp·e + I_new + D',
    );
    lines.push('  u = min(max(v, umin), umax)');
    if (c.antiWindup === 'back-calculation') lines.push('  I = I + br·(u − v)');
    if (c.antiWindup === 'conditional')
      lines.push('  the integral increment is dropped when v is beyond a limit and the increment pushes further out');
    lines.push(
      '',
      `  kp   = ${f(k.kp)}`,
      `  bi   = ${f(k.bi)}`,
      `  ad   = ${f(k.ad)}`,
      `  bd   = ${f(k.bd)}`,
      `  br   = ${f(k.br)}`,
      `  umin = ${f(k.umin)}`,
      `  umax = ${f(k.umax)}`,
    );
  } else {
    lines.push('', `Limits: umin = ${f(c.coefficients.umin)}, umax = ${f(c.coefficients.umax)}`);
  }
  const { b, a } = c.differenceEquation;
  lines.push('', 'Difference equation (linear part): u(k) = Σ b[i]·e(k−i) − Σ a[i]·u(k−i), i ≥ 1 for a; a[0] = 1');
  b.forEach((v, i) => lines.push(`  b[${i}] = ${v}`));
  a.forEach((v, i) => lines.push(`  a[${i}] = ${v}`));
  return lines.join('\n') + '\n';
}
