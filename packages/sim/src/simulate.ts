import { InputError, type ResponseMetrics } from '@loopwright/lti';
import { Outcome, Solver } from 'odex';
import { buildRun, statesBehind } from './build.ts';
import type { CompiledModel } from './compile.ts';
import { AW_CONDITIONAL, OP_DEADZONE, OP_PID, OP_RATE, OP_SAT, type SimNode } from './engine.ts';
import { DEGREE, NODES } from './history.ts';
import { probeMetrics } from './metrics.ts';
import type { ActuatorFigures, SimEvent, SimResult, SimStatus, SimulateOptions } from './types.ts';

/** How many times a discontinuity is carried forward through a dead time (t, t + T, t + 2T, …). */
const MAX_PROPAGATION = 4;
const MAX_BREAKPOINTS = 50000;
const MAX_GRID = 2_000_000;
/** Guards below −GUARD_TOL·(1 + |signal|) fire; nearer zero is round-off of a signal on its boundary. */
const GUARD_TOL = 1e-11;

const now = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

function positive(v: number | undefined, fallback: number, name: string, max = Infinity): number {
  if (v === undefined) return fallback;
  if (typeof v !== 'number' || !Number.isFinite(v) || !(v > 0) || v > max) {
    throw new InputError(`simulation option ${name}: ${v} must be a finite number above 0${max < Infinity ? ` and at most ${max}` : ''}`, {
      field: name,
    });
  }
  return v;
}

interface Tracker {
  since: number;
  total: number;
  hits: number;
  peak: number;
}

/**
 * Runs a compiled diagram from rest (zero states, zero history) to `until`. The run is split
 * into segments at source edges, at the edges carried forward through dead times, and at mode
 * switches of the nonlinear blocks; inside a segment odex integrates a smooth right-hand side
 * (modes frozen), guard functions are checked on the dense output at every step and the first
 * zero crossing is located by root finding on the dense output, where the run restarts in the
 * new mode. Dead times read a history built from the dense output; the step is at most the
 * smallest dead time, so that the delayed value is always already recorded.
 */
