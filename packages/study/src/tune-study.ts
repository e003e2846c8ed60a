/**
 * Tuning as a study: a rule applied to a loop of the diagram (by its cut, every other loop
 * closed or inner-first) or to a model expression, giving a suggestion with its predicted
 * margins, the set-point and load step responses before and after, and the document edit that
 * applies it.
 *
 * - What the rule works on: what the cut's controller sees, P = L/C (loop-reading.ts). The
 *   model-based rules (SIMC, lambda, AMIGO, Ziegler–Nichols step) need a low-order model of P:
 *   P itself when it has that form, else the half rule, else — complex poles or a lead, which
 *   the half rule does not cover — a least-squares fit of the model to P's exact step response.
 * - Ziegler–Nichols ultimate gain: Ku and Pu from the diagram's own exact jω crossing
 *   (ultimateOfLoop), never from a model.
 * - ms: the Ms-constrained tuner on P itself (dead time exact).
 * - Predicted margins: read at the cut of the diagram with the suggestion written into the
 *   block (the same reading, so the same numbers `loopwright loops` gives for the tuned
 *   diagram); for a model, the margins of C·P.
 */
import { DEFAULT_PADE_ORDER, type Diagram } from '@loopwright/graph';
import {
  type TransferFunction,
  InputError,
  exactStepResponse,
  loopMargins,
  marginFigures,
  parseTransferFunction,
  polyRoots,
  tmul,
} from '@loopwright/lti';
import { type ProcessModel, type ProcessModelKind, fitProcessModel, testLogFromArrays } from '@loopwright/fit';
import {
  type ControllerKind,
  type TuneRule,
  type TuneSuggestion,
  DEFAULT_DERIVATIVE_FILTER,
  TUNE_CAUTION,
  TUNE_RULES,
  type ControllerSetting,
  controllerTransfer,
  processModelOf,
  suggestTuning,
  ultimatePoint,
  zieglerNicholsUltimateRule,
} from '@loopwright/tune';
import { applyControllerPatch, controllerOfCut, controllerPatch, currentSetting, loopBlocks, pidBlock } from './controller-block.ts';
import { type LoopReadingMode, configureLoop, readLoop, seenProcess, ultimateOfLoop } from './loop-reading.ts';
import { type LoopForm, loopStepResponses } from './loop-responses.ts';
import { transferData } from './transfer-data.ts';
import type { TuneData } from './types.ts';
import { assertAnalysable } from './validate.ts';

export interface TuneRequest {
  rule: TuneRule;
  /** 'pi' (default), 'pid', or 'p' where the rule gives one. */
  controller?: ControllerKind;
  /** SIMC τc (default θ). */
  tauC?: number;
  /** Lambda tuning's λ. */
  lambda?: number;
  /** ms rule: the Ms bound (default 1.4), optional PM (degrees) and GM floors, least ti/td for PID (default 4). */
  msMax?: number;
  pmMinDeg?: number;
  gmMin?: number;
  tiOverTdMin?: number;
  /** The PID block's derivative filter n in predictions (default: the block's own, else 10). */
  derivativeFilter?: number;
  /** The loop: a cut id ("auto:<wire>" for a proposed one; null: the default cut) … */
  cut?: string | null;
  /** … or what the controller sees, as an expression (then no cut is read). */
  model?: string;
  /** Values of the names in `model`. */
  params?: Record<string, number>;
  /** The controller block (default: the cut's, found on its loop; with a model, the block an apply writes to). */
  block?: string;
  /** 'inner-first' (default): the loops around this one opened, as a cascade is commissioned; 'closed': every other loop closed. */
  reading?: LoopReadingMode;
  overrides?: Record<string, number>;
  padeOrder?: number;
  /** Also simulate the set-point and load step responses before and after (default true). */
  responses?: boolean;
}

