import { fmt } from '../options.ts';
import { GUARD_TOL } from '../modes.ts';
import type { RunState, SegmentEngine, SegmentOutcome } from '../run-state.ts';
import { HermiteHistory } from './hermite-history.ts';
import { matvecRect, rowDot } from './dense.ts';
import { type Layout, ModeSystem, type Watch, layoutOf } from './mode-system.ts';
import { TurningPoints } from './turning-points.ts';

/** The quiescence test allows a drift of this fraction of the tolerance (atol + rtol·size) over the jump. */
const QUIET = 1e-2;

/**
 * The exact engine. Within one mode every operation of the catalogue is affine, so between
 * events the state z = [x | 1 | exosystems] moves by ż = M·z exactly: z(t + h) = e^(M·h)·z(t).
 * Steps lie on a lattice h0 = dt·q/p no longer than any dead time (q a power of two: every output
 * time is a lattice point plus a rung of the ladder), so one cached Φ = e^(M·h0) per mode serves
 * almost every step and the output grid costs a row product per point; odd steps
 * (after an event, up to a breakpoint), event location and turning points use the mode's ladder
 * of exponentials (ladder.ts). Sources are exact exosystems; a dead time's output over a step is
 * the degree-5 interpolant of its recorded history (ops/delay.ts), its input is recorded as
 * quintic Hermite pieces from exact values and derivatives (hermite-history.ts).
 *
 * Guards are rows times z: a crossing is seen at the step end, or — for a guard whose slopes
 * could carry it to zero within the step — at the mid-step point or in a dip of the cubic
 * through the exact values and slopes; it is located by safeguarded Newton iteration on the
 * exact solution. Quiescence: when every state and dead-time history is at rest (drift over the
 * rest of the segment below 1 % of the tolerance) and the sources are constant until the next
 * breakpoint, the run jumps to that breakpoint.
 */
export class ExactEngine implements SegmentEngine {
  readonly name = 'exact' as const;
  private readonly lay: Layout;
  private readonly watch: Watch;
  private readonly systems = new Map<string, ModeSystem>();
  readonly h0: number;
  /** The lattice: h0 = dt·q/p with q a power of two, so every output time is a lattice point plus j·h0/q (a rung of the ladder). */
  private readonly p: number;
  private readonly q: number;
  private readonly hist: HermiteHistory[];
  /** Values, slopes and second derivatives of each dead time's input at the current step start. */
  private readonly hStart: Float64Array;
  /**
   * The step being taken: [start, end, length, segment end]. The per-step helpers read their
   * times from here: V8 boxes every double passed to a call it does not inline, and these run
   * at every step (with two dead times, 10–15 allocations a step once added up).
   */
  private readonly T = new Float64Array(4);
  /** A segment start as the turning points read a step: [ , t, 0]. */
  private readonly atStart = new Float64Array(3);
  /** [t, h, piece] for the exosystems' fill (ops' exoState). */
  private readonly when = new Float64Array(3);
  private readonly z0: Float64Array;
  private readonly z1: Float64Array;
  private readonly zt: Float64Array;
  private readonly zm: Float64Array;
  private readonly x1: Float64Array;
  private readonly out: Float64Array;
  /** [x1 | out] (x1 and out are its views). */
  private readonly stepOut: Float64Array;
  private readonly gridOut: Float64Array;
  private readonly gPrev: Float64Array;
  private readonly pPrev: Float64Array;
  private readonly scale: Float64Array;
  private readonly xMax: Float64Array;
  /** Signal values at their node indices (what the recorder and the actuator figures read). */
  private readonly sigOut: Float64Array;
  private readonly recRows: number[];
  /** Each recorded signal's place among the step-end rows (after oS in `out`). */
  private readonly gridAt: number[];
  private readonly trackRows: number[];
  private readonly turning: TurningPoints;
  /** Row offsets in `out`: dead-time inputs, watched signals; each actuator's place among the watched signals. */
  private readonly oD: number;
  private readonly oS: number;
  private readonly trackAt: number[];
  private steps = 0;
  private jumps = 0;
  private calm = false;
  private hitGuard = -1;
  private hitTime = NaN;
  private dipValue = 0;

