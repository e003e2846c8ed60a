/**
 * The recorded traces: the uniform output grid k·dt plus every breakpoint and event time,
 * strictly increasing. Values are read from a signal vector at the recorded nodes' indices
 * (the exact engine fills only those entries).
 */
export class Recorder {
  readonly time: number[];
  readonly cols: number[][];
  /** Points recorded (the arrays are made at the expected size and cut to this by `finish`). */
  private count = 0;
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
    /** Points expected (the grid of the run): arrays of this size are made at once instead of grown by doubling. */
    expected = 0,
  ) {
    const size = Math.max(0, Math.min(1 << 16, Math.ceil(expected)));
    this.time = filled(size);
    this.cols = keys.map(() => filled(size));
  }

  record(tau: number, sig: ArrayLike<number>): void {
    const n = this.count;
    const cols = this.cols;
    const idx = this.sigIdx;
    if (n < this.time.length) {
      this.time[n] = tau;
      for (let i = 0; i < cols.length; i++) cols[i][n] = sig[idx[i]];
    } else {
      this.time.push(tau);
      for (let i = 0; i < cols.length; i++) cols[i].push(sig[idx[i]]);
    }
    this.count = n + 1;
    this.lastRec = tau;
  }

  /** Cuts the arrays to the points recorded (call once the run has ended). */
  finish(): void {
    this.time.length = this.count;
    for (const c of this.cols) c.length = this.count;
  }

  /** True when tau is after the last recorded time by more than round-off. */
  isNew(tau: number): boolean {
    return tau > this.lastRec + 1e-12 * Math.max(1, Math.abs(tau)) || this.count === 0;
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

/** An array of doubles of the given size, allocated once (filled with a double, so its elements are stored unboxed). */
function filled(size: number): number[] {
  return new Array<number>(size).fill(0.5);
}
