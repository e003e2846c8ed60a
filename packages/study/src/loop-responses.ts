/**
 * Set-point and load-disturbance step responses of a loop before and after a tuning, in the
 * standard loop forms of the controller C and what it sees P (L = C·P at the cut):
 *   set-point r → y:  C·P/(1 + C·P)        load d at the process input → y:  P/(1 + C·P).
 * Without a dead time in P both are rational and computed exactly (lti's matrix-exponential
 * step response). With one they are simulated (the engine's own linear run) on a small diagram
 * built from C and P, so the dead time stays exact; dead times inside P's own loops keep the
 * Padé form the reading gave them.
 */
import { DIAGRAM_FORMAT, DIAGRAM_VERSION, type Block, type Diagram, type Wire } from '@loopwright/graph';
import { type Rational, type TransferFunction, exactStepResponse, loopMargins, poly, polyRoots, rational } from '@loopwright/lti';
import { type ControllerSetting, controllerTransfer } from '@loopwright/tune';
import { settingParams } from './controller-block.ts';
import { responseStudy } from './run.ts';
import type { StepResponses } from './types.ts';

/** A loop: the controller's setting with its derivative filter n, and the process. */
export interface LoopForm {
  setting: ControllerSetting;
  n: number;
  P: TransferFunction;
  /** L = C·P, for the run length. */
  L: TransferFunction;
}

/** A number as the expression parser reads it back exactly (shortest round trip; no '+' after e). */
const exact = (x: number) => String(x).replace('e+', 'e');

/** An ascending polynomial as expression text in s. */
function polyText(p: readonly number[]): string {
  const terms: string[] = [];
  p.forEach((c, i) => {
    if (c === 0) return;
    const mag = exact(Math.abs(c));
    const body = i === 0 ? mag : `${mag}*s${i > 1 ? `^${i}` : ''}`;
    terms.push(terms.length === 0 ? (c < 0 ? `-${body}` : body) : `${c < 0 ? ' - ' : ' + '}${body}`);
  });
  return terms.length ? terms.join('') : '0';
}

/** The rational part of a transfer function as expression text the transfer-function block reads. */
export const rationalText = (tf: Pick<TransferFunction, 'rational'>): string =>
  `(${polyText(tf.rational.num)})/(${polyText(tf.rational.den)})`;

/** A transfer function (dead time included) as expression text the parser reads back exactly (coefficients ascending). */
export const transferText = (tf: TransferFunction): string => `${rationalText(tf)}${tf.delay > 0 ? `*exp(-${exact(tf.delay)}*s)` : ''}`;

/**
 * A round run length from the loops' dynamics: long enough for the slowest closed-loop mode and
 * the slowest pole of what the controller sees (a lag the controller cancels in L still shows in
 * the load response) to settle, within 10 to 60 crossover periods' worth.
 */