  constructor(
    private readonly rs: RunState,
    metricCols: number[],
  ) {
    const { net, s } = rs;
    net.fdStep = 1e-6 * Math.min(1, s.until);
    this.lay = layoutOf(net);
    const N = this.lay.N;
    const ng = net.guards.length;
    const lat = latticeFor(s.dt, ExactEngine.longestStep(s.until, s.dt, rs.built.delays[0] ?? Infinity, ng > 0));
    this.p = lat.p;
    this.q = lat.q;
    this.h0 = lat.h0;
    const pieces = Math.min(s.until / this.h0, s.maxSteps) + 64;
    this.hist = net.delayNodes.map((nd) => {
      const h = new HermiteHistory(pieces);
      nd.hist = h;
      return h;
    });
    this.hStart = new Float64Array(3 * this.hist.length);
    // every step end reads the probes whose figures are asked for and the actuators' outputs;
    // their turning points are located (peak figures, peak effort)
    this.trackRows = rs.modes.trackers.map((tr) => tr.node.self);
    const turningRows = [...new Set([...metricCols.map((c) => rs.rec.sigIdx[c]), ...this.trackRows])];
    this.trackAt = this.trackRows.map((r) => turningRows.indexOf(r));
    this.recRows = [...new Set(rs.rec.sigIdx)];
    // the recorded signals are read at every step end too (after the turning rows), so a grid
    // point that is a step end costs no product of its own
    const stepRows = [...turningRows, ...this.recRows.filter((r) => !turningRows.includes(r))];
    this.gridAt = this.recRows.map((r) => stepRows.indexOf(r));
    this.watch = { step: stepRows, grid: this.recRows };
    this.oD = 2 * ng;
    this.oS = 2 * ng + 3 * this.hist.length;

    this.z0 = new Float64Array(N);
    this.z1 = new Float64Array(N);
    this.zt = new Float64Array(N);
    this.zm = new Float64Array(N);
    // a regular step's one product fills both: the end state's n entries, then the step rows
    this.stepOut = new Float64Array(this.lay.n + this.oS + stepRows.length);
    this.x1 = this.stepOut.subarray(0, this.lay.n);
    this.out = this.stepOut.subarray(this.lay.n);
    this.gridOut = new Float64Array(this.recRows.length);
    this.gPrev = new Float64Array(ng);
    this.pPrev = new Float64Array(ng);
    this.scale = new Float64Array(ng);
    this.xMax = new Float64Array(net.nStates);
    this.sigOut = new Float64Array(net.nodes.length);
    this.turning = new TurningPoints(turningRows, N);
  }

  /** The number of exact steps a run needs without quiescence (for the engine choice). */
  static plannedSteps(until: number, dt: number, tMin: number, guards: boolean): number {
    return until / latticeFor(dt, ExactEngine.longestStep(until, dt, tMin, guards)).h0;
  }

  /**
   * The longest step. With dead times: no longer than the shortest of them (its window must be
   * recorded) nor than the output step (the windows' interpolation error, of order h⁶, then
   * shrinks with the output step the user asks for). Without: up to four output steps (the
   * solution is exact; turning points are sampled at step ends). With guards, also at most 1/50
   * of the run (event detection looks at the ends and the middle of a step).
   */
  static longestStep(until: number, dt: number, tMin: number, guards: boolean): number {
    return Math.min(tMin < Infinity ? Math.min(dt, tMin) : 4 * dt, guards ? until / 50 : Infinity);
  }

  stats() {
    return {
      steps: this.steps,
      accepted: this.steps,
      rejected: 0,
      exact: { modes: this.systems.size, exponentials: this.systems.size, jumps: this.jumps },
    };
  }

  extrema(col: number, dir: number): { time: number; value: number }[] {
    return this.turning.located(this.rs.rec.sigIdx[col], this.lay.N, dir);
  }

