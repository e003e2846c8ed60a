import { InputError, type TransferFunction, cabs, poly, polyRoots } from '@loopwright/lti';
import { type ProcessModel, type ProcessModelKind, processModel } from './process-model.ts';

/**
 * Skogestad's half rule (SIMC: Skogestad, J. Process Control 13 (2003) 291–309): a process
 *   k·Π(−T_j·s + 1)·e^(−θ0·s) / Π(τ_i·s + 1),  τ1 ≥ τ2 ≥ …  (optionally with one integrator)
 * is reduced to a first- or second-order model with an effective dead time: the largest
 * neglected lag is split equally between the smallest kept lag and the dead time; smaller
 * lags, inverse-response time constants T_j and half a sample time h/2 (digital control) go to
 * the dead time in full:
 *   FOPDT: τ1 = τ1⁰ + τ2⁰/2;               θ = θ0 + τ2⁰/2 + Σ_(i≥3) τi⁰ + Σ T_j + h/2
 *   SOPDT: τ1 = τ1⁰, τ2 = τ2⁰ + τ3⁰/2;     θ = θ0 + τ3⁰/2 + Σ_(i≥4) τi⁰ + Σ T_j + h/2
 * With an integrator (k′/s, the kept "lag" of infinite time constant) the IPDT model takes
 * θ = θ0 + τ1⁰/2 + Σ_(i≥2) τi⁰ + Σ T_j + h/2 (half of the largest lag goes to the integrator,
 * where it changes nothing).
 * Zeros in the left half-plane (lead time constants) need the paper's separate rules, which
 * depend on the result; they are not applied here: such a process is rejected with a message.
 */
export interface HalfRuleProcess {
  /** Static gain k, or k′ (per second) with an integrator. */
  gain: number;
  /** Lag time constants τ_i > 0 (any order). */
  lags: readonly number[];
  /** Inverse-response (right-half-plane zero) time constants T_j > 0 of factors (−T_j·s + 1). */
  inverseResponse?: readonly number[];
  deadTime?: number;
  /** True for a process with one integrator. */
  integrating?: boolean;
}

export interface HalfRuleResult {
  model: ProcessModel;
  /** What went where, for display: each original lag's share to the kept lags and to the dead time. */
  lags: { timeConstant: number; toLag: number; toDeadTime: number }[];
  inverseResponseToDeadTime: number;
  sampleTimeToDeadTime: number;
  originalDeadTime: number;
}

export function halfRule(process: HalfRuleProcess, target: ProcessModelKind, opts: { sampleTime?: number } = {}): HalfRuleResult {
  const { gain } = process;
  const lags = [...process.lags].sort((a, b) => b - a);
  const inverse = process.inverseResponse ?? [];
  const theta0 = process.deadTime ?? 0;
  const h = opts.sampleTime ?? 0;
  if (!Number.isFinite(gain) || gain === 0)
    throw new InputError(`half rule: gain must be finite and not 0, got ${gain}`, { field: 'gain' });
  lags.forEach((t) => {
    if (!(t > 0) || !Number.isFinite(t))
      throw new InputError(`half rule: every lag must be a finite time constant > 0 s, got ${t}`, { field: 'lags' });
  });
  inverse.forEach((t) => {
    if (!(t > 0) || !Number.isFinite(t))
      throw new InputError(`half rule: every inverse-response time constant must be finite and > 0 s, got ${t}`, {
        field: 'inverseResponse',
      });
  });
  if (!(theta0 >= 0) || !Number.isFinite(theta0))
    throw new InputError(`half rule: dead time must be finite and ≥ 0 s, got ${theta0}`, { field: 'deadTime' });
  if (!(h >= 0) || !Number.isFinite(h))
    throw new InputError(`half rule: sample time must be finite and ≥ 0 s, got ${h}`, { field: 'sampleTime' });
  const integrating = process.integrating === true;
  if (integrating !== (target === 'ipdt')) {
    throw new InputError(
      integrating
        ? `half rule: an integrating process reduces to 'ipdt', not '${target}'`
        : `half rule: a process without an integrator reduces to 'fopdt' or 'sopdt', not 'ipdt'`,
      { field: 'model' },
    );
  }
  const keep = target === 'fopdt' ? 1 : target === 'sopdt' ? 2 : 0;
  if (lags.length < keep)
    throw new InputError(`half rule: a ${target} model keeps ${keep} lags, but the process has ${lags.length}`, { field: 'model' });

  const shares = lags.map((t) => ({ timeConstant: t, toLag: 0, toDeadTime: 0 }));
  const kept = lags.slice(0, keep);
  shares.forEach((s, i) => {
    if (i < keep) s.toLag = s.timeConstant;
    else if (i === keep) {
      s.toDeadTime = s.timeConstant / 2;
      // Half to the smallest kept lag (for an integrator that half is absorbed and lost).
      if (keep > 0) {
        s.toLag = s.timeConstant / 2;
        kept[keep - 1] += s.timeConstant / 2;
      }
    } else s.toDeadTime = s.timeConstant;
  });
  const inverseSum = inverse.reduce((a, b) => a + b, 0);
  const theta = theta0 + shares.reduce((a, s) => a + s.toDeadTime, 0) + inverseSum + h / 2;
  return {
    model: processModel(target, gain, kept, theta),
    lags: shares,
    inverseResponseToDeadTime: inverseSum,
    sampleTimeToDeadTime: h / 2,
    originalDeadTime: theta0,
  };
}

