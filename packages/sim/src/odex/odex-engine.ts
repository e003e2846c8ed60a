import { Outcome, Solver } from 'odex';
import { statesBehind } from '../build.ts';
import { GUARD_TOL } from '../modes.ts';
import { fmt } from '../options.ts';
import type { RunState, SegmentEngine, SegmentOutcome } from '../run-state.ts';
import { DEGREE, LobattoHistory, NODES } from './lobatto-history.ts';

type Dense = (c: number, x: number) => number;

/**
 * The odex engine (Gragg–Bulirsch–Stoer extrapolation with dense output) for any right-hand
 * side: the cross-check of the exact engine in tests, and the fallback where the exact engine
 * does not apply. Inside a segment odex integrates a smooth right-hand side (modes frozen);
 * after every step guard functions are checked at the 8 Chebyshev–Lobatto points of the step on
 * the dense output and the first zero crossing is located by root finding (Illinois) on the
 * dense output. Dead times read a degree-7 history built from the dense output; a step longer
 * than a dead time uses the delayed signal extrapolated linearly from the record's end and is
 * checked against the signal it produced; on a miss the step is redone in "safe" mode (steps ≤
 * the dead time) for 50 dead times.
 */
export class OdexEngine implements SegmentEngine {
  readonly name = 'odex' as const;
  private readonly solver: Solver;
  private readonly comps: number[];
  private readonly hist: LobattoHistory[];
  private readonly tMin: number;
  private readonly hMaxBase: number;
  private safeUntil = -Infinity;
  private safe = false;
  private readonly xs: Float64Array;
  private readonly restart: Float64Array;
  private readonly gPrev: Float64Array;
  private readonly gStep: Float64Array;
  private readonly samples: Float64Array[];
  private readonly prevSample: Float64Array;
  private readonly dy: number[];
  private readonly hRing = new Float64Array(64);
  private hSum = 0;
  private segEnd = 0;
  private hCap = 0;
  private eventT = NaN;
  private eventGuard = -1;
  private reached = 0;
  private steps = 0;
  private accepted = 0;
  private rejected = 0;
  private readonly f: (t: number, y: number[]) => number[];
  private readonly solOut: (nr: number, xold: number, xnew: number, y: number[], dense?: Dense) => boolean;

  constructor(private readonly rs: RunState) {
    const { net, s } = rs;
    const n = net.nStates;
    const delayNodes = net.delayNodes;
    net.fdStep = 1e-6 * Math.min(1, s.until);
    this.hist = delayNodes.map((nd) => {
      const h = new LobattoHistory();
      nd.hist = h;
      return h;
    });
    const solver = new Solver(n);
    solver.denseOutput = true;
    solver.relativeTolerance = s.rtol;
    solver.absoluteTolerance = s.atol;
    // odex's stability check compares stage derivatives with the initial one; at an exact
    // equilibrium (ẋ ≈ 0) round-off makes it fail every step and the step size collapses.
    // Step control by the extrapolation error estimate stays in force.
    solver.stabilityCheckCount = 0;
    const hasGuards = net.guards.length > 0;
    const hasDelays = delayNodes.length > 0;
    // dense output of what the recorded signals need (all states when modes can switch)
    if (hasGuards || hasDelays) this.comps = Array.from({ length: n }, (_, i) => i);
    else {
      this.comps = statesBehind(net, [...rs.rec.sigIdx, ...delayNodes.map((d) => d.in0)]);
      if (this.comps.length === 0) this.comps = [0];
      solver.denseComponents = this.comps;
    }
    this.solver = solver;
    this.tMin = rs.built.delays[0] ?? Infinity;
    this.hMaxBase = hasGuards ? s.until / 50 : s.until;
    this.xs = new Float64Array(n);
    this.restart = new Float64Array(n);
    this.gPrev = new Float64Array(net.guards.length);
    this.gStep = new Float64Array(net.guards.length);
    this.samples = delayNodes.map(() => new Float64Array(DEGREE + 1));
    this.prevSample = new Float64Array(delayNodes.length);
    this.dy = new Array<number>(n).fill(0);
    this.f = (tt, y) => {
      net.rhs(tt, y, this.dy);
      return this.dy;
    };
    this.solOut = (nr, xold, xnew, y, dense) => this.onStep(nr, xold, xnew, y, dense);
  }

  stats() {
    return { steps: this.steps, accepted: this.accepted, rejected: this.rejected };
  }

  segmentEnd(t: number, tEnd: number): number {
    this.safe = t < this.safeUntil - 1e-12 * Math.max(1, t);
    return this.safe && this.safeUntil < tEnd ? this.safeUntil : tEnd;
  }