  /** Largest |output| of an actuator node at its located turning points (0 when none lies beyond the samples). */
  locatedPeak(node: number): number {
    let peak = 0;
    for (const p of this.turning.located(node, this.lay.N, 0)) peak = Math.max(peak, Math.abs(p.value));
    return peak;
  }

  segmentEnd(_t: number, tEnd: number): number {
    return tEnd;
  }

  private system(): ModeSystem {
    const key = this.rs.modes.key();
    let sys = this.systems.get(key);
    if (!sys) {
      sys = new ModeSystem(this.rs.net, this.lay, this.h0, this.watch, Math.round(Math.log2(this.q)));
      this.systems.set(key, sys);
    }
    return sys;
  }

  /** Fills the exosystem blocks of z for a step [t, t + h] (t and h in `when`, which this completes). */
  private fillExo(z: Float64Array): void {
    const net = this.rs.net;
    const ex = net.exoNodes;
    const when = this.when;
    when[2] = net.piece;
    for (let j = 0; j < ex.length; j++) ex[j].op.exoState(ex[j], when, z, this.lay.at[j]);
  }

  /** Time of lattice point k (a grid time g·dt exactly when it is one). */
  private lattice(k: number): number {
    const kq = k * this.q;
    return kq % this.p === 0 ? (kq / this.p) * this.rs.s.dt : k * this.h0;
  }

  /**
   * Records the output grid in (tc, tn] (the step in T) — but not at the segment end, which the loop records —
   * from the step's start state z0 (a regular step from lattice point k − 1: the grid rows times
   * Φ, or times the rung product for an offset j·h0/q) or its end state z1 (an odd step).
   */
  private recordGrid(sys: ModeSystem, k: number, regular: boolean): void {
    const { rec, s } = this.rs;
    const tc = this.T[0];
    const tn = this.T[1];
    const tEnd = this.T[3];
    const N = this.lay.N;
    const dt = s.dt;
    const tol = 1e-12 * Math.max(1, Math.abs(tn));
    const stop = Math.min(tn + tol, tEnd - 1e-12 * Math.max(1, Math.abs(tEnd)));
    const rows = this.recRows.length;
    if (regular && this.p === 1 && this.q === 1) {
      // the lattice is the grid: the one point is the step end, already read with the step rows
      if (tn < stop && rec.isNew(tn)) {
        for (let r = 0; r < rows; r++) this.sigOut[this.recRows[r]] = this.out[this.oS + this.gridAt[r]];
        rec.record(tn, this.sigOut);
      }
      return;
    }
    for (let g = Math.floor(tc / dt) + 1; g * dt < stop; g++) {
      const tg = g * dt;
      if (!rec.isNew(tg)) continue;
      const atEnd = regular ? g * this.p - (k - 1) * this.q >= this.q : Math.abs(tg - tn) <= tol;
      if (atEnd) for (let r = 0; r < rows; r++) this.gridOut[r] = this.out[this.oS + this.gridAt[r]];
      else if (regular) matvecRect(sys.gridRowsAt(g * this.p - (k - 1) * this.q, this.q), rows, N, this.z0, this.gridOut);
      else {
        sys.ladder.apply(tg - tc, this.z0, this.zt);
        matvecRect(sys.Rg, rows, N, this.zt, this.gridOut);
      }
      for (let r = 0; r < rows; r++) this.sigOut[this.recRows[r]] = this.gridOut[r];
      rec.record(tg, this.sigOut);
    }
  }