const positiveOrUndefined = (x: number | undefined, field: string) => {
  if (x !== undefined && !(x > 0 && Number.isFinite(x))) throw new InputError(`${field} must be a finite number > 0, got ${x}`, { field });
};

function checkRequest(req: TuneRequest): void {
  if (!TUNE_RULES.includes(req.rule))
    throw new InputError(`rule: '${String(req.rule)}' is not one of ${TUNE_RULES.join(', ')}`, { field: 'rule' });
  positiveOrUndefined(req.tauC, 'tauC');
  positiveOrUndefined(req.lambda, 'lambda');
  positiveOrUndefined(req.derivativeFilter, 'derivativeFilter');
  if (req.msMax !== undefined && !(req.msMax > 1 && Number.isFinite(req.msMax)))
    throw new InputError(`msMax must be a finite number above 1, got ${req.msMax}`, { field: 'msMax' });
}

/**
 * A low-order model of what the controller sees, for the model-based rules: P itself when it is
 * FOPDT/SOPDT/IPDT-shaped, else the half rule, else a least-squares fit to P's exact step response.
 */
export function modelOfProcess(
  P: TransferFunction,
  controller: ControllerKind,
): { model: ProcessModel; from: 'model' | 'half rule' | 'step fit'; note: string | null } {
  try {
    const r = processModelOf(P, controller);
    return { model: r.model, from: r.reduction ? 'half rule' : 'model', note: null };
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const why = e.message.replace(/^half rule: /, '');
    const den = P.rational.den;
    const poles = den.length > 1 ? polyRoots(den) : [];
    const scale = Math.max(1e-12, ...poles.map((p) => Math.hypot(p.re, p.im)));
    const unstable = poles.find((p) => p.re > 1e-9 * scale);
    if (unstable) {
      throw new InputError(
        `what the controller sees has an unstable pole at ${unstable.re.toPrecision(4)}${unstable.im ? ` ± ${Math.abs(unstable.im).toPrecision(4)}j` : ''}: the rules need a stable or integrating process`,
        {
          field: 'process',
        },
      );
    }
    const integrators = poles.filter((p) => Math.hypot(p.re, p.im) <= 1e-9 * scale).length;
    if (integrators > 1)
      throw new InputError(`what the controller sees has ${integrators} integrators; the rules handle at most one`, { field: 'process' });
    const kind: ProcessModelKind = integrators === 1 ? 'ipdt' : controller === 'pid' ? 'sopdt' : 'fopdt';
    const slow = Math.min(...poles.filter((p) => Math.hypot(p.re, p.im) > 1e-9 * scale).map((p) => -p.re));
    const end = P.delay + (Number.isFinite(slow) && slow > 0 ? (integrators ? 10 : 8) / slow : 10);
    // One sample at rest before the step at t = 0 (held input: 0 before, 1 from t = 0 on).
    const time = [-end / 400, ...Array.from({ length: 401 }, (_, i) => (end * i) / 400)];
    const output = [0, ...exactStepResponse(P.rational, time.slice(1), P.delay)];
    const log = testLogFromArrays({ time, input: time.map((t) => (t < 0 ? 0 : 1)), output });
    const fit = fitProcessModel(log, { model: kind, between: 'hold', operatingPoint: { input: 0, output: 0 } });
    const note = `what the controller sees is not of a form the half rule covers (${why}): reduced to a ${kind.toUpperCase()} model by a least-squares fit of its exact step response (NRMSE ${(100 * fit.nrmse).toPrecision(2)} %)`;
    return { model: fit.model, from: 'step fit', note };
  }
}