export function simulate(model: CompiledModel, opts: SimulateOptions): SimResult {
  const wall0 = now();
  if (opts.until === undefined) throw new InputError('simulation option until: the end time is required', { field: 'until' });
  const until = positive(opts.until, NaN, 'until', 1e9);
  const rtol = positive(opts.rtol, 1e-6, 'rtol', 1);
  const atol = positive(opts.atol, 1e-9, 'atol', 1e6);
  const dt = positive(opts.outputStep, until / 1000, 'outputStep');
  if (until / dt > MAX_GRID) throw new InputError(`simulation option outputStep: ${dt} s gives more than ${MAX_GRID} output points`, { field: 'outputStep' });
  const maxSteps = Math.floor(positive(opts.maxSteps, 200000, 'maxSteps'));
  const maxWallMs = positive(opts.maxWallMs, 10000, 'maxWallMs');
  const bound = positive(opts.divergenceBound, 1e9, 'divergenceBound');
  const linear = opts.linear === true;

  const run = buildRun(model, opts.overrides, linear, until);
  const eng = run.engine;
  const n = eng.nStates;
  const sig = eng.sig;
  eng.fdStep = 1e-6 * Math.min(1, until);
  const blockId = (b: number) => (b >= 0 ? model.blocks[b].id : '(none)');

  // --- what to record
  const keys: string[] = [];
  const sigIdx: number[] = [];
  for (const p of model.probes) {
    keys.push(model.blocks[p].id);
    sigIdx.push(run.blockSignal[p]);
  }
  const wireIds = opts.wires === 'all' ? model.diagram.wires.map((w) => w.id) : (opts.wires ?? []);
  for (const w of wireIds) {
    const src = model.wireSource.get(w);
    if (src === undefined) throw new InputError(`simulation option wires: unknown wire "${w}"`, { field: 'wires' });
    keys.push(`wire:${w}`);
    sigIdx.push(run.blockSignal[src]);
  }
  const time: number[] = [];
  const cols: number[][] = keys.map(() => []);
  const events: SimEvent[] = [];
  const trackers = new Map<SimNode, Tracker>();
  for (const nd of eng.guardNodes) if (nd.op !== OP_DEADZONE) trackers.set(nd, { since: 0, total: 0, hits: 0, peak: 0 });
  const trackerList = [...trackers.entries()];

  const hasGuards = eng.guardNodes.length > 0;
  const delayNodes = eng.delayNodes;
  const hasDelays = delayNodes.length > 0;
  const ng = eng.guards.length;

  // --- solver: dense output of what the recorded signals need (all states when modes can switch)
  const solver = new Solver(n);
  solver.denseOutput = true;
  solver.relativeTolerance = rtol;
  solver.absoluteTolerance = atol;
  // odex's stability check compares stage derivatives with the initial one; at an exact
  // equilibrium (ẋ ≈ 0) round-off makes it fail every step and the step size collapses.
  // Step control by the extrapolation error estimate stays in force.
  solver.stabilityCheckCount = 0;
  let comps: number[];
  if (hasGuards || hasDelays) comps = Array.from({ length: n }, (_, i) => i);
  else {
    comps = statesBehind(eng, [...sigIdx, ...delayNodes.map((d) => d.in0)]);
    if (comps.length === 0) comps = [0];
    solver.denseComponents = comps;
  }
  // Steps may be longer than a dead time: the delayed signal past the end of its record is then
  // extrapolated linearly, and every such step is checked against the signal it produced; a
  // miss beyond the tolerance restarts the step in "safe" mode (steps ≤ the dead time, so the
  // delayed value is always recorded) for 50 dead times.
  const tMin = run.delays[0] ?? Infinity;
  let hMaxBase = until;
  if (hasGuards) hMaxBase = Math.min(hMaxBase, until / 50);
  let safeUntil = -Infinity;
  let safe = false;

  // --- breakpoints (sorted, with the number of dead times they have passed through)
  const bpT: number[] = [];
  const bpL: number[] = [];
  const addBreak = (t: number, level: number) => {
    if (!(t > 0 && t < until) || bpT.length >= MAX_BREAKPOINTS) return;
    let lo = 0;
    let hi = bpT.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (bpT[mid] < t) lo = mid + 1;
      else hi = mid;
    }
    const tol = 1e-12 * Math.max(1, t);
    for (const k of [lo - 1, lo]) {
      if (k >= 0 && k < bpT.length && Math.abs(bpT[k] - t) <= tol) {
        bpL[k] = Math.min(bpL[k], level);
        return;
      }
    }
    bpT.splice(lo, 0, t);
    bpL.splice(lo, 0, level);
  };
  const propagate = (t: number, level: number) => {
    if (level >= MAX_PROPAGATION) return;
    for (const T of run.delays) addBreak(t + T, level + 1);
  };
  for (const b of run.breakpoints) addBreak(b, 0);
  propagate(0, 0);
  const nextBreak = (t: number): number => {
    const tol = 1e-12 * Math.max(1, t);
    for (let k = 0; k < bpT.length; k++) if (bpT[k] > t + tol) return k;
    return -1;
  };

  // --- state of the run
  const x = new Float64Array(n);
  const xs = new Float64Array(n);
  const restart = new Float64Array(n);
  const gPrev = new Float64Array(ng);
  const gStep = new Float64Array(ng);
  const samples = delayNodes.map(() => new Float64Array(DEGREE + 1));
  const prevSample = new Float64Array(delayNodes.length);
  const dy: number[] = new Array(n).fill(0);
  let t = 0;
  let lastRec = -Infinity;
  let gridK = 0;
  let status: SimStatus = 'ok';
  let message = '';
  let stopped = false;
  let steps = 0;
  let accepted = 0;
  let rejected = 0;
  let segments = 0;
  let lastProgress = 0;
  let zeroProgress = 0;
  let dwellUntil = -Infinity;
  const hRing = new Float64Array(64);
  let hSum = 0;
  let segEnd = 0;
  let hCap = until;
  // Where the segment's first event was located (NaN: none); reset at each segment start.
  let eventT: number;
  let eventGuard = -1;
  let reached = 0;

  const updatePeaks = () => {
    for (let i = 0; i < trackerList.length; i++) {
      const entry = trackerList[i];
      const tr = entry[1];
      const v = Math.abs(sig[entry[0].self]);
      if (v > tr.peak) tr.peak = v;
    }
  };
  const recordAt = (tau: number) => {
    time.push(tau);
    for (let i = 0; i < cols.length; i++) cols[i].push(sig[sigIdx[i]]);
    lastRec = tau;
    updatePeaks();
  };

  const eventKind = (nd: SimNode, m: number): string => {
    if (nd.op === OP_DEADZONE) return m === 0 ? 'dead-zone-enter' : 'dead-zone-leave';
    if (nd.op === OP_RATE) return m > 0 ? 'rate-rising' : m < 0 ? 'rate-falling' : 'rate-leave';
    return m > 0 ? 'limit-upper' : m < 0 ? 'limit-lower' : 'limit-leave';
  };
  const setModeEvent = (nd: SimNode, m: number, at: number) => {
    const old = nd.mode;
    if (m === old) return;
    nd.mode = m;
    events.push({ time: at, kind: eventKind(nd, m), block: blockId(nd.block) });
    const tr = trackers.get(nd);
    if (tr) {
      if (m !== 0) tr.hits++;
      if (old === 0 && m !== 0) tr.since = at;
      if (old !== 0 && m === 0) tr.total += at - tr.since;
    }
    if (nd.op === OP_PID && m === 0) setFrozenEvent(nd, false, at);
  };
  const setFrozenEvent = (nd: SimNode, f: boolean, at: number) => {
    if (nd.frozen === f) return;
    nd.frozen = f;
    events.push({ time: at, kind: f ? 'integration-hold' : 'integration-resume', block: blockId(nd.block) });
  };
  /** In tracking mode a rate limiter's state is not integrated: keep it equal to its output. */
  const syncRates = (xv: Float64Array) => {
    for (const nd of eng.rateNodes) if (nd.mode === 0) xv[nd.so] = sig[nd.in0];
  };

  /** Chooses every mode from the signals at (t, x), upstream first; ties keep the current mode. */
  const savedMode = new Int8Array(eng.guardNodes.length);
  const savedFrozen = new Uint8Array(eng.guardNodes.length);
  const selectModes = (at: number, xv: Float64Array) => {
    // modes change silently while the selection settles; events record only the net change
    eng.guardNodes.forEach((nd, i) => {
      savedMode[i] = nd.mode;
      savedFrozen[i] = nd.frozen ? 1 : 0;
    });
    const setMode = (nd: SimNode, m: number) => {
      nd.mode = m;
      if (m === 0) nd.frozen = false;
    };
    const setFrozen = (nd: SimNode, f: boolean) => {
      nd.frozen = f;
    };
    for (let iter = 0; iter < eng.guardNodes.length + 2; iter++) {
      eng.computeGuards(at, xv, true);
      let changed = false;
      for (const nd of eng.guardNodes) {
        const old = nd.mode;
        if (nd.op === OP_RATE) {
          const u = sig[nd.in0];
          const r = xv[nd.so];
          const eps = 1e-9 * (1 + Math.abs(u));
          let m: number;
          if (Math.abs(u - r) > eps) m = u > r ? 1 : -1; // behind the input: slew towards it
          else if (at < dwellUntil && nd.mode !== 0) m = nd.mode;
          else {
            // on the input: follow it unless its slope is beyond a limit; a slope within a hair
            // of the limit stays tracking (its guard then fires if it really crosses)
            const s = eng.udot[nd.in0];
            m = s > nd.rising + 1e-7 * (1 + nd.rising) ? 1 : s < -nd.falling - 1e-7 * (1 + nd.falling) ? -1 : 0;
            if (m !== 0) xv[nd.so] = u;
          }
          if (m !== old) {
            setMode(nd, m);
            changed = true;
          }
          continue;
        }
        const u = nd.op === OP_PID ? nd.v : sig[nd.in0];
        const eps = 1e-9 * (1 + Math.abs(u));
        let m = 0;
        if (u > nd.hi + eps) m = 1;
        else if (u < nd.lo - eps) m = -1;
        else if (old === 1 && u >= nd.hi - eps) m = 1;
        else if (old === -1 && u <= nd.lo + eps) m = -1;
        if (m !== old) {
          setMode(nd, m);
          changed = true;
        }
        if (nd.op === OP_PID && nd.aw === AW_CONDITIONAL && nd.mode !== 0) {
          const e = sig[nd.in0];
          const p = nd.mode * Math.sign(nd.ki) * e;
          const pe = 1e-12 * (1 + Math.abs(e));
          const f = p > pe ? true : p < -pe ? false : nd.frozen || old === 0;
          if (f !== nd.frozen) {
            setFrozen(nd, f);
            changed = true;
          }
        }
      }
      if (!changed) break;
    }
    eng.guardNodes.forEach((nd, i) => {
      const m = nd.mode;
      const f = nd.frozen;
      nd.mode = savedMode[i];
      nd.frozen = savedFrozen[i] === 1;
      setModeEvent(nd, m, at);
      setFrozenEvent(nd, f, at);
    });
  };
  // Rate limiters: a jump of the input (at a segment start) cannot be followed.
  const selectRateJumps = (xv: Float64Array) => {
    for (const nd of eng.rateNodes) {
      if (nd.mode !== 0) continue;
      const u = sig[nd.in0];
      const r = xv[nd.so];
      const eps = 1e-9 * (1 + Math.abs(u));
      if (u > r + eps) setModeEvent(nd, 1, t);
      else if (u < r - eps) setModeEvent(nd, -1, t);
    }
  };

  /** Applies the switch of the guard that fired. */
  const fire = (gi: number, at: number, xv: Float64Array) => {
    for (const nd of eng.guardNodes) {
      if (gi < nd.go || gi >= nd.go + nd.ng) continue;
      const slot = gi - nd.go;
      if (nd.op === OP_PID && slot === 2) {
        setFrozenEvent(nd, !nd.frozen, at);
        return;
      }
      if (nd.op === OP_RATE) {
        if (nd.mode === 0) {
          xv[nd.so] = sig[nd.in0];
          setModeEvent(nd, slot === 0 ? 1 : -1, at);
        } else if (!(at < dwellUntil)) setModeEvent(nd, 0, at); // in a dwell keep slewing: its slope is the limit itself
        return;
      }
      if (nd.mode === 0) {
        // slot 0: u went below lo; slot 1: above hi. Dead zone: leaving the band.
        setModeEvent(nd, slot === 0 ? -1 : 1, at);
        if (nd.op === OP_PID && nd.aw === AW_CONDITIONAL) {
          const p = nd.mode * Math.sign(nd.ki) * sig[nd.in0];
          setFrozenEvent(nd, p > 0, at);
        }
      } else setModeEvent(nd, 0, at);
      return;
    }
  };

  const stop = (s: SimStatus, msg: string) => {
    status = s;
    message = msg;
    stopped = true;
  };
  const fmt = (v: number) => (Math.abs(v) >= 1e-3 && Math.abs(v) < 1e6 ? String(+v.toPrecision(6)) : v.toExponential(4));

  type Dense = (c: number, x: number) => number;
  const fillDense = (dense: Dense, tau: number) => {
    for (let i = 0; i < comps.length; i++) xs[comps[i]] = dense(comps[i], tau);
  };
  /** Grid points in (lastRec, upTo) — or up to and including upTo when `inclusive`. */
  const recordGrid = (dense: Dense, yEnd: number[], tEndStep: number, upTo: number, inclusive: boolean) => {
    for (;;) {
      const tau = gridK * dt;
      if (inclusive ? tau > upTo + 1e-12 * Math.max(1, upTo) : tau >= upTo - 1e-12 * Math.max(1, upTo)) break;
      gridK++;
      if (tau <= lastRec + 1e-12 * Math.max(1, tau)) continue;
      for (let i = 0; i < n; i++) xs[i] = yEnd[i];
      if (tau < tEndStep) fillDense(dense, tau);
      eng.evalNet(Math.min(tau, tEndStep), xs);
      recordAt(tau);
    }
  };
  const guardAt = (dense: Dense, gi: number, tau: number): number => {
    fillDense(dense, tau);
    return eng.computeGuards(tau, xs)[gi];
  };
  const findRoot = (dense: Dense, gi: number, shift: number, a: number, fa: number, b: number, fb: number): number => {
    let side = 0;
    for (let it = 0; it < 80; it++) {
      if (b - a <= 1e-13 * Math.max(1, Math.abs(b))) break;
      let c = fb !== fa ? (a * fb - b * fa) / (fb - fa) : 0.5 * (a + b);
      if (!(c > a && c < b)) c = 0.5 * (a + b);
      const fc = guardAt(dense, gi, c) + shift;
      if (fc < 0) {
        b = c;
        fb = fc;
        if (side === -1) fa /= 2;
        side = -1;
      } else {
        a = c;
        fa = fc;
        if (side === 1) fb /= 2;
        side = 1;
      }
    }
    return b;
  };
  const sampleDelays = (dense: Dense, yEnd: number[], a: number, b: number, endExact: boolean) => {
    for (let j = 1; j <= DEGREE; j++) {
      const tau = j === DEGREE ? b : a + NODES[j] * (b - a);
      for (let i = 0; i < n; i++) xs[i] = yEnd[i];
      if (!(j === DEGREE && endExact)) fillDense(dense, tau);
      eng.evalNet(tau, xs);
      for (let d = 0; d < delayNodes.length; d++) samples[d][j] = sig[delayNodes[d].in0];
    }
  };
  const pushPieces = (a: number, b: number) => {
    for (let d = 0; d < delayNodes.length; d++) {
      samples[d][0] = prevSample[d];
      delayNodes[d].hist!.push(a, b, samples[d]);
      prevSample[d] = samples[d][DEGREE];
    }
  };

  const solOut = (nr: number, xold: number, xnew: number, y: number[], dense?: Dense): boolean => {
    if (nr === 1 || !dense) return true;
    accepted++;
    const h = xnew - xold;
    const slot = accepted & 63;
    hSum += h - hRing[slot];
    hRing[slot] = h;
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(y[i])) {
        reached = xold;
        stop('diverged', `the run diverged at t = ${fmt(xold)} s: a state of block ${blockId(eng.stateOwner[i])} is no longer finite`);
        return false;
      }
    }
    // a step longer than a dead time used extrapolated delayed values: check them
    if (hasDelays && !safe && xnew - tMin > xold) {
      let evaluatedAt = NaN;
      for (let d = 0; d < delayNodes.length; d++) {
        const nd = delayNodes[d];
        const reach = xnew - nd.delay;
        if (!(reach > xold)) continue;
        for (let q = 1; q <= 2; q++) {
          const tau = xold + 0.5 * q * (reach - xold);
          if (tau !== evaluatedAt) {
            // dead times of equal length share the evaluation
            for (let i = 0; i < n; i++) xs[i] = y[i];
            fillDense(dense, tau);
            eng.evalNet(tau, xs);
            evaluatedAt = tau;
          }
          const v = sig[nd.in0];
          const guess = nd.hist!.extrapolate(tau);
          // tolerance relative to the signal's range so far (as the integrator's own error control)
          if (Math.abs(v - guess) > atol + rtol * Math.max(Math.abs(v), nd.hist!.maxAbs)) {
            for (let i = 0; i < n; i++) restart[i] = dense(i, xold);
            eventT = xold;
            eventGuard = -1;
            safeUntil = xold + 50 * tMin;
            reached = xold;
            return false;
          }
        }
      }
    }
    // sample the step at the Lobatto nodes: guards (mode switches) and dead-time histories
    let fired = false;
    let jFired = 0;
    if (hasGuards || hasDelays) {
      let gLast = gPrev;
      for (let j = 1; j <= DEGREE && !fired; j++) {
        const tau = j === DEGREE ? xnew : xold + NODES[j] * h;
        for (let i = 0; i < n; i++) xs[i] = y[i];
        if (j < DEGREE) fillDense(dense, tau);
        if (hasGuards) {
          const g = eng.computeGuards(tau, xs);
          const gs = eng.guardScale;
          if (tau < dwellUntil) {
            // just after repeated switches at one instant: hold the modes for a short dwell (see below)
            for (let i = 0; i < ng; i++) if (g[i] < 0) g[i] = 0;
          } else for (let i = 0; i < ng; i++) if (g[i] < -GUARD_TOL * gs[i] && gLast[i] >= -GUARD_TOL * gs[i]) fired = true;
          if (fired) {
            jFired = j;
            break;
          }
          gStep.set(g);
          gLast = gStep;
          updatePeaks();
        } else eng.evalNet(tau, xs);
        if (hasDelays) for (let d = 0; d < delayNodes.length; d++) samples[d][j] = sig[delayNodes[d].in0];
      }
      if (fired) {
        // the earliest root among the guards that crossed between the last two samples
        const a = jFired === 1 ? xold : xold + NODES[jFired - 1] * h;
        const b = jFired === DEGREE ? xnew : xold + NODES[jFired] * h;
        const ga = jFired === 1 ? gPrev : gStep;
        const gb = Float64Array.from(eng.guards);
        const gaCopy = Float64Array.from(ga);
        let te = Infinity;
        let which = -1;
        const gs = Float64Array.from(eng.guardScale);
        for (let i = 0; i < ng; i++) {
          const tol = GUARD_TOL * gs[i];
          if (gb[i] < -tol && gaCopy[i] >= -tol) {
            // the root of g itself when the bracket allows it, else where g = −tol (a round-off away)
            const shift = gaCopy[i] >= 0 ? 0 : tol;
            const r = findRoot(dense, i, shift, a, gaCopy[i] + shift, b, gb[i] + shift);
            if (r < te) {
              te = r;
              which = i;
            }
          }
        }
        if (hasDelays) {
          sampleDelays(dense, y, xold, te, false);
          pushPieces(xold, te);
        }
        recordGrid(dense, y, xnew, te, false);
        for (let i = 0; i < n; i++) restart[i] = dense(i, te);
        eventT = te;
        eventGuard = which;
        reached = te;
        return false;
      }
      if (hasGuards) gPrev.set(gStep);
      if (hasDelays) pushPieces(xold, xnew);
    }
    recordGrid(dense, y, xnew, xnew, xnew < segEnd - 1e-12 * Math.max(1, segEnd));
    reached = xnew;
    for (let i = 0; i < n; i++) {
      if (Math.abs(y[i]) > bound) {
        stop(
          'diverged',
          `the run diverged at t = ${fmt(xnew)} s: a state of block ${blockId(eng.stateOwner[i])} reached ${fmt(y[i])}, beyond the bound ±${fmt(bound)}`,
        );
        return false;
      }
    }
    if (accepted >= maxSteps) {
      stop('budget', `the step budget of ${maxSteps} steps ran out at t = ${fmt(xnew)} s`);
      return false;
    }
    if ((accepted & 7) === 0 && budgetChecks(xnew)) return false;
    if (accepted >= 256 && slot === 0) {
      const hAvg = hSum / 64;
      const need = (until - xnew) / hAvg;
      // step size collapsed far below what the segment allows, and the budget would not reach the end (or the collapse is extreme)
      if ((need > maxSteps - steps - accepted && hAvg < 1e-3 * hCap) || (accepted >= 1024 && hAvg < 1e-5 * hCap)) {
        stop(
          'stiff',
          `the step size collapsed to about ${fmt(hAvg)} s at t = ${fmt(xnew)} s (about ${fmt(need)} more steps needed, ` +
            `budget ${maxSteps}): the diagram looks stiff (time constants far apart); lengthen the fastest time constant or shorten the run`,
        );
        return false;
      }
    }
    return true;
  };

  const budgetChecks = (at: number): boolean => {
    if (opts.isCancelled?.()) {
      stop('cancelled', `cancelled at t = ${fmt(at)} s`);
      return true;
    }
    if (now() - wall0 > maxWallMs) {
      stop('budget', `the wall-time budget of ${maxWallMs} ms ran out at t = ${fmt(at)} s`);
      return true;
    }
    if (opts.onProgress && at / until >= lastProgress + 0.01) {
      lastProgress = at / until;
      opts.onProgress(Math.min(1, lastProgress));
    }
    return false;
  };

  const f = (tt: number, y: number[]) => {
    eng.rhs(tt, y, dy);
    return dy;
  };

  // --- the segment loop
  while (!stopped) {
    const k = nextBreak(t);
    let tEnd = k >= 0 ? bpT[k] : until;
    safe = t < safeUntil - 1e-12 * Math.max(1, t);
    const atBreak = !(safe && safeUntil < tEnd);
    if (!atBreak) tEnd = safeUntil;
    segEnd = tEnd;
    eng.piece = 0.5 * (t + tEnd);
    segments++;
    if (hasGuards) {
      eng.evalNet(t, x);
      selectRateJumps(x);
      selectModes(t, x);
      const g = eng.computeGuards(t, x);
      // a guard a hair below zero right after a switch counts as on the boundary
      for (let i = 0; i < ng; i++) gPrev[i] = g[i] < 0 && g[i] > -1e-6 ? 0 : g[i];
    } else eng.evalNet(t, x);
    if (t > lastRec + 1e-12 * Math.max(1, t) || time.length === 0) recordAt(t);
    for (let d = 0; d < delayNodes.length; d++) prevSample[d] = sig[delayNodes[d].in0];
    if (budgetChecks(t)) break;

    eventT = NaN;
    hCap = Math.min(hMaxBase, tEnd - t, safe ? tMin : Infinity);
    solver.maxStepSize = hCap;
    solver.maxSteps = Math.max(1, maxSteps - steps);
    const res = solver.solve(f, t, Array.from(x), tEnd, solOut);
    steps += res.nStep;
    rejected += res.nReject;
    if (stopped) break;
    if (!Number.isNaN(eventT)) {
      if (eventGuard >= 0) zeroProgress = eventT - t <= 1e-12 * Math.max(1, t) ? zeroProgress + 1 : 0;
      // A signal grazing its limit (slope equal to a rate limit, a peak touching a saturation)
      // can make modes flip back and forth on round-off at one instant. After a few such
      // switches the modes are held for a dwell of 1e-6 of the run, long enough for the guard
      // to grow above round-off; a rate limiter holds its slewing mode (slope = the limit).
      if (zeroProgress >= 3) dwellUntil = eventT + 1e-6 * until;
      x.set(restart);
      t = eventT;
      eng.evalNet(t, x);
      syncRates(x);
      if (eventGuard >= 0) {
        fire(eventGuard, t, x);
        propagate(t, 0);
      }
      if (zeroProgress > 40 || events.length > 200000) {
        stop('budget', `mode switches repeat at t = ${fmt(t)} s without progress (chattering): the run cannot continue`);
        break;
      }
      continue;
    }
    if (res.outcome === Outcome.MaxStepsExceeded || steps >= maxSteps) {
      if (reached < tEnd) {
        stop('budget', `the step budget of ${maxSteps} steps ran out at t = ${fmt(reached)} s`);
        break;
      }
    }
    for (let i = 0; i < n; i++) x[i] = res.y[i];
    t = tEnd;
    reached = t;
    eng.evalNet(t, x);
    syncRates(x);
    if (t >= until) {
      if (t > lastRec) recordAt(t);
      break;
    }
    if (atBreak) propagate(t, k >= 0 ? bpL[k] : 0);
  }

  if (!stopped) message = `completed at t = ${fmt(until)} s`;
  if (status === 'ok') reached = until;
  if (status === 'ok') opts.onProgress?.(1);

  const actuators: Record<string, ActuatorFigures> = {};
  for (const [nd, tr] of trackerList) {
    const total = tr.total + (nd.mode !== 0 ? reached - tr.since : 0);
    const id = blockId(nd.block);
    if (nd.op === OP_SAT || nd.op === OP_PID || nd.op === OP_RATE) actuators[id] = { timeInSaturation: total, peakEffort: tr.peak, limitHits: tr.hits };
  }
  const traces: Record<string, number[]> = {};
  keys.forEach((key, i) => (traces[key] = cols[i]));
  const metricsFor = opts.metricsFor ?? model.probes.map((p) => model.blocks[p].id);
  const metrics: Record<string, ResponseMetrics | null> = {};
  for (const id of metricsFor) {
    if (!traces[id]) throw new InputError(`simulation option metricsFor: "${id}" is not a probe`, { field: 'metricsFor' });
    metrics[id] = probeMetrics(time, traces[id], opts.metricsOptions);
  }
  return {
    time,
    traces,
    events,
    status,
    message,
    timeReached: reached,
    metrics,
    actuators,
    stats: { steps, accepted, rejected, evaluations: eng.evaluations, segments, wallMs: now() - wall0 },
  };
}