  integrate(t: number, tEnd: number, g0: Float64Array): SegmentOutcome {
    const { net, s, budget, x } = this.rs;
    const lay = this.lay;
    const N = lay.N;
    const n = lay.n;
    const ng = net.guards.length;
    const out = this.out;
    // the loop evaluated the guards at t: their scales are the round-off allowance in this segment
    this.scale.set(net.guardScale);
    this.gPrev.set(g0);
    const sys = this.system();
    const z0 = this.z0;
    z0.fill(0);
    z0.set(x);
    z0[lay.one] = 1;
    const endTol = 1e-12 * Math.max(1, Math.abs(tEnd));
    let tc = t;
    let first = true;
    const T = this.T;
    T[3] = tEnd;
    this.turning.segmentStart();
    while (tc < tEnd - endTol) {
      if (this.steps >= s.maxSteps && budget.stepsSpent(tc)) return { end: tc, restart: false, guard: -1 };
      let k = Math.floor((tc / this.h0) * (1 + 1e-12)) + 1;
      let tn = this.lattice(k);
      if (tn - tc < 1e-9 * this.h0) tn = this.lattice(++k); // tc is a lattice point up to round-off
      if (tn > tEnd - endTol) tn = tEnd;
      const h = tn - tc;
      const regular = Math.abs(h - this.h0) <= 1e-10 * this.h0;

      if (this.calm && this.quiet(sys, tc, tEnd)) {
        tc = this.jump(sys, tc, tEnd);
        if (budget.stopped || budget.check(tc)) return { end: tc, restart: false, guard: -1 };
        break;
      }

      // a regular step passes h0 itself (tn − tc differs from it in the last bits from step to step)
      this.when[0] = tc;
      this.when[1] = regular ? this.h0 : h;
      this.fillExo(z0);
      T[0] = tc;
      T[1] = tn;
      T[2] = h;
      if (first) {
        // values at the segment start: guard slopes, dead-time inputs (right limits), samples
        matvecRect(sys.R, sys.rows, N, z0, out);
        for (let i = 0; i < ng; i++) this.pPrev[i] = out[ng + i];
        for (let i = 0; i < this.hStart.length; i++) this.hStart[i] = out[this.oD + i];
        this.atStart[1] = tc;
        this.turning.sample(out, this.oS, this.atStart, false);
        first = false;
      }
      this.turning.stepStart(sys, z0, T);
      let xe = this.x1;
      if (regular) {
        matvecRect(sys.Step, n + sys.rows, N, z0, this.stepOut);
      } else {
        sys.ladder.apply(h, z0, this.z1);
        matvecRect(sys.R, sys.rows, N, this.z1, out);
        xe = this.z1;
      }
      this.steps++;
      budget.steps = this.steps;
      for (let i = 0; i < n; i++) {
        if (!Number.isFinite(xe[i])) {
          budget.reached = tc;
          budget.stop(
            'diverged',
            `the run diverged at t = ${fmt(tc)} s: a state of block ${this.rs.blockId(net.stateOwner[i])} is no longer finite`,
          );
          return { end: tc, restart: false, guard: -1 };
        }
      }

      if (ng > 0) {
        this.crossing(sys, regular);
        if (this.hitGuard >= 0) {
          const te = this.hitTime;
          const ze = this.zt;
          sys.ladder.apply(te - tc, z0, ze);
          matvecRect(sys.R, sys.rows, N, ze, out);
          T[1] = te;
          T[2] = te - tc;
          this.pushHistories();
          this.afterStep(true);
          for (let i = 0; i < n; i++) x[i] = ze[i];
          budget.reached = te;
          return { end: te, restart: true, guard: this.hitGuard };
        }
      }

      this.pushHistories();
      this.recordGrid(sys, k, regular);
      this.afterStep(tn >= tEnd - endTol);
      let calm = true;
      for (let i = 0; i < n; i++) {
        const v = xe[i];
        const a = Math.abs(v);
        if (a > s.bound) {
          budget.reached = tn;
          budget.stop(
            'diverged',
            `the run diverged at t = ${fmt(tn)} s: a state of block ${this.rs.blockId(net.stateOwner[i])} reached ${fmt(v)}, beyond the bound ±${fmt(s.bound)}`,
          );
          return { end: tn, restart: false, guard: -1 };
        }
        if (a > this.xMax[i]) this.xMax[i] = a;
        if (Math.abs(v - z0[i]) > QUIET * (s.atol + s.rtol * this.xMax[i])) calm = false;
        z0[i] = v;
      }
      this.calm = calm;
      tc = tn;
      budget.reached = tn;
      // cancel, wall time and progress every 64 steps (0.1–0.2 ms of work): the clock read is
      // itself a call into the browser in a worker, and every 8 steps it was 5 % of a run there
      if ((this.steps & 63) === 0 && budget.check(tn)) return { end: tn, restart: false, guard: -1 };
    }
    for (let i = 0; i < n; i++) x[i] = z0[i];
    // the mode at the next restart may differ: judge calm afresh there
    this.calm = false;
    return { end: tEnd, restart: false, guard: -1 };
  }