export function responseHorizon(forms: readonly { L: TransferFunction; P: TransferFunction }[]): number {
  let end = 0;
  for (const { L, P } of forms) {
    const m = loopMargins(L);
    const wc = m.gainCrossover;
    const own = P.rational.den.length > 1 ? polyRoots(P.rational.den) : [];
    const slow = Math.min(...[...m.closedLoopPoles, ...own].filter((p) => p.re < 0).map((p) => -p.re));
    const settle = Number.isFinite(slow) && slow > 0 ? 6 / slow : Infinity;
    const t = wc ? Math.min(Math.max(settle, 10 / wc), 60 / wc) : Number.isFinite(settle) ? settle : 10;
    end = Math.max(end, t + 2 * L.delay);
  }
  if (!(end > 0) || !Number.isFinite(end)) end = 10;
  const e = Math.floor(Math.log10(end));
  const f = end / 10 ** e;
  return (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * 10 ** e;
}

function loopBlocks(prefix: string, form: LoopForm, load: boolean): { blocks: Block[]; wires: Wire[] } {
  const at = (i: number) => ({ x: 180 * i, y: 0 });
  const id = (s: string) => `${prefix}-${s}`;
  const delayed = form.P.delay > 0;
  // Set-point loop: r → e = r − y → C → P → y. Load loop: d enters at the process input, e = −y.
  const blocks: Block[] = [
    { id: id('src'), kind: 'source', position: at(0), params: { shape: 'step', amplitude: 1, start: 0, offset: 0 } },
    { id: id('e'), kind: 'summing-junction', position: at(1), params: { signs: load ? '-' : '+-' } },
    { id: id('c'), kind: 'pid', position: at(2), params: settingParams(form.setting, form.n) },
    { id: id('u'), kind: 'summing-junction', position: at(3), params: { signs: load ? '++' : '+' } },
    { id: id('p'), kind: 'transfer-function', position: at(4), params: { expression: rationalText(form.P) } },
    ...(delayed ? [{ id: id('dt'), kind: 'dead-time' as const, position: at(5), params: { delay: form.P.delay } }] : []),
    { id: id('y'), kind: 'probe', position: at(6), params: {} },
  ];
  const out = delayed ? 'dt' : 'p';
  const w = (n: string, from: string, to: string, port = 'in'): Wire => ({
    id: id(n),
    from: { block: id(from), port: 'out' },
    to: { block: id(to), port },
  });
  const wires = [
    load ? w('d', 'src', 'u', 'in2') : w('r', 'src', 'e', 'in1'),
    w('ec', 'e', 'c'),
    w('cu', 'c', 'u', 'in1'),
    w('up', 'u', 'p'),
    ...(delayed ? [w('pd', 'p', 'dt')] : []),
    w('oy', out, 'y'),
    w('fb', out, 'e', load ? 'in1' : 'in2'),
  ];
  return { blocks, wires };
}

function runOf(forms: { prefix: string; form: LoopForm; load: boolean }[], until: number) {
  const parts = forms.map((f) => loopBlocks(f.prefix, f.form, f.load));
  const d: Diagram = {
    format: DIAGRAM_FORMAT,
    version: DIAGRAM_VERSION,
    title: 'loop forms',
    description: '',
    parameters: [],
    blocks: parts.flatMap((p) => p.blocks),
    wires: parts.flatMap((p) => p.wires),
    cuts: [],
    sweeps: [],
    simulation: {},
    view: {},
  };
  return responseStudy(d, { model: 'linear', until, step: until / 500, probes: 'all', maxWallMs: 4000 }).run;
}

/** The two loop forms as rationals: C·P/(1 + C·P) and P/(1 + C·P) (P without dead time). */
function rationalForms(f: LoopForm): { setpoint: Rational; load: Rational } {
  const C = controllerTransfer(f.setting, f.n).rational;
  const P = f.P.rational;
  const cp = poly.mul(C.num, P.num);
  const den = poly.add(poly.mul(C.den, P.den), cp);
  return { setpoint: rational(cp, den), load: rational(poly.mul(P.num, C.den), den) };
}

/** Values beyond this (an unstable loop running away) are not drawn. */
const RUNAWAY = 1e6;

/** The two step responses of the loop after the tuning, and before it when there is a loop today. */
export function loopStepResponses(before: LoopForm | null, after: LoopForm): StepResponses {
  const until = responseHorizon(before ? [before, after] : [after]);
  if (after.P.delay === 0 && (!before || before.P.delay === 0)) {
    const time = Array.from({ length: 501 }, (_, i) => (until * i) / 500);
    const run = (f: LoopForm) => {
      const r = rationalForms(f);
      const cap = (ys: number[]) => ys.map((y) => (Number.isFinite(y) && Math.abs(y) < RUNAWAY ? y : null));
      const stable = loopMargins(f.L).closedLoopStable;
      return {
        sp: cap(exactStepResponse(r.setpoint, time)),
        ld: cap(exactStepResponse(r.load, time)),
        status: stable ? null : 'the closed loop is unstable: the response grows without bound',
      };
    };
    const a = run(after);
    const b = before ? run(before) : null;
    return {
      time,
      setpoint: { before: b?.sp ?? null, after: a.sp },
      load: { before: b?.ld ?? null, after: a.ld },
      status: { before: b?.status ?? null, after: a.status },
    };
  }
  const forms = (f: LoopForm) => [
    { prefix: 'sp', form: f, load: false },
    { prefix: 'ld', form: f, load: true },
  ];
  const a = runOf(forms(after), until);
  const b = before ? runOf(forms(before), until) : null;
  // A run that stopped early (an unstable loop diverges) keeps what it reached; the rest is null.
  const on = (r: ReturnType<typeof runOf>, key: string) => {
    const byTime = new Map(r.time.map((t, i) => [t, r.traces[key][i]]));
    return a.time.map((t) => byTime.get(t) ?? null);
  };
  return {
    time: a.time,
    setpoint: { before: b ? on(b, 'sp-y') : null, after: on(a, 'sp-y') },
    load: { before: b ? on(b, 'ld-y') : null, after: on(a, 'ld-y') },
    status: { before: b ? (b.status === 'ok' ? null : b.message) : null, after: a.status === 'ok' ? null : a.message },
  };
}
