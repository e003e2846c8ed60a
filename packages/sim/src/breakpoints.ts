import { nextSourceEdge } from './ops/source-wave.ts';
import type { SimNode } from './ops/node.ts';

/** How many times a discontinuity is carried forward through a dead time (t + T, t + 2T, …). */
export const MAX_PROPAGATION = 4;

/** Two breakpoints closer than this (relative) are one. */
const tolAt = (t: number) => 1e-12 * Math.max(1, Math.abs(t));

/**
 * Where segments must end: source edges (generated lazily from each waveform, so a pulse train
 * of any length has no cap) and discontinuities carried forward through dead times (the method
 * of steps; each carries the number of dead times it has passed through). Nothing here limits
 * the count: a run with very many edges ends on its step or time budget, with a message.
 */
export class Breakpoints {
  private readonly edge: Float64Array;
  private heapT: number[] = [];
  private heapL: number[] = [];

  private readonly instant: Float64Array;

  constructor(
    private readonly sources: readonly SimNode[],
    private readonly delays: readonly number[],
    private readonly until: number,
    /** Sampled nodes: their sample and application instants, generated one at a time. */
    private readonly samplers: readonly SimNode[] = [],
  ) {
    this.edge = new Float64Array(sources.length).fill(-Infinity);
    this.instant = new Float64Array(samplers.length).fill(-Infinity);
  }

  /** The first breakpoint after t (and its level), or null when none lies before the end. */
  next(t: number): { time: number; level: number } | null {
    const tol = tolAt(t);
    let edge = Infinity;
    for (let i = 0; i < this.sources.length; i++) {
      if (!(this.edge[i] > t + tol)) this.edge[i] = nextSourceEdge(this.sources[i].src!, t, tol);
      if (this.edge[i] < edge) edge = this.edge[i];
    }
    for (let i = 0; i < this.samplers.length; i++) {
      if (!(this.instant[i] > t + tol)) this.instant[i] = this.samplers[i].smp!.nextAfter(t + tol);
      if (this.instant[i] < edge) edge = this.instant[i];
    }
    while (this.heapT.length > 0 && !(this.heapT[0] > t + tol)) this.pop();
    let best = edge;
    if (this.heapT.length > 0 && this.heapT[0] < best) best = this.heapT[0];
    if (!(best < this.until - tolAt(this.until))) return null;
    // entries that coincide (a source edge, several carried forward) are one: the lowest level wins
    const near = tolAt(best);
    let level = Math.abs(edge - best) <= near ? 0 : Infinity;
    while (this.heapT.length > 0 && this.heapT[0] <= best + near) {
      level = Math.min(level, this.heapL[0]);
      this.pop();
    }
    if (level > 0) this.push(best, level); // kept until passed (a source edge is found again from its waveform)
    return { time: best, level };
  }

  /** A sampled node scheduled an output: its next instant is found again. */
  refreshSamplers(): void {
    this.instant.fill(-Infinity);
  }

  /** A discontinuity at t of `level` passes through every dead time: t + T at level + 1. */
  propagate(t: number, level: number): void {
    if (level >= MAX_PROPAGATION) return;
    for (const T of this.delays) {
      const b = t + T;
      if (b > 0 && b < this.until) this.push(b, level + 1);
    }
  }

  private push(t: number, level: number): void {
    const T = this.heapT;
    const L = this.heapL;
    let i = T.length;
    T.push(t);
    L.push(level);
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (T[p] < T[i] || (T[p] === T[i] && L[p] <= L[i])) break;
      [T[p], T[i]] = [T[i], T[p]];
      [L[p], L[i]] = [L[i], L[p]];
      i = p;
    }
  }

  private pop(): void {
    const T = this.heapT;
    const L = this.heapL;
    const lastT = T.pop()!;
    const lastL = L.pop()!;
    if (T.length === 0) return;
    T[0] = lastT;
    L[0] = lastL;
    let i = 0;
    for (;;) {
      const a = 2 * i + 1;
      const b = a + 1;
      let m = i;
      if (a < T.length && (T[a] < T[m] || (T[a] === T[m] && L[a] < L[m]))) m = a;
      if (b < T.length && (T[b] < T[m] || (T[b] === T[m] && L[b] < L[m]))) m = b;
      if (m === i) break;
      [T[m], T[i]] = [T[i], T[m]];
      [L[m], L[i]] = [L[i], L[m]];
      i = m;
    }
  }
}