  /** Actuator peaks and turning-point samples from `out` at the end of the step in T (from z0). */
  private afterStep(last: boolean): void {
    const tr = this.trackRows;
    if (tr.length > 0) {
      for (let j = 0; j < tr.length; j++) this.sigOut[tr[j]] = this.out[this.oS + this.trackAt[j]];
      this.rs.modes.updatePeaks(this.sigOut);
    }
    this.turning.sample(this.out, this.oS, this.T, last);
  }

  /** Appends the step in T to every dead time's history: the start values kept from the last step, the end values from `out`. */
  private pushHistories(): void {
    const s = this.rs.s;
    const out = this.out;
    const hs = this.hStart;
    for (let d = 0; d < this.hist.length; d++) {
      const o = this.oD + 3 * d;
      const h = this.hist[d];
      h.quietTol = QUIET * (s.atol + s.rtol * h.maxAbs);
      h.pushFrom(this.T, 0, hs, 3 * d, out, o);
      hs[3 * d] = out[o];
      hs[3 * d + 1] = out[o + 1];
      hs[3 * d + 2] = out[o + 2];
    }
  }

  /**
   * The earliest guard crossing in the step in T from z0 (at tc; values gPrev, slopes pPrev) to its
   * end (values and slopes in `out`): at the end; or, for a guard near enough to zero that its
   * slopes could carry it there within the step, at the mid-step point of a regular step or
   * inside a dip of the cubic through the exact values and slopes. Located on the exact
   * solution; sets hitGuard/hitTime.
   */
  private crossing(sys: ModeSystem, regular: boolean): void {
    const tc = this.T[0];
    const h = this.T[2];
    const N = this.lay.N;
    const ng = this.gPrev.length;
    const out = this.out;
    const dwell = tc < this.rs.modes.dwellUntil;
    let best = Infinity;
    let which = -1;
    let haveMid = false;
    for (let i = 0; i < ng; i++) {
      if (!sys.active[i]) continue;
      const tol = GUARD_TOL * this.scale[i];
      const ga = this.gPrev[i];
      const pa = this.pPrev[i];
      const g1 = out[i];
      const p1 = out[ng + i];
      this.gPrev[i] = dwell && g1 < 0 ? 0 : g1;
      this.pPrev[i] = p1;
      if (dwell || ga < -tol) continue;
      let bracket: number;
      let gb = 0;
      if (g1 < -tol) {
        bracket = h;
        gb = g1;
      } else {
        const lo = Math.min(ga, g1);
        // far from zero: the cubic through the ends' values and slopes then stays above 23/27 of
        // the smaller value (its slope terms are at most 4/27·h·|p| each), so no dip is possible
        if ((Math.abs(pa) + Math.abs(p1)) * h <= lo) continue;
        if (regular) {
          // the mid-step point, then dips of the cubic in each half
          if (!haveMid) {
            matvecRect(sys.Half, N, N, this.z0, this.zm);
            haveMid = true;
          }
          const gm = rowDot(sys.G, i, N, this.zm);
          if (gm < -tol) {
            bracket = 0.5 * h;
            gb = gm;
          } else {
            const pm = rowDot(sys.Gp, i, N, this.zm);
            bracket = this.dip(sys, i, 0, ga, pa, 0.5 * h, gm, pm, tol);
            if (bracket < 0) bracket = this.dip(sys, i, 0.5 * h, gm, pm, h, g1, p1, tol);
            if (bracket >= 0) gb = this.dipValue;
          }
        } else {
          bracket = this.dip(sys, i, 0, ga, pa, h, g1, p1, tol);
          if (bracket >= 0) gb = this.dipValue;
        }
      }
      if (bracket >= 0) {
        const shift = ga >= 0 ? 0 : tol;
        const r = this.root(sys, i, tc, shift, ga + shift, bracket, gb + shift);
        if (r < best) {
          best = r;
          which = i;
        }
      }
    }
    this.hitGuard = which;
    this.hitTime = best;
  }

