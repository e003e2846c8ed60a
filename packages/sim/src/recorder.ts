/**
 * The recorded traces: the uniform output grid k·dt plus every breakpoint and event time,
 * strictly increasing. Values are read from a signal vector at the recorded nodes' indices
 * (the exact engine fills only those entries).
 */
export class Recorder {
  readonly time: number[] = [];
  readonly cols: number[][];
  /** Last recorded time. */
  lastRec = -Infinity;
  /** Next grid index to record. */
  gridK = 0;
  /** Segment start times after the first (events and breakpoints): where a trace or its slope may jump. */
  readonly breaks: number[] = [];

  constructor(
    readonly keys: readonly string[],
    /** Signal index of each column. */
    readonly sigIdx: Int32Array,
    readonly dt: number,
  ) {
    this.cols = keys.map(() => []);
  }

  record(tau: number, sig: ArrayLike<number>): void {
    this.time.push(tau);
    const cols = this.cols;
    const idx = this.sigIdx;
    for (let i = 0; i < cols.length; i++) cols[i].push(sig[idx[i]]);
    this.lastRec = tau;
  }

  /** True when tau is after the last recorded time by more than round-off. */
  isNew(tau: number): boolean {
    return tau > this.lastRec + 1e-12 * Math.max(1, Math.abs(tau)) || this.time.length === 0;
  }

  /** The next grid time not yet recorded that is after the last record. */
  nextGrid(): number {
    for (;;) {
      const tau = this.gridK * this.dt;
      if (tau > this.lastRec + 1e-12 * Math.max(1, tau)) return tau;
      this.gridK++;
    }
  }
}
