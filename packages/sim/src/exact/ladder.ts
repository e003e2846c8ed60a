import { type Compressed, compressAll, matvecCompressed, mulRect, norm1, slab } from './dense.ts';

/**
 * Matrix exponentials of one mode's generator M (N × N, row-major) for the exact engine.
 *
 * A ladder of exponentials e^(M·h0/2^k), k = 0 … K, is built from the bottom by scaling and
 * squaring in the "minus identity" form E_k = e^(M·h0/2^k) − I (Higham, Functions of Matrices,
 * SIAM 2008, §10.3 (from memory), keeps the small E accurate where I + E would round it away):
 * E_K is the Taylor series (13 terms) of X = M·h0/2^K with ‖X‖₁ ≤ 1/4, and E_(k−1) = 2·E_k + E_k².
 * Φ = I + E_0 = e^(M·h0) moves the state over a regular step; any other step length s is
 * h0·(q + Σ b_k 2^(−k)) + r: q regular steps, the rungs whose bit is set, and a remainder
 * r < h0/2^K by its Taylor series — so events, odd steps and turning points are all on the
 * exact solution for the cost of a few matrix–vector products.
 */
/** Terms of the Taylor series at the bottom of the ladder (‖X‖ ≤ 1/4). */
const TERMS = 13;

export class Ladder {
  readonly N: number;
  readonly h0: number;
  readonly K: number;
  /** E_k = e^(M·h0/2^k) − I, k = 0 … K. */
  readonly E: Float64Array[];
  readonly minRungs: number;
  /** The generator (a copy: the cache compares it). */
  readonly M: Float64Array;
  /** M and the rungs E_k in compressed rows (what apply multiplies by). */
  private readonly Mc: Compressed;
  private readonly Ec: Compressed[];
  private readonly tmp: Float64Array;
  private readonly acc: Float64Array;
  private readonly term: Float64Array;

  constructor(M: Float64Array, N: number, h0: number, minRungs = 1) {
    this.N = N;
    this.h0 = h0;
    this.minRungs = minRungs;
    const norm = norm1(M, N) * h0;
    // at least one rung below h0 (e^(M·h0/2) is the mid-step guard check), and as many as the output lattice needs
    // (a matrix that is not finite gets no extra rungs: its steps come out not finite and the run
    // ends as diverged, naming the time)
    // (norm·64 itself may overflow for a norm near 1e308: such a matrix gets no extra rungs either)
    const rungs = Math.ceil(Math.log2(norm * 4));
    const K = Math.max(1, minRungs, norm > 0 && Number.isFinite(rungs) ? rungs : 0);
    this.K = K;
    // M's copy, the rungs, two work matrices and three vectors in one chunk (the dozen separate
    // arrays were a sixth of a ladder's time)
    const NN = N * N;
    const take = slab((K + 4) * NN + 3 * N);
    this.M = take(NN);
    this.M.set(M);
    const E_: Float64Array[] = new Array(K + 1);
    for (let k = 0; k <= K; k++) E_[k] = take(NN);
    const X = take(NN);
    const T = take(NN);
    const f = h0 / 2 ** K;
    for (let i = 0; i < NN; i++) X[i] = M[i] * f;
    // E = X·(I + X/2·(I + X/3·(… (I + X/13)))), Horner form of Σ X^m/m! (‖X‖ ≤ 1/4: the
    // first term left out, X¹⁴/14!, is below 5e-20; a wider base than 1/64 saves four squarings,
    // the dense products of the ladder, for nine sparse ones by X); each level's 1/m scales X's
    // entries in the product, and E and the work matrix trade places instead of being copied
    let E = E_[K];
    for (let i = 0; i < NN; i++) E[i] = X[i] / TERMS;
    let W = T;
    for (let m = TERMS - 1; m >= 1; m--) {
      for (let i = 0; i < N; i++) E[i * N + i] += 1; // I + …
      mulRect(X, N, E, N, W, 1 / m);
      const t = E;
      E = W;
      W = t;
    }
    if (E !== E_[K]) E_[K].set(E);
    for (let k = K; k >= 1; k--) {
      const S = E_[k - 1];
      mulRect(E_[k], N, E_[k], N, S);
      for (let i = 0; i < NN; i++) S[i] += 2 * E_[k][i];
    }
    this.E = E_;
    const cs = compressAll([this.M, ...E_], N, N);
    this.Mc = cs[0];
    this.Ec = cs.slice(1);
    this.tmp = take(N);
    this.acc = take(N);
    this.term = take(N);
  }

  /** out = e^(M·s)·z for any s ≥ 0 (out may be z). */
  apply(s: number, z: ArrayLike<number>, out: Float64Array): void {
    const N = this.N;
    const acc = this.acc;
    for (let i = 0; i < N; i++) acc[i] = z[i];
    let r = s / this.h0;
    let q = Math.floor(r);
    if (r - q > 1 - 1e-13) q += 1; // round-off just below a whole number of steps
    r = Math.max(0, r - q);
    for (; q > 0; q--) this.rung(0, acc);
    let bit = 0.5;
    for (let k = 1; k <= this.K && r > 0; k++, bit *= 0.5) {
      if (r >= bit) {
        this.rung(k, acc);
        r -= bit;
      }
    }
    if (r > 0) this.taylor(r * this.h0, acc);
    for (let i = 0; i < N; i++) out[i] = acc[i];
  }

  /** z ← (I + E_k)·z. */
  private rung(k: number, z: Float64Array): void {
    const N = this.N;
    const t = this.tmp;
    matvecCompressed(this.Ec[k], z, t);
    for (let i = 0; i < N; i++) z[i] += t[i];
  }

  /** z ← e^(M·r)·z by its Taylor series (‖M·r‖ ≤ 1/4: at most about thirteen terms). */
  private taylor(r: number, z: Float64Array): void {
    const N = this.N;
    const term = this.term;
    term.set(z);
    const t = this.tmp;
    for (let m = 1; m <= 20; m++) {
      matvecCompressed(this.Mc, term, t);
      let big = 0;
      let size = 0;
      for (let i = 0; i < N; i++) {
        term[i] = (t[i] * r) / m;
        z[i] += term[i];
        big = Math.max(big, Math.abs(term[i]));
        size = Math.max(size, Math.abs(z[i]));
      }
      if (big <= 1e-17 * size) break;
    }
  }
}

/** Ladders made recently, by generator and step: a run's linear overlay and its as-drawn run share the unsaturated mode's. */
const recent: Ladder[] = [];
const RECENT = 4;

/** A ladder for (M, h0, minRungs): a recent one with the same generator, else a new one. */
export function ladderFor(M: Float64Array, N: number, h0: number, minRungs = 1): Ladder {
  for (let i = 0; i < recent.length; i++) {
    const l = recent[i];
    if (l.N === N && l.h0 === h0 && l.minRungs === minRungs && sameEntries(l.M, M)) {
      if (i > 0) {
        recent.splice(i, 1);
        recent.unshift(l);
      }
      return l;
    }
  }
  const l = new Ladder(M, N, h0, minRungs);
  recent.unshift(l);
  if (recent.length > RECENT) recent.pop();
  return l;
}

/** Forgets the recent ladders (a bench that computes one value twice must not time the second from them). */
export function clearLadders(): void {
  recent.length = 0;
}

function sameEntries(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) return false;
  return true;
}
