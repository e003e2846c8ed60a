import { InputError, type TransferFunction } from '@loopwright/lti';
import { type HalfRuleResult, type ProcessModel, halfRule, processFactors, processModel, processTransfer } from '@loopwright/fit';
import type { ControllerKind } from './controller.ts';
import { robustTune } from './robust.ts';
import {
  type RuleOptions,
  type TuneRule,
  type TuneSuggestion,
  type UltimatePoint,
  TUNE_RULES,
  amigoRule,
  lambdaRule,
  simcRule,
  zieglerNicholsStepRule,
  zieglerNicholsUltimateRule,
} from './rules.ts';
import { ultimatePoint } from './ultimate.ts';

/**
 * One entry point for the apps (CLI `tune`, the study engine): a rule, and what it works on —
 * a process model, or a loop transfer function P (what the controller sees), or Ku/Pu.
 *  - simc, lambda, amigo, zn-step: `model`, or `plant` read as a model (exactly when it is
 *    FOPDT/SOPDT/IPDT-shaped, else reduced by the half rule: to SOPDT for a PID, else FOPDT).
 *  - zn-ultimate: `ultimate` (Ku, Pu), or read from `plant` (its exact phase crossover).
 *  - ms: `plant` (the full loop with dead time), or the model's transfer function.
 * Predictions use `plant` when given (the real loop), else the model.
 */
export interface TuneRequest extends RuleOptions {
  rule: TuneRule;
  model?: ProcessModel;
  ultimate?: UltimatePoint;
  msMax?: number;
  pmMinDeg?: number;
  gmMin?: number;
  tiOverTdMin?: number;
}

/** A loop transfer function as a process model: exact when it has that shape, else by the half rule. */
export function processModelOf(
  plant: TransferFunction,
  controller: ControllerKind = 'pi',
): { model: ProcessModel; reduction: HalfRuleResult | null } {
  const f = processFactors(plant);
  const lags = [...f.lags].sort((a, b) => b - a);
  const inverse = f.inverseResponse ?? [];
  const theta = f.deadTime ?? 0;
  if (inverse.length === 0) {
    if (f.integrating && lags.length === 0) return { model: processModel('ipdt', f.gain, [], theta), reduction: null };
    if (!f.integrating && lags.length === 1) return { model: processModel('fopdt', f.gain, lags, theta), reduction: null };
    if (!f.integrating && lags.length === 2) return { model: processModel('sopdt', f.gain, lags, theta), reduction: null };
  }
  const target = f.integrating ? 'ipdt' : controller === 'pid' && lags.length >= 2 ? 'sopdt' : 'fopdt';
  const reduction = halfRule(f, target);
  return { model: reduction.model, reduction };
}

export function suggestTuning(req: TuneRequest): TuneSuggestion {
  if (!TUNE_RULES.includes(req.rule))
    throw new InputError(`rule: '${String(req.rule)}' is not one of ${TUNE_RULES.join(', ')}`, { field: 'rule' });
  if (req.rule === 'ms') {
    const plant = req.plant ?? (req.model ? modelPlant(req.model) : null);
    if (!plant) throw new InputError('the ms rule needs the loop (a plant transfer function or a model)', { field: 'plant' });
    const c = req.controller ?? 'pi';
    if (c !== 'pi' && c !== 'pid') throw new InputError(`controller: the ms rule gives 'pi' or 'pid', not '${c}'`, { field: 'controller' });
    const s = robustTune(plant, {
      controller: c,
      msMax: req.msMax,
      pmMinDeg: req.pmMinDeg,
      gmMin: req.gmMin,
      derivativeFilter: req.derivativeFilter,
      tiOverTdMin: req.tiOverTdMin,
    });
    return { ...s, model: req.model ?? null };
  }
  if (req.rule === 'zn-ultimate') {
    let point = req.ultimate;
    if (!point) {
      if (!req.plant) throw new InputError('the zn-ultimate rule needs Ku and Pu, or the loop to read them from', { field: 'ultimate' });
      const u = ultimatePoint(req.plant);
      if (!u)
        throw new InputError('the loop has no phase crossover, so no ultimate gain: the zn-ultimate rule does not apply', {
          field: 'plant',
        });
      point = { ku: u.ku, pu: u.pu };
    }
    return zieglerNicholsUltimateRule(point, req);
  }
  let model = req.model;
  let reduction: HalfRuleResult | null = null;
  if (!model) {
    if (!req.plant) throw new InputError(`the ${req.rule} rule needs a process model or a loop to read one from`, { field: 'model' });
    ({ model, reduction } = processModelOf(req.plant, req.controller ?? 'pi'));
  }
  const rule = { simc: simcRule, lambda: lambdaRule, amigo: amigoRule, 'zn-step': zieglerNicholsStepRule }[req.rule];
  const s = rule(model, req);
  if (reduction && !s.reduction) {
    s.reduction = reduction;
    s.notes.unshift('the loop was reduced to a low-order model by the half rule');
  }
  return s;
}

const modelPlant = (m: ProcessModel) => processTransfer(processModel(m.kind, m.gain, m.timeConstants, m.deadTime));

/** The fields the CLI prints for a suggestion (`loopwright tune --json`). */
export function tuneSummary(s: TuneSuggestion) {
  return {
    rule: s.rule,
    controller: { kp: s.controller.kp, ti: s.controller.ti, td: s.controller.td, n: s.derivativeFilter },
    model: s.model,
    settings: { ...s.settings },
    predicted: s.predicted
      ? {
          ms: s.predicted.ms,
          gainMargin: s.predicted.gainMargin,
          phaseMarginDeg: s.predicted.phaseMarginDeg,
          delayMargin: s.predicted.delayMargin,
          closedLoopStable: s.predicted.closedLoopStable,
        }
      : null,
    notes: [...s.notes],
  };
}