  /** g_i on the exact solution at s after the step start. */
  private guardAt(sys: ModeSystem, i: number, s: number): number {
    sys.ladder.apply(s, this.z0, this.zt);
    return rowDot(sys.G, i, this.lay.N, this.zt);
  }

  /**
   * A dip below zero between a and b (offsets from the step start) where the guard is above −tol
   * at both ends: the cubic through the values and slopes has an interior minimum below a quarter
   * of the smaller end value; the guard is then evaluated exactly there. Returns the offset of a
   * point below −tol (its value in dipValue), or −1.
   */
  private dip(sys: ModeSystem, i: number, a: number, ga: number, pa: number, b: number, gb: number, pb: number, tol: number): number {
    if (!(pa < 0 && pb > 0)) return -1;
    const sig = cubicArgMin(b - a, ga, pa, gb, pb);
    if (!(sig > 0 && sig < 1)) return -1;
    if (cubicAt(b - a, ga, pa, gb, pb, sig) > 0.25 * Math.min(ga, gb)) return -1;
    const s = a + sig * (b - a);
    this.dipValue = this.guardAt(sys, i, s);
    return this.dipValue < -tol ? s : -1;
  }

  /**
   * The root of g_i + shift in (0, b] after the step start tc, from values fa ≥ 0 at 0 and fb < 0
   * at b: Newton steps with the exact slope, kept inside the bracket (bisection otherwise), each
   * nudged by the tolerance towards the far side once it is that close so that the root ends up
   * bracketed. Returns the bracket's right end (where the new mode is valid), to 1e-13 relative.
   */
  private root(sys: ModeSystem, i: number, tc: number, shift: number, fa: number, b: number, fb: number): number {
    const N = this.lay.N;
    const zt = this.zt;
    let a = 0;
    let s = fb !== fa ? (fa * b) / (fa - fb) : 0.5 * b;
    const tEps = 1e-13 * Math.max(1, Math.abs(tc + b));
    for (let it = 0; it < 100 && b - a > tEps; it++) {
      if (!(s > a && s < b)) s = 0.5 * (a + b);
      sys.ladder.apply(s, this.z0, zt);
      const g = rowDot(sys.G, i, N, zt) + shift;
      if (g < 0) b = s;
      else a = s;
      if (b - a <= tEps) break;
      const p = rowDot(sys.Gp, i, N, zt);
      let next = p !== 0 ? s - g / p : NaN;
      if (Math.abs(next - s) < tEps) next += g < 0 ? -tEps : tEps;
      s = next > a && next < b ? next : 0.5 * (a + b);
    }
    return tc + b;
  }

  /**
   * At rest: every source constant until the segment end, every dead time's history still for a
   * whole dead time, and every state's drift |ẋ|·(tEnd − t) within 1 % of its tolerance.
   */
  private quiet(sys: ModeSystem, tc: number, tEnd: number): boolean {
    const { net, s } = this.rs;
    const H = tEnd - tc;
    if (H < 2 * this.h0) return false;
    const ex = net.exoNodes;
    for (let j = 0; j < ex.length; j++) if (!ex[j].op.steady(ex[j], tc, net.piece)) return false;
    const z0 = this.z0;
    this.when[0] = tc;
    this.when[1] = this.h0;
    this.fillExo(z0);
    const N = this.lay.N;
    for (let i = 0; i < this.lay.n; i++) {
      const dx = rowDot(sys.M, i, N, z0);
      if (Math.abs(dx) * H > QUIET * (s.atol + s.rtol * this.xMax[i])) return false;
    }
    return true;
  }

