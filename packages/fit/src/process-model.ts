import { InputError, type TransferFunction, poly, rational, transfer } from '@loopwright/lti';

/**
 * The low-order process models that test logs are fitted to and tuning rules work on:
 *  - 'fopdt': first order plus dead time   K·e^(−θs)/(τ·s + 1)
 *  - 'sopdt': second order plus dead time  K·e^(−θs)/((τ1·s + 1)(τ2·s + 1)), two real lags
 *  - 'ipdt':  integrating plus dead time   K·e^(−θs)/s   (K in output units per input unit per second)
 * `timeConstants` holds the lags in seconds, largest first (one for fopdt, two for sopdt, none
 * for ipdt); `deadTime` is θ ≥ 0 s. Plain data: it serialises as it is (CLI JSON, documents).
 */
export type ProcessModelKind = 'fopdt' | 'sopdt' | 'ipdt';
export const PROCESS_MODEL_KINDS: readonly ProcessModelKind[] = ['fopdt', 'sopdt', 'ipdt'];

export interface ProcessModel {
  kind: ProcessModelKind;
  gain: number;
  timeConstants: number[];
  deadTime: number;
}

const LAGS: Record<ProcessModelKind, number> = { fopdt: 1, sopdt: 2, ipdt: 0 };

/** The number of lags a model kind has (1, 2 or 0). */
export const lagCount = (kind: ProcessModelKind): number => LAGS[kind];

/** Checks a model given by a caller; returns a copy with its lags sorted largest first. */
export function processModel(kind: ProcessModelKind, gain: number, timeConstants: readonly number[], deadTime: number): ProcessModel {
  if (!PROCESS_MODEL_KINDS.includes(kind)) {
    throw new InputError(`model: '${String(kind)}' is not one of ${PROCESS_MODEL_KINDS.join(', ')}`, { field: 'model' });
  }
  if (!Number.isFinite(gain) || gain === 0)
    throw new InputError(`gain must be a finite number other than 0, got ${gain}`, { field: 'gain' });
  if (timeConstants.length !== LAGS[kind]) {
    throw new InputError(`a ${kind} model has ${LAGS[kind]} time constant(s), got ${timeConstants.length}`, { field: 'timeConstants' });
  }
  timeConstants.forEach((t, i) => {
    if (!Number.isFinite(t) || t <= 0)
      throw new InputError(`time constant ${i + 1} must be a finite number > 0 s, got ${t}`, { field: 'timeConstants' });
  });
  if (!Number.isFinite(deadTime) || deadTime < 0)
    throw new InputError(`dead time must be a finite number ≥ 0 s, got ${deadTime}`, { field: 'deadTime' });
  return { kind, gain, timeConstants: [...timeConstants].sort((a, b) => b - a), deadTime };
}

export const fopdt = (gain: number, tau: number, deadTime: number): ProcessModel => processModel('fopdt', gain, [tau], deadTime);
export const sopdt = (gain: number, tau1: number, tau2: number, deadTime: number): ProcessModel =>
  processModel('sopdt', gain, [tau1, tau2], deadTime);
export const ipdt = (gain: number, deadTime: number): ProcessModel => processModel('ipdt', gain, [], deadTime);

/** The model as an lti transfer function (dead time kept exact). */
export function processTransfer(m: ProcessModel): TransferFunction {
  let den: number[] = m.kind === 'ipdt' ? [0, 1] : [1];
  for (const t of m.timeConstants) den = poly.mul(den, [1, t]);
  return transfer(rational([m.gain], den), m.deadTime);
}

/** A number as the expression parser reads it back: `digits` significant digits, no trailing zeros. */
export function formatNumber(x: number, digits = 6): string {
  if (x === 0) return '0';
  const s = Number(x.toPrecision(digits)).toString();
  // toString may give '1e-7' or '1.5e+21'; the parser accepts e-notation, but not a '+' after e.
  return s.replace('e+', 'e');
}

/**
 * The model as an expression the editor's parser accepts (packages/lti parse.ts), e.g.
 * `2*exp(-1.5*s)/(5*s+1)`, `0.8*exp(-20*s)/((90*s+1)*(8*s+1))`, `0.4*exp(-2*s)/s`.
 * Numbers carry `digits` significant digits (default 6).
 */
export function modelExpression(m: ProcessModel, digits = 6): string {
  const f = (x: number) => formatNumber(x, digits);
  const delay = m.deadTime > 0 ? `*exp(-${f(m.deadTime)}*s)` : '';
  const lags = m.timeConstants.map((t) => `(${f(t)}*s+1)`);
  const den = m.kind === 'ipdt' ? 's' : lags.length === 1 ? lags[0] : `(${lags.join('*')})`;
  return `${f(m.gain)}${delay}/${den}`;
}
