import { InputError, type TransferFunction, loopMargins, poly, rational, transfer } from '@loopwright/lti';
import type { UltimatePoint } from './rules.ts';

/**
 * The sign of a plant's low-frequency gain: of K in K·s^q·(1 + …)/(1 + …), the ratio of the
 * lowest nonzero coefficients. A controller for a plant of negative gain acts in reverse (its
 * kp is negative); the tuners work on −P and hand back the sign.
 */
export function lowFrequencySign(plant: TransferFunction): 1 | -1 {
  const num = poly.trim(plant.rational.num);
  const den = poly.trim(plant.rational.den);
  if (num.length === 0) throw new InputError('the plant is zero: there is nothing to tune', { field: 'plant' });
  const lowest = (p: readonly number[]) => p.find((c) => c !== 0) ?? 0;
  return lowest(num) / lowest(den) > 0 ? 1 : -1;
}

export const negated = (plant: TransferFunction): TransferFunction =>
  transfer(rational(poly.scale(plant.rational.num, -1), plant.rational.den), plant.delay);

/**
 * Ku and Pu of a loop under proportional control, from its exact frequency response (dead time
 * exact): the smallest gain factor at a phase crossover (∠P = −180°) and 2π over that
 * crossover's frequency. Null when the phase never crosses −180° (no ultimate gain). A plant of
 * negative gain gets a negative Ku (reverse action). The study engine takes these from the
 * diagram's own jω crossing; this is the same reading for a loop given as a transfer function.
 */
export function ultimatePoint(plant: TransferFunction): (UltimatePoint & { omega: number }) | null {
  const sign = lowFrequencySign(plant);
  const m = loopMargins(sign > 0 ? plant : negated(plant));
  let best: { omega: number; gainFactor: number } | null = null;
  for (const c of m.phaseCrossoverDetails) if (c.omega > 0 && (!best || c.gainFactor < best.gainFactor)) best = c;
  if (!best) return null;
  return { ku: sign * best.gainFactor, pu: (2 * Math.PI) / best.omega, omega: best.omega };
}