  /**
   * Holds every signal from tc to tEnd: grid points recorded, histories extended with constants.
   * Returns where it got to: tEnd, or earlier when the wall-time budget or a cancel stops the
   * recording (a long quiet stretch on a fine grid is millions of rows).
   */
  private jump(sys: ModeSystem, tc: number, tEnd: number): number {
    const { rec, s } = this.rs;
    const N = this.lay.N;
    const z0 = this.z0;
    matvecRect(sys.Rg, this.recRows.length, N, z0, this.gridOut);
    for (let j = 0; j < this.recRows.length; j++) this.sigOut[this.recRows[j]] = this.gridOut[j];
    const endTol = 1e-12 * Math.max(1, Math.abs(tEnd));
    let end = tEnd;
    for (let g = Math.floor(tc / s.dt) + 1, n = 1; g * s.dt < tEnd - endTol; g++, n++) {
      if (rec.isNew(g * s.dt)) rec.record(g * s.dt, this.sigOut);
      if ((n & 0xffff) === 0 && this.rs.budget.check(g * s.dt)) {
        end = g * s.dt;
        break;
      }
    }
    matvecRect(sys.R, sys.rows, N, z0, this.out);
    for (let d = 0; d < this.hist.length; d++) {
      const v = this.out[this.oD + 3 * d];
      this.hist[d].pushConstant(tc, end, v);
      this.hStart[3 * d] = v;
      this.hStart[3 * d + 1] = 0;
      this.hStart[3 * d + 2] = 0;
    }
    for (let i = 0; i < this.lay.n; i++) this.rs.x[i] = z0[i];
    this.jumps++;
    this.rs.budget.reached = end;
    return end;
  }
}

/**
 * The step lattice for output step dt and longest allowed step hmax: h0 = dt·q/p ≤ hmax, as long
 * as possible with q ∈ {1, 2, 4, 8, 16} — output times then fall on a lattice point plus a dyadic
 * fraction j/q of a step, whose exponential is a product of ladder rungs.
 */
export function latticeFor(dt: number, hmax: number): { p: number; q: number; h0: number } {
  let best = { p: 1, q: 1, h0: 0 };
  for (let q = 1; q <= 16; q *= 2) {
    const p = Math.max(1, Math.ceil((q * dt) / hmax - 1e-9));
    const h0 = (dt * q) / p;
    if (h0 > best.h0 * (1 + 1e-12)) best = { p, q, h0 };
  }
  return best;
}

/** The cubic on σ ∈ [0, 1] with values ga, gb and slopes pa, pb (per unit time) at the ends of a step of length h: c0 + c1σ + c2σ² + c3σ³. */
function cubicAt(h: number, ga: number, pa: number, gb: number, pb: number, sig: number): number {
  const c1 = h * pa;
  const c2 = -3 * ga - 2 * h * pa + 3 * gb - h * pb;
  const c3 = 2 * ga + h * pa - 2 * gb + h * pb;
  return ga + sig * (c1 + sig * (c2 + sig * c3));
}

/** Where that cubic has its interior minimum (NaN if none). */
function cubicArgMin(h: number, ga: number, pa: number, gb: number, pb: number): number {
  const c1 = h * pa;
  const c2 = -3 * ga - 2 * h * pa + 3 * gb - h * pb;
  const c3 = 2 * ga + h * pa - 2 * gb + h * pb;
  // c'(σ) = c1 + 2c2σ + 3c3σ² = 0 with c'' = 2c2 + 6c3σ > 0
  if (Math.abs(c3) < 1e-300) return c2 > 0 ? -c1 / (2 * c2) : NaN;
  const disc = c2 * c2 - 3 * c3 * c1;
  if (disc < 0) return NaN;
  const r = Math.sqrt(disc);
  const s1 = (-c2 + r) / (3 * c3);
  const s2 = (-c2 - r) / (3 * c3);
  return 2 * c2 + 6 * c3 * s1 > 0 ? s1 : s2;
}
