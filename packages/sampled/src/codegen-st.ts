import { asciiOnly, checkCodeName, describeController, stNumber } from './codegen-common.ts';
import type { DiscreteController, DiscreteLinear, DiscretePid } from './controller.ts';

/**
 * IEC 61131-3 Structured Text of a sampled controller: one FUNCTION_BLOCK named after the
 * controller (upper case), to be called once per sample time from a cyclic task. Coefficients
 * are inputs initialised to the designed values; writing new values at run time is a bumpless
 * change (the block notices the change of the direct term and moves it onto its state). RESET
 * (or the first call) starts the block with the output at U_INIT. Same operations, in the same
 * order, as the reference executor and the C code.
 */
export function generateStructuredText(c: DiscreteController, name: string): { path: string; text: string } {
  checkCodeName(name);
  const fb = name.toUpperCase();
  const head = ['(*', ...describeController(c, name).map((l) => `  ${l}`), '  An absent output limit is written as +/-1.0E308.', '*)'];
  const body = c.kind === 'pid' ? pidSt(c) : linearSt(c);
  const text = [...head, `FUNCTION_BLOCK ${fb}`, ...body, 'END_FUNCTION_BLOCK', ''].join('\n');
  return { path: `${name}.st`, text: asciiOnly(text) };
}

const io = [
  'VAR_INPUT',
  '    E : LREAL;              (* control error: setpoint - measurement *)',
  '    RESET : BOOL;           (* TRUE: start again with the output at U_INIT *)',
  '    U_INIT : LREAL;         (* output after a reset *)',
];
const outputs = [
  'VAR_OUTPUT',
  '    U : LREAL;              (* limited output *)',
  '    AT_LIMIT : BOOL;        (* TRUE while the output is limited *)',
  'END_VAR',
];
const clamp = [
  'IF V > UMAX THEN',
  '    U := UMAX;',
  'ELSIF V < UMIN THEN',
  '    U := UMIN;',
  'ELSE',
  '    U := V;',
  'END_IF;',
  'AT_LIMIT := U <> V;',
];

function pidSt(c: DiscretePid): string[] {
  const k = c.coefficients;
  const fwd = c.integral === 'forward';
  return [
    ...io,
    `    KP : LREAL := ${stNumber(k.kp)};   (* proportional gain *)`,
    `    BI : LREAL := ${stNumber(k.bi)};   (* integral gain times T *)`,
    `    AD : LREAL := ${stNumber(k.ad)};   (* derivative filter: weight of the previous term *)`,
    `    BD : LREAL := ${stNumber(k.bd)};   (* derivative filter: weight of the error difference *)`,
    `    BR : LREAL := ${stNumber(k.br)};   (* back-calculation: T / tracking time *)`,
    `    UMIN : LREAL := ${stNumber(k.umin)};`,
    `    UMAX : LREAL := ${stNumber(k.umax)};`,
    'END_VAR',
    ...outputs,
    'VAR',
    '    INTEG : LREAL;          (* integral term *)',
    '    DERIV : LREAL;          (* filtered derivative term *)',
    '    LAST_E : LREAL;         (* previous error *)',
    '    KP_USED : LREAL;        (* KP of the previous call *)',
    '    STARTED : BOOL;',
    '    P_TERM : LREAL;',
    '    D_TERM : LREAL;',
    '    INC : LREAL;',
    '    INTEG_NEW : LREAL;',
    '    V : LREAL;',
    'END_VAR',
    '',
    'IF RESET OR NOT STARTED THEN',
    '    INTEG := U_INIT;',
    '    DERIV := 0.0;',
    '    LAST_E := 0.0;',
    '    KP_USED := KP;',
    '    STARTED := TRUE;',
    'END_IF;',
    '(* bumpless parameter change: the step of the proportional term moves onto the integral *)',
    'IF KP <> KP_USED THEN',
    '    INTEG := INTEG + (KP_USED - KP) * LAST_E;',
    '    KP_USED := KP;',
    'END_IF;',
    'P_TERM := KP * E;',
    'D_TERM := AD * DERIV + BD * (E - LAST_E);',
    c.integral === 'tustin' ? 'INC := 0.5 * BI * (E + LAST_E);' : 'INC := BI * E;',
    'INTEG_NEW := INTEG + INC;',
    fwd ? 'V := P_TERM + INTEG + D_TERM;' : 'V := P_TERM + INTEG_NEW + D_TERM;',
    ...(c.antiWindup === 'conditional'
      ? [
          '(* conditional integration: no integration that pushes further beyond a limit *)',
          'IF (V > UMAX AND INC > 0.0) OR (V < UMIN AND INC < 0.0) THEN',
          '    INTEG_NEW := INTEG;',
          '    V := P_TERM + INTEG_NEW + D_TERM;',
          'END_IF;',
        ]
      : []),
    ...clamp,
    ...(c.antiWindup === 'back-calculation' ? ['INTEG_NEW := INTEG_NEW + BR * (U - V);   (* back-calculation *)'] : []),
    'INTEG := INTEG_NEW;',
    'DERIV := D_TERM;',
    'LAST_E := E;',
  ];
}

