/** Small dense matrix helpers on row-major Float64Arrays with N columns (the exact engine's matrices). */

/**
 * Arrays made together, as views into shared chunks: each typed array over 64 bytes is a
 * separate allocation of its memory in V8, a few microseconds apiece, and a mode's matrices,
 * a ladder's rungs and a run's work vectors are dozens of them (a view costs a tenth of that).
 * The views start zeroed and keep their chunk alive.
 */
export function slab(chunk = 4096): (n: number) => Float64Array {
  let buf = new Float64Array(0);
  let off = 0;
  return (n: number) => {
    if (off + n > buf.length) {
      buf = new Float64Array(Math.max(chunk, n));
      off = 0;
    }
    const v = buf.subarray(off, off + n);
    off += n;
    return v;
  };
}

/** Column indices and scaled values of one row of A's nonzero entries (mulRect's gather; grown as needed). */
let nzCol = new Int32Array(64);
let nzVal = new Float64Array(64);

/**
 * C (rows × N) = f·A (rows × N) · B (N × N); C distinct from A and B. Per row of A its nonzero
 * entries are gathered first (most of a generator's are zero, and a quarter to a half of a
 * ladder rung's), then four entries of C's row are summed at a time in registers over them in
 * order — the same sums as the plain i–k–j loop, which read and wrote C at every product and was
 * three times slower at N = 20, where a mode's making and its ladder are a few dozen of these.
 */
export function mulRect(A: Float64Array, rows: number, B: Float64Array, N: number, C: Float64Array, f = 1): void {
  if (nzCol.length < N) {
    nzCol = new Int32Array(N);
    nzVal = new Float64Array(N);
  }
  const cols = nzCol;
  const vals = nzVal;
  for (let i = 0; i < rows; i++) {
    const ri = i * N;
    let m = 0;
    for (let k = 0; k < N; k++) {
      const a = A[ri + k] * f;
      if (a === 0) continue;
      cols[m] = k * N;
      vals[m++] = a;
    }
    let j = 0;
    for (; j + 3 < N; j += 4) {
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      let s3 = 0;
      for (let q = 0; q < m; q++) {
        const a = vals[q];
        const rk = cols[q] + j;
        s0 += a * B[rk];
        s1 += a * B[rk + 1];
        s2 += a * B[rk + 2];
        s3 += a * B[rk + 3];
      }
      C[ri + j] = s0;
      C[ri + j + 1] = s1;
      C[ri + j + 2] = s2;
      C[ri + j + 3] = s3;
    }
    for (; j < N; j++) {
      let s = 0;
      for (let q = 0; q < m; q++) s += vals[q] * B[cols[q] + j];
      C[ri + j] = s;
    }
  }
}

/**
 * y = A·x for A with `rows` rows of N columns; y distinct from x. The hot loop of every exact
 * step: two rows at a time with two partial sums each, so four independent additions are in
 * flight instead of one chain (about 1.5× faster in V8 at N ≈ 20; the sums are regrouped, so
 * results may differ from the plain loop in the last bit).
 */
export function matvecRect(A: Float64Array, rows: number, N: number, x: ArrayLike<number>, y: Float64Array): void {
  let i = 0;
  for (; i + 1 < rows; i += 2) {
    const o = i * N;
    const p = o + N;
    let a0 = 0;
    let a1 = 0;
    let b0 = 0;
    let b1 = 0;
    let j = 0;
    for (; j + 1 < N; j += 2) {
      const x0 = x[j];
      const x1 = x[j + 1];
      a0 += A[o + j] * x0;
      a1 += A[o + j + 1] * x1;
      b0 += A[p + j] * x0;
      b1 += A[p + j + 1] * x1;
    }
    if (j < N) {
      a0 += A[o + j] * x[j];
      b0 += A[p + j] * x[j];
    }
    y[i] = a0 + a1;
    y[i + 1] = b0 + b1;
  }
  if (i < rows) y[i] = rowDot(A, i, N, x);
}

/** Row r of A (N columns) times z (two partial sums, as matvecRect). */
export function rowDot(A: Float64Array, r: number, N: number, z: ArrayLike<number>): number {
  const o = r * N;
  let s0 = 0;
  let s1 = 0;
  let j = 0;
  for (; j + 1 < N; j += 2) {
    s0 += A[o + j] * z[j];
    s1 += A[o + j + 1] * z[j + 1];
  }
  if (j < N) s0 += A[o + j] * z[j];
  return s0 + s1;
}

/** The 1-norm (largest column sum) of an N × N matrix. */
export function norm1(A: Float64Array, N: number): number {
  let best = 0;
  for (let j = 0; j < N; j++) {
    let s = 0;
    for (let i = 0; i < N; i++) s += Math.abs(A[i * N + j]);
    if (s > best) best = s;
  }
  return best;
}

/**
 * A matrix in compressed rows, for products with the ladder's exponentials and the generator:
 * a dead time splits the loop at each step, so e^(M·h) couples few entries of z (about a quarter
 * on the demos) and M fewer still.
 */
export interface Compressed {
  rows: number;
  start: Int32Array;
  col: Int32Array;
  val: Float64Array;
}

export function compress(A: Float64Array, rows: number, N: number): Compressed {
  return compressAll([A], rows, N)[0];
}

/**
 * Several matrices of one shape compressed into one store (three arrays for all of them: a
 * typed array longer than 64 bytes costs V8 a separate allocation of its memory, microseconds
 * each, which added up to a tenth of a ladder's making).
 */
export function compressAll(As: Float64Array[], rows: number, N: number): Compressed[] {
  // counted first: stores sized for every entry would be kept by the ladder four times over
  // (a rung is a quarter to a half full) — a few MB at the exact engine's largest size
  let nz = 0;
  for (const A of As) for (let i = 0; i < rows * N; i++) if (A[i] !== 0) nz++;
  const starts = new Int32Array(As.length * (rows + 1));
  const col = new Int32Array(nz);
  const val = new Float64Array(nz);
  let k = 0;
  const out: Compressed[] = [];
  for (let m = 0; m < As.length; m++) {
    const A = As[m];
    const start = starts.subarray(m * (rows + 1), (m + 1) * (rows + 1));
    for (let i = 0; i < rows; i++) {
      start[i] = k;
      const ri = i * N;
      for (let j = 0; j < N; j++) {
        const v = A[ri + j];
        if (v !== 0) {
          col[k] = j;
          val[k++] = v;
        }
      }
    }
    start[rows] = k;
    out.push({ rows, start, col, val });
  }
  return out;
}

/** y = A·x for A compressed; y distinct from x. */
export function matvecCompressed(A: Compressed, x: ArrayLike<number>, y: Float64Array): void {
  const { rows, start, col, val } = A;
  for (let i = 0; i < rows; i++) {
    let s = 0;
    for (let k = start[i], e = start[i + 1]; k < e; k++) s += val[k] * x[col[k]];
    y[i] = s;
  }
}