  integrate(t: number, tEnd: number, g0: Float64Array): SegmentOutcome {
    const { net, s, budget, x } = this.rs;
    const delayNodes = net.delayNodes;
    for (let d = 0; d < delayNodes.length; d++) this.prevSample[d] = net.sig[delayNodes[d].in0];
    this.gPrev.set(g0);
    this.segEnd = tEnd;
    this.eventT = NaN;
    this.hCap = Math.min(this.hMaxBase, tEnd - t, this.safe ? this.tMin : Infinity);
    this.solver.maxStepSize = this.hCap;
    this.solver.maxSteps = Math.max(1, s.maxSteps - this.steps);
    const res = this.solver.solve(this.f, t, Array.from(x), tEnd, this.solOut);
    this.steps += res.nStep;
    this.rejected += res.nReject;
    budget.steps = this.accepted;
    if (budget.stopped) return { end: this.reached, restart: false, guard: -1 };
    if (!Number.isNaN(this.eventT)) {
      x.set(this.restart);
      return { end: this.eventT, restart: true, guard: this.eventGuard };
    }
    if ((res.outcome === Outcome.MaxStepsExceeded || this.steps >= s.maxSteps) && this.reached < tEnd) {
      budget.stop('budget', `the step budget of ${s.maxSteps} steps ran out at t = ${fmt(this.reached)} s`);
      budget.reached = this.reached;
      return { end: this.reached, restart: false, guard: -1 };
    }
    for (let i = 0; i < x.length; i++) x[i] = res.y[i];
    return { end: tEnd, restart: false, guard: -1 };
  }

  private fillDense(dense: Dense, tau: number): void {
    const xs = this.xs;
    const comps = this.comps;
    for (let i = 0; i < comps.length; i++) xs[comps[i]] = dense(comps[i], tau);
  }

  /** Grid points in (lastRec, upTo) — or up to and including upTo when `inclusive`. */
  private recordGrid(dense: Dense, yEnd: number[], tEndStep: number, upTo: number, inclusive: boolean): void {
    const { net, rec, modes } = this.rs;
    const n = net.nStates;
    for (;;) {
      const tau = rec.gridK * rec.dt;
      if (inclusive ? tau > upTo + 1e-12 * Math.max(1, upTo) : tau >= upTo - 1e-12 * Math.max(1, upTo)) break;
      rec.gridK++;
      if (tau <= rec.lastRec + 1e-12 * Math.max(1, tau)) continue;
      for (let i = 0; i < n; i++) this.xs[i] = yEnd[i];
      if (tau < tEndStep) this.fillDense(dense, tau);
      net.evalNet(Math.min(tau, tEndStep), this.xs);
      rec.record(tau, net.sig);
      modes.updatePeaks(net.sig);
    }
  }

  private guardAt(dense: Dense, gi: number, tau: number): number {
    this.fillDense(dense, tau);
    return this.rs.net.computeGuards(tau, this.xs)[gi];
  }

