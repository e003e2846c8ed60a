import { InputError, type TransferFunction } from '@loopwright/lti';
import { type HalfRuleResult, type ProcessModel, processModel, processTransfer, reduceModel } from '@loopwright/fit';
import {
  type ControllerKind,
  type ControllerSetting,
  CONTROLLER_KINDS,
  DEFAULT_DERIVATIVE_FILTER,
  controllerSetting,
  seriesToIdeal,
} from './controller.ts';
import { type Prediction, predictLoop } from './predict.ts';

/**
 * Published tuning rules on a process model (FOPDT, SOPDT or IPDT: fitted, or reduced by the
 * half rule). Each returns its controller in the ideal form of the PID block and the loop's
 * predicted margins (lti loopMargins on C·P, dead time exact, the block's derivative filter).
 * Where a rule is defined for first-order models only, a SOPDT model is first reduced by the
 * half rule, and the suggestion says so.
 *
 *  - SIMC (Skogestad, J. Process Control 13 (2003) 291–309): τc free, default τc = θ.
 *      FOPDT PI: kc = τ1/(k(τc + θ)), τI = min(τ1, 4(τc + θ)).
 *      SOPDT PID (series form): the same kc and τI, τD = τ2.
 *      IPDT PI: kc = 1/(k′(τc + θ)), τI = 4(τc + θ).
 *  - Lambda / IMC (Rivera, Morari & Skogestad 1986; lambda tuning as in Åström & Hägglund,
 *    Advanced PID Control, 2006, ch. 6 (from memory)): closed-loop time constant λ.
 *      FOPDT PI: kc = τ/(K(λ + θ)), ti = τ.  FOPDT PID (IMC with a first-order Padé of the
 *      dead time): kc = (2τ + θ)/(K(2λ + θ)), ti = τ + θ/2, td = τθ/(2τ + θ).
 *      SOPDT PID (series form): kc = τ1/(K(λ + θ)), τI = τ1, τD = τ2.
 *      IPDT PI: ti = 2λ + θ, kc = ti/(k′(λ + θ)²).
 *    Default λ: τ1 for a self-regulating process, 3θ for an integrating one (common practice,
 *    no source).
 *  - AMIGO (Åström & Hägglund, J. Process Control 14 (2004) 635–650, and 2006, ch. 7 (from
 *    memory)), with L = θ, T = τ:
 *      PI:  K·kp = 0.15 + (0.35 − LT/(L + T)²)·T/L,  ti = 0.35L + 13LT²/(T² + 12LT + 7L²).
 *      PID: K·kp = 0.2 + 0.45·T/L,  ti = (0.4L + 0.8T)·L/(L + 0.1T),  td = 0.5LT/(0.3L + T).
 *      IPDT (their integrating-process forms, the limits T → ∞ of the above):
 *      PI kp = 0.35/(k′L), ti = 13.4L; PID kp = 0.45/(k′L), ti = 8L, td = 0.5L.
 *    AMIGO's set-point weights have no place in the PID block and are not given.
 *  - Ziegler–Nichols step response (Ziegler & Nichols, Trans. ASME 64 (1942) 759–768 (from
 *    memory)), a = K·L/T (IPDT: a = k′·L): P kp = 1/a; PI kp = 0.9/a, ti = 3L; PID kp = 1.2/a,
 *    ti = 2L, td = L/2.
 *  - Ziegler–Nichols ultimate gain (same paper): P kp = 0.5Ku; PI kp = 0.45Ku, ti = Pu/1.2;
 *    PID kp = 0.6Ku, ti = Pu/2, td = Pu/8. Ku and Pu come from the caller (the study engine
 *    reads them from the diagram's exact jω crossing) or from `ultimatePoint` on a loop.
 */
export type TuneRule = 'simc' | 'lambda' | 'amigo' | 'zn-step' | 'zn-ultimate' | 'ms';
export const TUNE_RULES: readonly TuneRule[] = ['simc', 'lambda', 'amigo', 'zn-step', 'zn-ultimate', 'ms'];