function linearSt(c: DiscreteLinear): string[] {
  const { b, a, umin, umax } = c.coefficients;
  const n = a.length - 1;
  const list = (xs: number[]) => `[${xs.map(stNumber).join(', ')}]`;
  const feedback = c.antiWindup === 'limited-feedback' ? 'U' : 'V';
  const lines = [
    ...io,
    `    B : ARRAY[0..${n}] OF LREAL := ${list(b)};   (* weights of e(k-i) *)`,
    `    A : ARRAY[0..${n}] OF LREAL := ${list(a)};   (* weights of u(k-i); A[0] = 1, not used *)`,
    `    UMIN : LREAL := ${stNumber(umin)};`,
    `    UMAX : LREAL := ${stNumber(umax)};`,
    'END_VAR',
    ...outputs,
    'VAR',
    `    W : ARRAY[0..${Math.max(n - 1, 0)}] OF LREAL;   (* transposed direct form states *)`,
    '    LAST_E : LREAL;',
    '    B0_USED : LREAL;        (* B[0] of the previous call *)',
    '    STARTED : BOOL;',
    '    V : LREAL;',
    '    F : LREAL;',
    '    I : INT;',
    'END_VAR',
    '',
    'IF RESET OR NOT STARTED THEN',
  ];
  if (n > 0) {
    // W[1] … W[n−1] as for a held output; then W[0] so that the output starts at U_INIT.
    if (n > 1) lines.push(`    W[${n - 1}] := -A[${n}] * U_INIT;`);
    if (n > 2) lines.push(`    FOR I := ${n - 2} TO 1 BY -1 DO`, '        W[I] := -A[I + 1] * U_INIT + W[I + 1];', '    END_FOR;');
    lines.push('    W[0] := U_INIT;');
  }
  lines.push('    LAST_E := 0.0;', '    B0_USED := B[0];', '    STARTED := TRUE;', 'END_IF;');
  lines.push('(* bumpless parameter change: the step of the direct term moves onto the first state *)', 'IF B[0] <> B0_USED THEN');
  if (n > 0) lines.push('    W[0] := W[0] + (B0_USED - B[0]) * LAST_E;');
  lines.push('    B0_USED := B[0];', 'END_IF;');
  lines.push(n > 0 ? 'V := B[0] * E + W[0];' : 'V := B[0] * E;', ...clamp);
  if (n > 0) {
    lines.push(`F := ${feedback};${feedback === 'U' ? '   (* anti-windup: the recursion sees the limited output *)' : ''}`);
    if (n > 1) lines.push(`FOR I := 0 TO ${n - 2} DO`, '    W[I] := B[I + 1] * E - A[I + 1] * F + W[I + 1];', 'END_FOR;');
    lines.push(`W[${n - 1}] := B[${n}] * E - A[${n}] * F;`);
  }
  lines.push('LAST_E := E;');
  return lines;
}