/** The half rule applied to a process model (e.g. a fitted SOPDT reduced to FOPDT). */
export function reduceModel(m: ProcessModel, target: ProcessModelKind, opts: { sampleTime?: number } = {}): HalfRuleResult {
  return halfRule({ gain: m.gain, lags: m.timeConstants, deadTime: m.deadTime, integrating: m.kind === 'ipdt' }, target, opts);
}

/**
 * The half rule on a transfer function: its poles must be real and in the open left
 * half-plane (or one integrator), its zeros real and in the right half-plane (inverse
 * response); a pole or zero whose imaginary part is below 1e-3 of its size counts as real
 * (damping above 0.999999; repeated real roots come out of the eigenvalue solver as
 * near-conjugate clusters of that kind).
 */
export function halfRuleOf(tf: TransferFunction, target: ProcessModelKind, opts: { sampleTime?: number } = {}): HalfRuleResult {
  return halfRule(processFactors(tf), target, opts);
}

/** Gain, lags, inverse-response time constants, dead time and integrator of a transfer function. */
export function processFactors(tf: TransferFunction): HalfRuleProcess {
  const num = poly.trim(tf.rational.num);
  const den = poly.trim(tf.rational.den);
  if (num.length === 0) throw new InputError('half rule: the process is zero', { field: 'process' });
  if (num.length > den.length) throw new InputError('half rule: the process is improper (more zeros than poles)', { field: 'process' });
  const realOf = (what: string) => (r: { re: number; im: number }) => {
    if (Math.abs(r.im) > 1e-3 * cabs(r)) {
      throw new InputError(
        `half rule: the process has a complex ${what} pair ${r.re.toPrecision(4)} ± ${Math.abs(r.im).toPrecision(4)}j; the rule needs real lags`,
        { field: 'process' },
      );
    }
    return r.re;
  };
  const poles = den.length > 1 ? polyRoots(den).map(realOf('pole')) : [];
  const zeros = num.length > 1 ? polyRoots(num).map(realOf('zero')) : [];
  const origin = poles.filter((p) => p === 0).length;
  if (origin > 1) throw new InputError(`half rule: the process has ${origin} integrators; at most one is supported`, { field: 'process' });
  if (zeros.some((z) => z === 0)) throw new InputError('half rule: the process has a zero at s = 0 (no static gain)', { field: 'process' });
  const unstable = poles.find((p) => p > 0);
  if (unstable !== undefined)
    throw new InputError(`half rule: the process has an unstable pole at s = ${unstable.toPrecision(4)}`, { field: 'process' });
  const lead = zeros.find((z) => z < 0);
  if (lead !== undefined) {
    throw new InputError(
      `half rule: the process has a left-half-plane zero at s = ${lead.toPrecision(4)} (lead time constant ${(-1 / lead).toPrecision(4)} s); ` +
        'the rule for lead time constants depends on the result and is not applied: cancel the lead against a nearby lag first',
      { field: 'process' },
    );
  }
  const lags = poles.filter((p) => p !== 0).map((p) => -1 / p);
  const inverseResponse = zeros.map((z) => 1 / z);
  // Gain in time-constant form: num(s)/den(s) = k·Π(1 − s/z)/(s^q·Π(1 − s/p)); k = num(0)/den_q(0).
  const gain = num[0] / den[origin];
  return { gain, lags, inverseResponse, deadTime: tf.delay, integrating: origin === 1 };
}