/** The rule on what the controller sees (P), with Ku/Pu given for zn-ultimate. */
function suggest(
  req: TuneRequest,
  P: TransferFunction,
  n: number,
  ultimate: { ku: number; pu: number } | null,
): { s: TuneSuggestion; model: ProcessModel | null; from: TuneData['modelFrom']; note: string | null } {
  const common = { controller: req.controller, tauC: req.tauC, lambda: req.lambda, derivativeFilter: n, plant: P };
  if (req.rule === 'zn-ultimate') {
    if (!ultimate)
      throw new InputError('the loop has no phase crossover, so no ultimate gain: the zn-ultimate rule does not apply', { field: 'rule' });
    return { s: zieglerNicholsUltimateRule(ultimate, common), model: null, from: null, note: null };
  }
  if (req.rule === 'ms') {
    const s = suggestTuning({
      rule: 'ms',
      ...common,
      msMax: req.msMax,
      pmMinDeg: req.pmMinDeg,
      gmMin: req.gmMin,
      tiOverTdMin: req.tiOverTdMin,
    });
    return { s, model: null, from: null, note: null };
  }
  const m = modelOfProcess(P, req.controller ?? 'pi');
  return { s: suggestTuning({ rule: req.rule, ...common, model: m.model }), model: m.model, from: m.from, note: m.note };
}

function summary(req: TuneRequest, s: TuneSuggestion): Pick<TuneData, 'rule' | 'controller' | 'derivativeFilter' | 'settings' | 'caution'> {
  return {
    rule: req.rule,
    controller: { ...s.controller },
    derivativeFilter: s.derivativeFilter,
    settings: { ...s.settings },
    caution: TUNE_CAUTION,
  };
}

export function tuneStudy(d: Diagram, req: TuneRequest): TuneData {
  checkRequest(req);
  return req.model !== undefined ? modelTune(d, req) : cutTune(d, req);
}

function modelTune(d: Diagram, req: TuneRequest): TuneData {
  if (req.model!.trim() === '') throw new InputError('the model expression is empty', { field: 'model' });
  const P = parseTransferFunction(req.model!, req.params ?? {});
  const overrides = req.overrides ?? {};
  const block = req.block !== undefined ? pidBlock(d, req.block) : null;
  const today = block ? currentSetting(d, block, overrides) : null;
  const n = req.derivativeFilter ?? today?.n ?? DEFAULT_DERIVATIVE_FILTER;
  const u = req.rule === 'zn-ultimate' ? ultimatePoint(P) : null;
  const { s, model, from, note } = suggest(req, P, n, u);
  const L = tmul(controllerTransfer(s.controller, n), P);
  const predicted = s.predicted ? s.predicted.margins : marginFigures(loopMargins(L));
  const notes = [...(note ? [note] : []), ...s.notes];
  const apply = block ? controllerPatch(d, block.id, s.controller, n) : null;
  if (apply) notes.push(...apply.notes);
  return {
    ...summary(req, s),
    source: 'model',
    cut: null,
    reading: 'closed',
    opened: [],
    block: block && today ? { id: block.id, label: block.label ?? block.id, current: today.setting, derivativeFilter: today.n } : null,
    process: transferData(P),
    processExact: true,
    delayHandling: null,
    model,
    modelFrom: from,
    ultimate: u ? { ku: u.ku, pu: u.pu, omega: u.omega, from: 'model' } : null,
    predicted,
    current: null,
    loop: transferData(L),
    apply,
    responses: req.responses === false ? null : loopStepResponses(null, { setting: s.controller, n, P, L }),
    notes,
  };
}

