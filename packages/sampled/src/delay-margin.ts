import { InputError, poly as P, transfer } from '@loopwright/lti';
import { type DiscreteTransferFunction, dtDelay } from './discrete.ts';
import { splitDelay } from './hold.ts';
import { juryTest } from './jury.ts';
import { type SampledLoop, loopPulseTransfer } from './sampled-loop.ts';

/**
 * The exact delay margin of a sampled loop: the smallest extra continuous dead time Δ ≥ 0 in
 * front of the plant for which the sampled closed loop is no longer stable (a pole reaches
 * |z| = 1), with the extra delay taken exactly through the modified z-transform. It differs from
 * the reading PM/ωgc where Δ is not a whole number of samples, because the aliased parts of the
 * loop response are delayed by different phases.
 *
 * Method: stability (the Jury test of the closed-loop polynomial) is scanned in steps of T/16 up to `maxDelay`
 * (default: 50 samples), then the first change is bisected to 1e-9·T. Returns 0 for a loop that
 * is not stable to begin with and null when it stays stable over the whole scan.
 */
export function sampledDelayMargin(loop: SampledLoop, opts: { maxDelay?: number } = {}): number | null {
  const T = loop.sampleTime;
  const maxDelay = opts.maxDelay ?? 50 * T;
  if (!(maxDelay > 0) || !Number.isFinite(maxDelay))
    throw new InputError(`maxDelay must be a finite time > 0 s, got ${maxDelay}`, { field: 'maxDelay' });
  // Δ = m·T + f: the whole samples are z^(−m); only the fraction needs a new hold equivalent
  // (cached, so the scan costs 16 discretisations).
  const byFraction = new Map<number, DiscreteTransferFunction>();
  const stableWith = (extra: number) => {
    const { samples, fraction } = splitDelay(extra, T);
    let G0 = byFraction.get(fraction);
    if (!G0) {
      G0 = loopPulseTransfer({ ...loop, plant: transfer(loop.plant.rational, loop.plant.delay + fraction) });
      byFraction.set(fraction, G0);
    }
    const G = dtDelay(G0, samples);
    const ch = P.add(G.rational.den, G.rational.num);
    return ch.length <= 1 || juryTest(ch).stable; // O(n²), no roots needed
  };
  if (!stableWith(0)) return 0;
  let lo = 0;
  for (let i = 1; (i * T) / 16 <= maxDelay * (1 + 1e-12); i++) {
    const d = (Math.floor(i / 16) + (i % 16) / 16) * T; // exact multiples of T for whole samples
    if (!stableWith(d)) {
      let hi = d;
      while (hi - lo > 1e-9 * T) {
        const mid = 0.5 * (lo + hi);
        if (stableWith(mid)) lo = mid;
        else hi = mid;
      }
      return 0.5 * (lo + hi);
    }
    lo = d;
  }
  return null;
}
