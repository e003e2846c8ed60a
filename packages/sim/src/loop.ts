import { fmt } from './options.ts';
import type { RunState, SegmentEngine } from './run-state.ts';
import { sampleInstant } from './ops/sampled.ts';

/**
 * The segment loop, the same for both engines: the run is split into segments at breakpoints
 * (source edges, edges carried forward through dead times) and at mode switches. At each
 * segment start the modes are chosen from the signals, the point is recorded, and the engine
 * integrates with the modes frozen; a guard crossing ends the segment early and the run
 * restarts there in the new mode.
 */
export function runSegments(rs: RunState, eng: SegmentEngine): void {
  const { net, budget, modes, rec, bps, s, x } = rs;
  const samplers = rs.built.samplers;
  const ng = net.guards.length;
  const g0 = new Float64Array(ng);
  let t = 0;
  let zeroProgress = 0;
  let startIsBreak = false;
  bps.propagate(0, 0);
  while (!budget.stopped) {
    let bp = bps.next(t);
    if (samplers.length) {
      // Sampled blocks read their inputs and put out their held values at their instants (the
      // sources read on the side of t the segment lies on); an output now due later (a
      // computation delay) is a breakpoint found by asking again.
      net.piece = 0.5 * (t + (bp ? bp.time : s.until));
      net.evalNet(t, x);
      if (sampleInstant(samplers, t, net.sig, () => net.evalNet(t, x)).scheduled) {
        bps.refreshSamplers();
        bp = bps.next(t);
      }
    }
    let tEnd = bp ? bp.time : s.until;
    const cut = eng.segmentEnd(t, tEnd);
    const atBreak = !(cut < tEnd);
    if (!atBreak) tEnd = cut;
    net.piece = 0.5 * (t + tEnd);
    rs.segments++;
    if (ng > 0) {
      net.evalNet(t, x);
      modes.jumps(t, x);
      modes.select(t, x);
      const g = net.computeGuards(t, x);
      // a guard a hair below zero right after a switch counts as on the boundary
      for (let i = 0; i < ng; i++) g0[i] = g[i] < 0 && g[i] > -1e-6 ? 0 : g[i];
    } else net.evalNet(t, x);
    if (startIsBreak && t > 0) rec.breaks.push(t);
    if (rec.isNew(t)) {
      rec.record(t, net.sig);
      modes.updatePeaks(net.sig);
    }
    if (budget.check(t)) break;

    const out = eng.integrate(t, tEnd, g0);
    if (budget.stopped) break;
    if (out.restart) {
      const te = out.end;
      if (out.guard >= 0) zeroProgress = te - t <= 1e-12 * Math.max(1, t) ? zeroProgress + 1 : 0;
      // A signal grazing its limit (slope equal to a rate limit, a peak touching a saturation)
      // can make modes flip back and forth on round-off at one instant. After a few such
      // switches the modes are held for a dwell of 1e-6 of the run, long enough for the guard
      // to grow above round-off; a rate limiter holds its slewing mode (slope = the limit).
      if (zeroProgress >= 3) modes.dwellUntil = te + 1e-6 * s.until;
      t = te;
      budget.reached = t;
      net.evalNet(t, x);
      modes.sync(x);
      startIsBreak = out.guard >= 0;
      if (out.guard >= 0) {
        modes.fire(out.guard, t, x);
        bps.propagate(t, 0);
      }
      if (zeroProgress > 40 || modes.events.length > 200000) {
        budget.stop('budget', `mode switches repeat at t = ${fmt(t)} s without progress (chattering): the run cannot continue`);
        break;
      }
      continue;
    }
    t = tEnd;
    budget.reached = t;
    net.evalNet(t, x);
    modes.sync(x);
    if (t >= s.until) {
      if (rec.isNew(t)) {
        rec.record(t, net.sig);
        modes.updatePeaks(net.sig);
      }
      break;
    }
    startIsBreak = atBreak;
    if (atBreak && bp) bps.propagate(t, bp.level);
  }
}
