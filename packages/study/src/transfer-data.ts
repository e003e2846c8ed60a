/** Plain views of transfer functions: coefficients, open right-half-plane poles, Bode data. */
import { defaultFrequencyGrid, frequencyRange, frequencyResponse, logspace, polyRoots, type TransferFunction } from '@loopwright/lti';
import type { TransferData } from './types.ts';

export const transferData = (tf: TransferFunction): TransferData => ({
  num: [...tf.rational.num],
  den: [...tf.rational.den],
  delay: tf.delay,
});

/**
 * Poles of L in the open right half-plane. With them the Nyquist criterion asks for as many
 * counter-clockwise encirclements of −1 (Z = N + P), so a loop read with its outer loops
 * closed can show a negative phase margin yet be stable: the count explains the reading.
 */
export function rhpPoleCount(tf: TransferFunction): number {
  const den = tf.rational.den;
  if (den.length <= 1) return 0;
  const roots = polyRoots(den);
  const scale = Math.max(1, ...roots.map((p) => Math.hypot(p.re, p.im)));
  return roots.filter((p) => p.re > 1e-9 * scale).length;
}

/** Bode data of a transfer function on a grid (default: one that covers its corners, 40 points a decade). */
export function bodeOf(tf: TransferFunction, omega?: number[]): { omega: number[]; magDb: number[]; phaseDeg: number[] } {
  const fr = frequencyResponse(tf, omega ?? defaultFrequencyGrid(tf, 40));
  return { omega: fr.omega, magDb: fr.magDb, phaseDeg: fr.phaseDeg };
}

/** One grid (40 points a decade) covering the corners of every given transfer function. */
export function sharedGrid(tfs: readonly TransferFunction[]): number[] {
  const ranges = tfs.map((tf) => frequencyRange(tf));
  const lo = Math.log10(Math.min(...ranges.map((r) => r[0])));
  const hi = Math.log10(Math.max(...ranges.map((r) => r[1])));
  return logspace(lo, hi, Math.min(4000, Math.max(2, Math.ceil((hi - lo) * 40) + 1)));
}