function cutTune(d: Diagram, req: TuneRequest): TuneData {
  const overrides = req.overrides ?? {};
  assertAnalysable(d, overrides);
  const padeOrder = req.padeOrder ?? DEFAULT_PADE_ORDER;
  const conf = configureLoop(d, req.cut ?? null, req.reading ?? 'inner-first', overrides);
  const block = req.block !== undefined ? pidBlock(d, req.block) : controllerOfCut(d, conf.cut.wire, conf.cut.id);
  if (req.block !== undefined && !loopBlocks(d, conf.cut.wire).has(block.id)) {
    throw new InputError(`block ${block.id} is not on the loop of cut ${conf.cut.id}: it cannot tune that loop`, { field: 'block' });
  }
  const today = currentSetting(d, block, overrides);
  let now: ReturnType<typeof readLoop> | null = null;
  try {
    now = readLoop(d, conf, overrides, padeOrder);
  } catch (e) {
    // A loop gain of zero today (kp = 0) leaves nothing to read at the cut; the tuning still can.
    if (!(e instanceof InputError)) throw e;
  }
  const seen = seenProcess(d, block, conf, overrides, padeOrder, now?.L ?? null);
  const n = req.derivativeFilter ?? today.n;
  const u = req.rule === 'zn-ultimate' ? ultimateOfLoop(d, block, conf, seen, overrides, padeOrder) : null;
  let suggested: ReturnType<typeof suggest>;
  try {
    suggested = suggest(req, seen.P, n, u);
  } catch (e) {
    // Read with its outer loops closed, an inner controller may see an unstable process (the
    // outer loop, opened at this cut, runs away): the rules need the loop read inner-first.
    if (e instanceof InputError && !seen.exact)
      throw new InputError(
        `${e.message} (controller ${block.id} also sits in a loop that stays closed in this reading: read the loop inner-first)`,
        e.details,
      );
    throw e;
  }
  const { s, model, from, note } = suggested;
  const apply = controllerPatch(d, block.id, s.controller, n);
  const tuned = applyControllerPatch(d, apply);
  const after = readLoop(tuned, conf, overrides, padeOrder).L;
  const notes: string[] = [];
  if (conf.opened.length)
    notes.push(
      `read inner-first: the loop${conf.opened.length > 1 ? 's' : ''} around it (${conf.opened.map((o) => o.cut).join(', ')}) opened`,
    );
  if (!seen.exact) {
    notes.push(
      `controller ${block.id} also sits in a loop that stays closed in this reading: what it sees was divided out with today's setting and changes with it; the prediction is read on the diagram with the new setting (tune inner-first for a process of its own)`,
    );
  }
  if (seen.delayHandling.mode === 'pade') notes.push(seen.delayHandling.note);
  if (note) notes.push(note);
  if (u && u.from === 'root locus' && u.delayHandling?.mode === 'pade')
    notes.push(`Ku and Pu from the root locus with ${u.delayHandling.note}`);
  // The rule's own verdict was read on P; the one that counts is the diagram's, below.
  notes.push(...s.notes.filter((x) => !x.includes('UNSTABLE')), ...apply.notes);
  const predicted = marginFigures(loopMargins(after));
  if (!predicted.closedLoopStable) notes.push('the loop with this setting is UNSTABLE at the cut: do not apply it');
  let responses: TuneData['responses'] = null;
  if (req.responses !== false && seen.exact) {
    const form = (c: ControllerSetting, nf: number, L: TransferFunction): LoopForm => ({ setting: c, n: nf, P: seen.P, L });
    responses = loopStepResponses(now ? form(today.setting, today.n, now.L) : null, form(s.controller, n, after));
  } else if (req.responses !== false) {
    notes.push('no step responses: the controller has no process of its own in this reading (read the loop inner-first to see them)');
  }
  return {
    ...summary(req, s),
    source: 'cut',
    cut: { id: conf.cut.id, wire: conf.cut.wire, label: conf.cut.label },
    reading: conf.mode,
    opened: conf.opened.map((o) => o.cut),
    block: { id: block.id, label: block.label ?? block.id, current: today.setting, derivativeFilter: today.n },
    process: transferData(seen.P),
    processExact: seen.exact,
    delayHandling: seen.delayHandling,
    model,
    modelFrom: from,
    ultimate: u ? { ku: u.ku, pu: u.pu, omega: u.omega, from: u.from } : null,
    predicted,
    current: now ? marginFigures(loopMargins(now.L)) : null,
    loop: transferData(after),
    apply,
    responses,
    notes,
  };
}