  private findRoot(dense: Dense, gi: number, shift: number, a: number, fa: number, b: number, fb: number): number {
    let side = 0;
    for (let it = 0; it < 80; it++) {
      if (b - a <= 1e-13 * Math.max(1, Math.abs(b))) break;
      let c = fb !== fa ? (a * fb - b * fa) / (fb - fa) : 0.5 * (a + b);
      if (!(c > a && c < b)) c = 0.5 * (a + b);
      const fc = this.guardAt(dense, gi, c) + shift;
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
  }

  private sampleDelays(dense: Dense, yEnd: number[], a: number, b: number): void {
    const net = this.rs.net;
    const n = net.nStates;
    for (let j = 1; j <= DEGREE; j++) {
      const tau = j === DEGREE ? b : a + NODES[j] * (b - a);
      for (let i = 0; i < n; i++) this.xs[i] = yEnd[i];
      this.fillDense(dense, tau);
      net.evalNet(tau, this.xs);
      for (let d = 0; d < net.delayNodes.length; d++) this.samples[d][j] = net.sig[net.delayNodes[d].in0];
    }
  }

  private pushPieces(a: number, b: number): void {
    for (let d = 0; d < this.hist.length; d++) {
      this.samples[d][0] = this.prevSample[d];
      this.hist[d].push(a, b, this.samples[d]);
      this.prevSample[d] = this.samples[d][DEGREE];
    }
  }

  private onStep(nr: number, xold: number, xnew: number, y: number[], dense?: Dense): boolean {
    if (nr === 1 || !dense) return true;
    const { net, s, budget, modes } = this.rs;
    const n = net.nStates;
    const delayNodes = net.delayNodes;
    const hasDelays = delayNodes.length > 0;
    const ng = net.guards.length;
    const hasGuards = ng > 0;
    const xs = this.xs;
    this.accepted++;
    const h = xnew - xold;
    const slot = this.accepted & 63;
    this.hSum += h - this.hRing[slot];
    this.hRing[slot] = h;
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(y[i])) {
        this.reached = xold;
        budget.reached = xold;
        budget.stop(
          'diverged',
          `the run diverged at t = ${fmt(xold)} s: a state of block ${this.rs.blockId(net.stateOwner[i])} is no longer finite`,
        );
        return false;
      }
    }
    // a step longer than a dead time used extrapolated delayed values: check them
    if (hasDelays && !this.safe && xnew - this.tMin > xold) {
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
            this.fillDense(dense, tau);
            net.evalNet(tau, xs);
            evaluatedAt = tau;
          }
          const v = net.sig[nd.in0];
          const guess = this.hist[d].extrapolate(tau);
          // tolerance relative to the signal's range so far (as the integrator's own error control)
          if (Math.abs(v - guess) > s.atol + s.rtol * Math.max(Math.abs(v), this.hist[d].maxAbs)) {
            for (let i = 0; i < n; i++) this.restart[i] = dense(i, xold);
            this.eventT = xold;
            this.eventGuard = -1;
            this.safeUntil = xold + 50 * this.tMin;
            this.reached = xold;
            return false;
          }
        }
      }
    }
    // sample the step at the Lobatto nodes: guards (mode switches) and dead-time histories
    let fired = false;
    let jFired = 0;
    if (hasGuards || hasDelays) {
      let gLast = this.gPrev;
      const dwellUntil = modes.dwellUntil;
      for (let j = 1; j <= DEGREE && !fired; j++) {
        const tau = j === DEGREE ? xnew : xold + NODES[j] * h;
        for (let i = 0; i < n; i++) xs[i] = y[i];
        if (j < DEGREE) this.fillDense(dense, tau);
        if (hasGuards) {
          const g = net.computeGuards(tau, xs);
          const gs = net.guardScale;
          if (tau < dwellUntil) {
            // just after repeated switches at one instant: hold the modes for a short dwell (see loop.ts)
            for (let i = 0; i < ng; i++) if (g[i] < 0) g[i] = 0;
          } else for (let i = 0; i < ng; i++) if (g[i] < -GUARD_TOL * gs[i] && gLast[i] >= -GUARD_TOL * gs[i]) fired = true;
          if (fired) {
            jFired = j;
            break;
          }
          this.gStep.set(g);
          gLast = this.gStep;
          modes.updatePeaks(net.sig);
        } else net.evalNet(tau, xs);
        if (hasDelays) for (let d = 0; d < delayNodes.length; d++) this.samples[d][j] = net.sig[delayNodes[d].in0];
      }
      if (fired) {
        // the earliest root among the guards that crossed between the last two samples
        const a = jFired === 1 ? xold : xold + NODES[jFired - 1] * h;
        const b = jFired === DEGREE ? xnew : xold + NODES[jFired] * h;
        const ga = Float64Array.from(jFired === 1 ? this.gPrev : this.gStep);
        const gb = Float64Array.from(net.guards);
        const gs = Float64Array.from(net.guardScale);
        let te = Infinity;
        let which = -1;
        for (let i = 0; i < ng; i++) {
          const tol = GUARD_TOL * gs[i];
          if (gb[i] < -tol && ga[i] >= -tol) {
            // the root of g itself when the bracket allows it, else where g = −tol (a round-off away)
            const shift = ga[i] >= 0 ? 0 : tol;
            const r = this.findRoot(dense, i, shift, a, ga[i] + shift, b, gb[i] + shift);
            if (r < te) {
              te = r;
              which = i;
            }
          }
        }
        if (hasDelays) {
          this.sampleDelays(dense, y, xold, te);
          this.pushPieces(xold, te);
        }
        this.recordGrid(dense, y, xnew, te, false);
        for (let i = 0; i < n; i++) this.restart[i] = dense(i, te);
        this.eventT = te;
        this.eventGuard = which;
        this.reached = te;
        return false;
      }
      if (hasGuards) this.gPrev.set(this.gStep);
      if (hasDelays) this.pushPieces(xold, xnew);
    }
    this.recordGrid(dense, y, xnew, xnew, xnew < this.segEnd - 1e-12 * Math.max(1, this.segEnd));
    this.reached = xnew;
    budget.reached = xnew;
    for (let i = 0; i < n; i++) {
      if (Math.abs(y[i]) > s.bound) {
        budget.stop(
          'diverged',
          `the run diverged at t = ${fmt(xnew)} s: a state of block ${this.rs.blockId(net.stateOwner[i])} reached ${fmt(y[i])}, beyond the bound ±${fmt(s.bound)}`,
        );
        return false;
      }
    }
    if (this.accepted >= s.maxSteps) {
      budget.stop('budget', `the step budget of ${s.maxSteps} steps ran out at t = ${fmt(xnew)} s`);
      return false;
    }
    if ((this.accepted & 7) === 0 && budget.check(xnew)) return false;
    if (this.accepted >= 256 && slot === 0) {
      const hAvg = this.hSum / 64;
      const need = (s.until - xnew) / hAvg;
      // step size collapsed far below what the segment allows, and the budget would not reach the end (or the collapse is extreme)
      if (
        (need > s.maxSteps - this.steps - this.accepted && hAvg < 1e-3 * this.hCap) ||
        (this.accepted >= 1024 && hAvg < 1e-5 * this.hCap)
      ) {
        budget.stop(
          'stiff',
          `the step size collapsed to about ${fmt(hAvg)} s at t = ${fmt(xnew)} s (about ${fmt(need)} more steps needed, ` +
            `budget ${s.maxSteps}): the diagram looks stiff (time constants far apart); lengthen the fastest time constant or shorten the run`,
        );
        return false;
      }
    }
    return true;
  }
}
