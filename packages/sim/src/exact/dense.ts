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

/** C (rows × N) = f·A (rows × N) · B (N × N); C distinct from A and B. */
export function mulRect(A: Float64Array, rows: number, B: Float64Array, N: number, C: Float64Array, f = 1): void {
  C.fill(0, 0, rows * N);
  for (let i = 0; i < rows; i++) {
    const ri = i * N;
    for (let k = 0; k < N; k++) {
      const a = A[ri + k] * f;
      if (a === 0) continue;
      const rk = k * N;
      for (let j = 0; j < N; j++) C[ri + j] += a * B[rk + j];
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
  let nz = 0;
  for (const A of As) for (let i = 0; i < rows * N; i++) if (A[i] !== 0) nz++;
  const starts = new Int32Array(As.length * (rows + 1));
  const col = new Int32Array(nz);
  const val = new Float64Array(nz);
  let k = 0;
  return As.map((A, m) => {
    const start = starts.subarray(m * (rows + 1), (m + 1) * (rows + 1));
    for (let i = 0; i < rows; i++) {
      start[i] = k;
      for (let j = 0; j < N; j++) {
        const v = A[i * N + j];
        if (v !== 0) {
          col[k] = j;
          val[k++] = v;
        }
      }
    }
    start[rows] = k;
    return { rows, start, col, val };
  });
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