export interface TuneSuggestion {
  rule: TuneRule;
  controller: ControllerSetting;
  /** The derivative filter n the prediction assumed (set the block's n to it). */
  derivativeFilter: number;
  /** The process model the rule used (after any reduction); null for rules on Ku/Pu or a loop. */
  model: ProcessModel | null;
  /** The half-rule reduction applied first, if any. */
  reduction: HalfRuleResult | null;
  /** The rule's own choices (τc, λ, Ku, Pu, Ms target, …). */
  settings: Record<string, number>;
  /** Margins of C·P; null when there is no loop to predict on (Ku/Pu given without a plant). */
  predicted: Prediction | null;
  notes: string[];
}

export interface RuleOptions {
  /** 'pi' by default. */
  controller?: ControllerKind;
  /** SIMC closed-loop time constant τc (default θ). */
  tauC?: number;
  /** Lambda tuning's closed-loop time constant λ. */
  lambda?: number;
  /** Derivative filter n of the PID block used in predictions (default 10). */
  derivativeFilter?: number;
  /** Predict on this loop (what the controller sees, e.g. the diagram's cut) instead of the model. */
  plant?: TransferFunction;
}

const positive = (x: number | undefined, what: string, field: string) => {
  if (x === undefined) return undefined;
  if (!(x > 0 && Number.isFinite(x))) throw new InputError(`${what} must be a finite number > 0, got ${x}`, { field });
  return x;
};

function kindOf(opts: RuleOptions, allowed: readonly ControllerKind[], rule: string): ControllerKind {
  const k = opts.controller ?? 'pi';
  if (!CONTROLLER_KINDS.includes(k))
    throw new InputError(`controller: '${String(k)}' is not one of ${CONTROLLER_KINDS.join(', ')}`, { field: 'controller' });
  if (!allowed.includes(k))
    throw new InputError(`the ${rule} rule gives ${allowed.join(' and ').toUpperCase()} settings, not ${k.toUpperCase()}`, {
      field: 'controller',
    });
  return k;
}

function finish(
  rule: TuneRule,
  controller: ControllerSetting,
  model: ProcessModel | null,
  reduction: HalfRuleResult | null,
  settings: Record<string, number>,
  opts: RuleOptions,
  notes: string[],
): TuneSuggestion {
  const n = positive(opts.derivativeFilter, 'derivative filter n', 'n') ?? DEFAULT_DERIVATIVE_FILTER;
  const plant = opts.plant ?? (model ? processTransfer(model) : null);
  const predicted = plant ? predictLoop(controller, plant, n) : null;
  if (predicted && !predicted.closedLoopStable) notes.push('the predicted closed loop is UNSTABLE: do not apply this setting');
  return { rule, controller, derivativeFilter: n, model, reduction, settings, predicted, notes };
}

/** A SOPDT model reduced to FOPDT by the half rule (for rules defined on first-order models). */
function firstOrder(model: ProcessModel, rule: string, notes: string[]): { m: ProcessModel; reduction: HalfRuleResult | null } {
  if (model.kind !== 'sopdt') return { m: model, reduction: null };
  const reduction = reduceModel(model, 'fopdt');
  notes.push(`the ${rule} rule works on a first-order model: the second lag was reduced by the half rule`);
  return { m: reduction.model, reduction };
}

function needDeadTime(m: ProcessModel, rule: string) {
  if (!(m.deadTime > 0)) {
    throw new InputError(
      `the ${rule} rule needs a dead time θ > 0 (its gains grow without bound as θ → 0); give a small θ, e.g. half the sample time`,
      { field: 'deadTime' },
    );
  }
}

