/** Small dense matrix helpers on row-major Float64Arrays with N columns (the exact engine's matrices). */

/** C (rows × N) = A (rows × N) · B (N × N); C distinct from A and B. */
export function mulRect(A: Float64Array, rows: number, B: Float64Array, N: number, C: Float64Array): void {
  C.fill(0, 0, rows * N);
  for (let i = 0; i < rows; i++) {
    const ri = i * N;
    for (let k = 0; k < N; k++) {
      const a = A[ri + k];
      if (a === 0) continue;
      const rk = k * N;
      for (let j = 0; j < N; j++) C[ri + j] += a * B[rk + j];
    }
  }
}

/** y = A·x for A with `rows` rows of N columns; y distinct from x. */
export function matvecRect(A: Float64Array, rows: number, N: number, x: ArrayLike<number>, y: Float64Array): void {
  for (let i = 0; i < rows; i++) {
    let s = 0;
    const o = i * N;
    for (let j = 0; j < N; j++) s += A[o + j] * x[j];
    y[i] = s;
  }
}

/** Row r of A (N columns) times z. */
export function rowDot(A: Float64Array, r: number, N: number, z: ArrayLike<number>): number {
  let s = 0;
  const o = r * N;
  for (let j = 0; j < N; j++) s += A[o + j] * z[j];
  return s;
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
