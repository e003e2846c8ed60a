import type { Network } from './network.ts';
import type { ModeSink, SimNode } from './ops/node.ts';
import type { ActuatorFigures, SimEvent } from './types.ts';

/** Guards below −GUARD_TOL·(1 + |signal|) fire; nearer zero is round-off of a signal on its boundary. */
export const GUARD_TOL = 1e-11;

interface Tracker {
  node: SimNode;
  since: number;
  total: number;
  hits: number;
  peak: number;
}

/**
 * The modes of the nonlinear nodes: their choice at a restart, the switch when a guard fires,
 * the events they produce and the actuator figures (time at a limit from the event times, peak
 * effort, limit hits). Shared by both engines.
 */
export class ModeControl implements ModeSink {
  readonly events: SimEvent[] = [];
  readonly trackers: Tracker[] = [];
  /** After repeated switches at one instant the modes are held until this time (see loop.ts). */
  dwellUntil = -Infinity;
  /** Time of the restart being handled. */
  private now = 0;
  private readonly savedMode: Int8Array;
  private readonly savedFrozen: Uint8Array;

  constructor(
    private readonly net: Network,
    private readonly blockId: (block: number) => string,
  ) {
    for (const nd of net.guardNodes) if (nd.op.actuator) this.trackers.push({ node: nd, since: 0, total: 0, hits: 0, peak: 0 });
    this.savedMode = new Int8Array(net.guardNodes.length);
    this.savedFrozen = new Uint8Array(net.guardNodes.length);
  }

  get inDwell(): boolean {
    return this.now < this.dwellUntil;
  }

  /** Peak |output| of each actuator from a signal vector. */
  updatePeaks(sig: ArrayLike<number>): void {
    const tr = this.trackers;
    for (let i = 0; i < tr.length; i++) {
      const v = Math.abs(sig[tr[i].node.self]);
      if (v > tr[i].peak) tr[i].peak = v;
    }
  }

  setMode(nd: SimNode, m: number, at: number): void {
    const old = nd.mode;
    if (m === old) return;
    nd.mode = m;
    this.events.push({ time: at, kind: nd.op.eventKind(nd, m), block: this.blockId(nd.block) });
    const tr = this.trackers.find((x) => x.node === nd);
    if (tr) {
      if (m !== 0) tr.hits++;
      if (old === 0 && m !== 0) tr.since = at;
      if (old !== 0 && m === 0) tr.total += at - tr.since;
    }
    if (m === 0) this.setFrozen(nd, false, at);
  }

  setFrozen(nd: SimNode, f: boolean, at: number): void {
    if (nd.frozen === f) return;
    nd.frozen = f;
    this.events.push({ time: at, kind: f ? 'integration-hold' : 'integration-resume', block: this.blockId(nd.block) });
  }

  /** Chooses every mode from the signals at (at, x), upstream first; ties keep the current mode. Events record only the net change. */
  select(at: number, x: Float64Array): void {
    const net = this.net;
    const gn = net.guardNodes;
    this.now = at;
    gn.forEach((nd, i) => {
      this.savedMode[i] = nd.mode;
      this.savedFrozen[i] = nd.frozen ? 1 : 0;
    });
    for (let iter = 0; iter < gn.length + 2; iter++) {
      net.computeGuards(at, x, true);
      let changed = false;
      for (const nd of gn) if (nd.op.choose(nd, x, net.sig, net.udot, this)) changed = true;
      if (!changed) break;
    }
    gn.forEach((nd, i) => {
      const m = nd.mode;
      const f = nd.frozen;
      nd.mode = this.savedMode[i];
      nd.frozen = this.savedFrozen[i] === 1;
      this.setMode(nd, m, at);
      this.setFrozen(nd, f, at);
    });
  }

  /** At a segment start: input jumps a mode cannot follow (a rate limiter's input stepping). */
  jumps(at: number, x: Float64Array): void {
    this.now = at;
    for (const nd of this.net.guardNodes) this.setMode(nd, nd.op.jump(nd, x, this.net.sig), at);
  }

  /** Applies the switch of guard gi, which crossed zero at `at`. */
  fire(gi: number, at: number, x: Float64Array): void {
    this.now = at;
    for (const nd of this.net.guardNodes) {
      if (gi < nd.go || gi >= nd.go + nd.ng) continue;
      const r = nd.op.fire(nd, gi - nd.go, x, this.net.sig, this);
      this.setMode(nd, r.mode, at);
      this.setFrozen(nd, r.frozen, at);
      return;
    }
  }

  /** States that follow a signal while not integrated (a tracking rate limiter) take its value. */
  sync(x: Float64Array): void {
    for (const nd of this.net.guardNodes) nd.op.sync(nd, x, this.net.sig);
  }

  /** A key of every mode and hold flag (the exact engine caches its matrices per key). */
  key(): string {
    let k = '';
    for (const nd of this.net.guardNodes) k += String.fromCharCode(66 + nd.mode + (nd.frozen ? 3 : 0));
    return k;
  }

  /** The figures of every actuator; `located` adds peaks found between samples (the exact engine's turning points). */
  actuators(reached: number, located?: (node: number) => number): Record<string, ActuatorFigures> {
    const out: Record<string, ActuatorFigures> = {};
    for (const tr of this.trackers) {
      const total = tr.total + (tr.node.mode !== 0 ? reached - tr.since : 0);
      const peak = Math.max(tr.peak, located ? located(tr.node.self) : 0);
      out[this.blockId(tr.node.block)] = { timeInSaturation: total, peakEffort: peak, limitHits: tr.hits };
    }
    return out;
  }
}
