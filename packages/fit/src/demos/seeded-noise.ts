/**
 * Reproducible noise for demo logs and tests: the mulberry32 generator (a small public-domain
 * 32-bit PRNG) feeding the Box–Muller transform. The same seed gives the same numbers on every
 * platform (integer arithmetic with Math.imul, then double-precision maths).
 */
export function seededUniform(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal numbers (mean 0, standard deviation 1) from a seed. */
export function seededGaussian(seed: number): () => number {
  const u = seededUniform(seed);
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    const r = Math.sqrt(-2 * Math.log(1 - u()));
    const phi = 2 * Math.PI * u();
    spare = r * Math.sin(phi);
    return r * Math.cos(phi);
  };
}
