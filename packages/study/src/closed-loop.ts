/**
 * Closed-loop forms between any two points of a diagram: from a source, any block's output or
 * any wire, to a probe, a block's output or a wire, every loop closed — the transfer function
 * (exact rational function, times a dead time where it factors out), its poles and zeros, and
 * on request its Bode data and exact step response.
 */
import { DEFAULT_PADE_ORDER, closedLoop, describeRef, type Diagram, type SignalRef } from '@loopwright/graph';
import { InputError, exactStepResponse, rational, type Complex, type Rational } from '@loopwright/lti';
import { without } from './split.ts';
import { engineParameterName, withLiveValue } from './sweep-target.ts';
import { bodeOf, transferData } from './transfer-data.ts';
import type { ClosedLoopData, LiveValue } from './types.ts';
import { assertAnalysable } from './validate.ts';
import { comparisonOrder, originsOf } from './poles.ts';

/**
 * A point named in text: "block:ID", "wire:ID", or a bare ID that names exactly one block or
 * wire. `what` names where the text came from in messages (e.g. "--from").
 */
export function parseSignalRef(d: Diagram, text: string, what: string): SignalRef {
  const m = /^(block|wire):(.+)$/.exec(text);
  if (m) {
    const ref = m[1] === 'block' ? { block: m[2] } : { wire: m[2] };
    const known = m[1] === 'block' ? d.blocks.some((b) => b.id === m[2]) : d.wires.some((w) => w.id === m[2]);
    if (!known) throw new InputError(`${what} ${text}: the diagram has no ${m[1]} "${m[2]}"`, { field: what });
    return ref;
  }
  const isBlock = d.blocks.some((b) => b.id === text);
  const isWire = d.wires.some((w) => w.id === text);
  if (isBlock && isWire)
    throw new InputError(`${what} ${text}: both a block and a wire have this id; write block:${text} or wire:${text}`, { field: what });
  if (isBlock) return { block: text };
  if (isWire) return { wire: text };
  const hint = d.blocks.filter((b) => b.kind === 'source' || b.kind === 'probe').map((b) => b.id);
  throw new InputError(`${what} ${text}: no block or wire with this id${hint.length ? ` (sources and probes: ${hint.join(', ')})` : ''}`, {
    field: what,
  });
}

export interface ClosedLoopRequest {
  from: SignalRef;
  to: SignalRef;
  overrides?: Record<string, number>;
  live?: LiveValue | null;
  padeOrder?: number;
  /** Also give Bode data and the step response. */
  bode?: boolean;
  step?: boolean;
}

const plain = (c: Complex) => ({ re: c.re, im: c.im });

/** A step horizon: six time constants of the slowest stable pole after the dead time (10 s without one), 400 samples. */
function stepTimes(poles: readonly Complex[], delay: number): number[] {
  const slow = Math.min(...poles.filter((p) => p.re < 0).map((p) => -p.re));
  const end = delay + (Number.isFinite(slow) && slow > 0 ? 6 / slow : 10);
  return Array.from({ length: 401 }, (_, i) => (end * i) / 400);
}

/**
 * The exact step response with time scaled by ω0 (the geometric mean of the pole magnitudes):
 * T(s) = T'(s/ω0) has coefficients near one, so its companion realisation stays well
 * conditioned when the poles spread over decades (a fast current loop beside a slow position
 * loop gives coefficients up to 1e24 otherwise, and a response that explodes); y(t) = y'(ω0·t).
 */
export function scaledStepResponse(r: Rational, time: readonly number[], delay: number): number[] {
  const n = r.den.length - 1;
  const lead = r.den[n];
  const low = r.den.findIndex((c) => c !== 0);
  const w0 = n > 0 && low < n && lead !== 0 ? Math.abs(r.den[low] / lead) ** (1 / (n - low)) : 1;
  if (!(w0 > 0) || !Number.isFinite(w0) || Math.abs(Math.log10(w0)) < 0.5) return exactStepResponse(r, time, delay);
  const scale = (c: readonly number[]) => c.map((v, k) => v * w0 ** k);
  const shifted = time.map((t) => Math.max(0, t - delay) * w0);
  const y = exactStepResponse(rational(scale(r.num), scale(r.den)), shifted);
  return time.map((t, i) => (t < delay ? 0 : y[i]));
}

export function closedLoopStudy(d: Diagram, req: ClosedLoopRequest, deadline?: number): ClosedLoopData {
  const { diagram, overrides } = withLiveValue(d, req.overrides ?? {}, req.live);
  assertAnalysable(diagram, req.live ? without(overrides, engineParameterName(req.live.target)) : overrides, deadline);
  const padeOrder = req.padeOrder ?? DEFAULT_PADE_ORDER;
  const r = closedLoop(diagram, req.from, req.to, overrides, { padeOrder, ...(deadline !== undefined ? { deadline } : {}) });
  // With a dead time inside a loop the poles (and zeros) are those of a Padé approximant: each
  // is marked by whether it stays put at a Padé order two higher.
  const pade = r.delayHandling.mode === 'pade';
  const higher = pade
    ? closedLoop(diagram, req.from, req.to, overrides, {
        padeOrder: comparisonOrder(padeOrder),
        ...(deadline !== undefined ? { deadline } : {}),
      })
    : null;
  let step: ClosedLoopData['step'] = null;
  if (req.step) {
    const time = stepTimes(r.poles, r.delay);
    const value = scaledStepResponse(r.tf.rational, time, r.delay);
    if (value.every(Number.isFinite)) step = { time, value };
  }
  return {
    from: req.from,
    to: req.to,
    fromLabel: describeRef(req.from),
    toLabel: describeRef(req.to),
    transfer: transferData(r.tf),
    poles: r.poles.map(plain),
    zeros: r.zeros.map(plain),
    poleOrigin: originsOf(r.poles, pade, () => higher!.poles),
    zeroOrigin: originsOf(r.zeros, pade, () => higher!.zeros),
    gain: r.gain,
    staticGain: r.staticGain,
    delayHandling: r.delayHandling,
    hiddenModes: r.hiddenModes.map(plain),
    bode: req.bode ? bodeOf(r.tf) : null,
    step,
  };
}
