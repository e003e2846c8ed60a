import { InputError, type TransferFunction, poly, rational, transfer } from '@loopwright/lti';

/**
 * A controller setting in the ideal form of the diagram's PID block (graph catalogue pid.ts):
 *   C(s) = kp·(1 + 1/(ti·s) + td·s/(1 + (td/n)·s))
 * with the derivative filtered by the time constant td/n (the block's n, default 10).
 * `ti` null means no integral action (the block's blank ti); td = 0 means no derivative.
 */
export type ControllerKind = 'p' | 'pi' | 'pid';
export const CONTROLLER_KINDS: readonly ControllerKind[] = ['p', 'pi', 'pid'];

export interface ControllerSetting {
  kind: ControllerKind;
  kp: number;
  ti: number | null;
  td: number;
}

/** The PID block's default derivative filter n. */
export const DEFAULT_DERIVATIVE_FILTER = 10;

export function controllerSetting(kind: ControllerKind, kp: number, ti: number | null, td = 0): ControllerSetting {
  if (!Number.isFinite(kp)) throw new InputError(`controller gain kp must be a finite number, got ${kp}`, { field: 'kp' });
  if (ti !== null && !(ti > 0 && Number.isFinite(ti)))
    throw new InputError(`integral time ti must be a finite number > 0 s, got ${ti}`, { field: 'ti' });
  if (!(td >= 0 && Number.isFinite(td)))
    throw new InputError(`derivative time td must be a finite number ≥ 0 s, got ${td}`, { field: 'td' });
  return { kind, kp, ti, td };
}

/**
 * The series (interacting) form kc·(1 + 1/(τI·s))·(1 + τD·s), in which SIMC and IMC give their
 * PID settings, in the ideal form: kp = kc(1 + τD/τI), ti = τI + τD, td = τI·τD/(τI + τD)
 * (Åström & Hägglund, Advanced PID Control, 2006, Sec. 3.4 (from memory)).
 */
export function seriesToIdeal(kc: number, tauI: number, tauD: number): ControllerSetting {
  const f = 1 + tauD / tauI;
  return controllerSetting(tauD > 0 ? 'pid' : 'pi', kc * f, tauI + tauD, (tauI * tauD) / (tauI + tauD));
}

/** C(s) of a setting with the block's derivative filter n, as an lti transfer function. */
export function controllerTransfer(c: ControllerSetting, n = DEFAULT_DERIVATIVE_FILTER): TransferFunction {
  if (!(n > 0 && Number.isFinite(n))) throw new InputError(`derivative filter n must be a finite number > 0, got ${n}`, { field: 'n' });
  // kp·[ti·s·(1 + tf·s) + (1 + tf·s) + ti·td·s²] / (ti·s·(1 + tf·s)), tf = td/n; without ti the
  // integral term drops, without td the filter does.
  const tf = c.td > 0 ? c.td / n : 0;
  const lag = tf > 0 ? [1, tf] : [1];
  if (c.ti === null) {
    const num = poly.add(lag, c.td > 0 ? [0, c.td] : []);
    return transfer(rational(poly.scale(num, c.kp), lag));
  }
  const ti = c.ti;
  let num = poly.add(poly.mul([0, ti], lag), lag);
  if (c.td > 0) num = poly.add(num, [0, 0, ti * c.td]);
  return transfer(rational(poly.scale(num, c.kp), poly.mul([0, ti], lag)));
}