export function simcRule(model: ProcessModel, opts: RuleOptions = {}): TuneSuggestion {
  const kind = kindOf(opts, ['pi', 'pid'], 'SIMC');
  const notes: string[] = [];
  let m = checked(model);
  let reduction: HalfRuleResult | null = null;
  if (kind === 'pi' && m.kind === 'sopdt') ({ m, reduction } = firstOrder(m, 'SIMC PI', notes));
  const tauC = positive(opts.tauC, 'τc', 'tauC') ?? m.deadTime;
  if (!(tauC > 0)) throw new InputError('SIMC: the model has no dead time, so the default τc = θ is 0: choose τc > 0', { field: 'tauC' });
  const k = m.gain;
  const theta = m.deadTime;
  let c: ControllerSetting;
  if (m.kind === 'ipdt') {
    if (kind === 'pid') notes.push('SIMC gives PI for an integrating process without a lag');
    c = controllerSetting('pi', 1 / (k * (tauC + theta)), 4 * (tauC + theta), 0);
  } else {
    const [tau1, tau2] = m.timeConstants;
    const kc = tau1 / (k * (tauC + theta));
    const tauI = Math.min(tau1, 4 * (tauC + theta));
    if (m.kind === 'fopdt') {
      if (kind === 'pid') notes.push('SIMC gives PI for a first-order process (derivative action comes from a second lag)');
      c = controllerSetting('pi', kc, tauI, 0);
    } else {
      c = seriesToIdeal(kc, tauI, tau2);
      notes.push(`SIMC PID in series form kc = ${fmt(kc)}, τI = ${fmt(tauI)}, τD = ${fmt(tau2)}, converted to the ideal form`);
    }
  }
  return finish('simc', c, m, reduction, { tauC }, opts, notes);
}

export function lambdaRule(model: ProcessModel, opts: RuleOptions = {}): TuneSuggestion {
  const kind = kindOf(opts, ['pi', 'pid'], 'lambda');
  const notes: string[] = [];
  let m = checked(model);
  let reduction: HalfRuleResult | null = null;
  if (kind === 'pi' && m.kind === 'sopdt') ({ m, reduction } = firstOrder(m, 'lambda PI', notes));
  const theta = m.deadTime;
  const lambda = positive(opts.lambda, 'λ', 'lambda') ?? (m.kind === 'ipdt' ? 3 * theta : m.timeConstants[0]);
  if (!(lambda > 0))
    throw new InputError('lambda: the model has no dead time, so the default λ = 3θ is 0: choose λ > 0', { field: 'lambda' });
  const k = m.gain;
  let c: ControllerSetting;
  if (m.kind === 'ipdt') {
    if (kind === 'pid') notes.push('lambda tuning gives PI for an integrating process');
    const ti = 2 * lambda + theta;
    c = controllerSetting('pi', ti / (k * (lambda + theta) ** 2), ti, 0);
  } else if (m.kind === 'fopdt') {
    const [tau] = m.timeConstants;
    c =
      kind === 'pi'
        ? controllerSetting('pi', tau / (k * (lambda + theta)), tau, 0)
        : controllerSetting('pid', (2 * tau + theta) / (k * (2 * lambda + theta)), tau + theta / 2, (tau * theta) / (2 * tau + theta));
  } else {
    const [tau1, tau2] = m.timeConstants;
    c = seriesToIdeal(tau1 / (k * (lambda + theta)), tau1, tau2);
    notes.push('lambda (IMC) PID for a second-order process in series form (τI = τ1, τD = τ2), converted to the ideal form');
  }
  return finish('lambda', c, m, reduction, { lambda }, opts, notes);
}

export function amigoRule(model: ProcessModel, opts: RuleOptions = {}): TuneSuggestion {
  const kind = kindOf(opts, ['pi', 'pid'], 'AMIGO');
  const notes: string[] = ['AMIGO also gives set-point weights, which the PID block does not have; they are not applied'];
  const { m, reduction } = firstOrder(checked(model), 'AMIGO', notes);
  needDeadTime(m, 'AMIGO');
  const L = m.deadTime;
  let c: ControllerSetting;
  if (m.kind === 'ipdt') {
    const kv = m.gain;
    c = kind === 'pi' ? controllerSetting('pi', 0.35 / (kv * L), 13.4 * L, 0) : controllerSetting('pid', 0.45 / (kv * L), 8 * L, 0.5 * L);
  } else {
    const K = m.gain;
    const T = m.timeConstants[0];
    c =
      kind === 'pi'
        ? controllerSetting(
            'pi',
            (0.15 + (0.35 - (L * T) / (L + T) ** 2) * (T / L)) / K,
            0.35 * L + (13 * L * T * T) / (T * T + 12 * L * T + 7 * L * L),
            0,
          )
        : controllerSetting('pid', (0.2 + 0.45 * (T / L)) / K, ((0.4 * L + 0.8 * T) * L) / (L + 0.1 * T), (0.5 * L * T) / (0.3 * L + T));
  }
  return finish('amigo', c, m, reduction, {}, opts, notes);
}

export function zieglerNicholsStepRule(model: ProcessModel, opts: RuleOptions = {}): TuneSuggestion {
  const kind = kindOf(opts, ['p', 'pi', 'pid'], 'Ziegler–Nichols step-response');
  const notes: string[] = [];
  const { m, reduction } = firstOrder(checked(model), 'Ziegler–Nichols step-response', notes);
  needDeadTime(m, 'Ziegler–Nichols step-response');
  const L = m.deadTime;
  const a = m.kind === 'ipdt' ? m.gain * L : (m.gain * L) / m.timeConstants[0];
  const c =
    kind === 'p'
      ? controllerSetting('p', 1 / a, null, 0)
      : kind === 'pi'
        ? controllerSetting('pi', 0.9 / a, 3 * L, 0)
        : controllerSetting('pid', 1.2 / a, 2 * L, 0.5 * L);
  notes.push('Ziegler–Nichols settings aim at quarter-amplitude decay: expect small margins (check Ms)');
  return finish('zn-step', c, m, reduction, { a }, opts, notes);
}

/** Ku, Pu: the ultimate gain and period (the gain that puts the loop on the stability limit, and its oscillation period). */
export interface UltimatePoint {
  ku: number;
  pu: number;
}

export function zieglerNicholsUltimateRule(point: UltimatePoint, opts: RuleOptions = {}): TuneSuggestion {
  const kind = kindOf(opts, ['p', 'pi', 'pid'], 'Ziegler–Nichols ultimate-gain');
  const { ku, pu } = point;
  if (!Number.isFinite(ku) || ku === 0)
    throw new InputError(`ultimate gain Ku must be a finite number other than 0, got ${ku}`, { field: 'ku' });
  positive(pu, 'ultimate period Pu', 'pu');
  const c =
    kind === 'p'
      ? controllerSetting('p', 0.5 * ku, null, 0)
      : kind === 'pi'
        ? controllerSetting('pi', 0.45 * ku, pu / 1.2, 0)
        : controllerSetting('pid', 0.6 * ku, 0.5 * pu, 0.125 * pu);
  const notes = ['Ziegler–Nichols settings aim at quarter-amplitude decay: expect small margins (check Ms)'];
  if (!opts.plant) notes.push('no loop given: margins not predicted');
  return finish('zn-ultimate', c, null, null, { ku, pu }, opts, notes);
}

const fmt = (x: number) => Number(x.toPrecision(4)).toString();

/** The model checked (a caller may have built it from JSON), lags sorted largest first. */
const checked = (m: ProcessModel): ProcessModel => processModel(m.kind, m.gain, m.timeConstants, m.deadTime);

/** The caution shown beside every suggested setting (editor, CLI, report). */
export const TUNE_CAUTION =
  'Suggested settings are starting points computed from a model: commission them in small steps with output limits and interlocks in place, watch the loop, and follow the applicable safety standards and licensed practice.';
