import { seededGaussian } from './seeded-noise.ts';

/**
 * Demo test log of our own: a bump test on the mixing valve of a building heating plant (the
 * supply loop of the heating-cascade demo diagram, its controller in manual). The valve is
 * stroked from 50 % to 56 % at 2 %/s at t = 120 s, then back to 53 % at t = 1020 s at the
 * same rate (a double step, not clean: the second ramp ends between samples); the supply
 * temperature is logged every second for 30 minutes.
 *
 * The "plant" behind it is a second-order process with dead time, 0.8 K per % valve, lags of
 * 90 s (boiler and mixing) and 12 s (sensor pocket), 20 s transit delay, around 50 °C; the
 * logged temperature carries seeded white noise (σ = 0.04 K) and the logger's 0.01 K
 * resolution, the valve position 0.1 % resolution. The response is computed here in closed
 * form (superposed ramp responses), independently of the fit's own simulation.
 */
export const supplyValveBump = {
  id: 'supply-valve-bump',
  title: 'Mixing-valve bump test, supply temperature (heating plant)',
  fileName: 'supply-valve-bump.csv',
  truth: { kind: 'sopdt' as const, gain: 0.8, timeConstants: [90, 12], deadTime: 20 },
  operatingPoint: { input: 50, output: 50 },
  noise: { sigma: 0.04, seed: 20260413 },
  samples: 1801,
  sampleTime: 1,
  moves: [
    { at: 120, from: 50, to: 56, rate: 2 },
    { at: 1020, from: 56, to: 53, rate: 2 },
  ],
};

/** Unit-ramp response of 1/((τ1 s + 1)(τ2 s + 1)), zero for t ≤ 0 (τ1 ≠ τ2). */
function rampResponse(t: number, tau1: number, tau2: number): number {
  if (t <= 0) return 0;
  return t - (tau1 + tau2) + (tau1 * tau1 * Math.exp(-t / tau1) - tau2 * tau2 * Math.exp(-t / tau2)) / (tau1 - tau2);
}

/** The valve position (%) at time t: ramps at the given rate between the positions. */
export function valvePosition(t: number): number {
  let u = supplyValveBump.operatingPoint.input;
  for (const m of supplyValveBump.moves) {
    const duration = Math.abs(m.to - m.from) / m.rate;
    const f = Math.min(1, Math.max(0, (t - m.at) / duration));
    u += f * (m.to - m.from);
  }
  return u;
}

/** The noise-free supply temperature (°C): each ramp is the difference of two unit ramps. */
export function supplyTemperature(t: number): number {
  const { gain, timeConstants, deadTime } = supplyValveBump.truth;
  const [tau1, tau2] = timeConstants;
  let y = supplyValveBump.operatingPoint.output;
  for (const m of supplyValveBump.moves) {
    const duration = Math.abs(m.to - m.from) / m.rate;
    const slope = (m.to - m.from) / duration;
    const s = t - deadTime - m.at;
    y += gain * slope * (rampResponse(s, tau1, tau2) - rampResponse(s - duration, tau1, tau2));
  }
  return y;
}

/** The CSV text of the demo log (header time_s,valve_pct,supply_temp_C; LF line ends). */
export function supplyValveBumpCsv(): string {
  const d = supplyValveBump;
  const noise = seededGaussian(d.noise.seed);
  const lines = ['time_s,valve_pct,supply_temp_C'];
  for (let i = 0; i < d.samples; i++) {
    const t = i * d.sampleTime;
    const u = Math.round(valvePosition(t) * 10) / 10;
    const y = Math.round((supplyTemperature(t) + d.noise.sigma * noise()) * 100) / 100;
    lines.push(`${t},${u.toFixed(1)},${y.toFixed(2)}`);
  }
  return lines.join('\n') + '\n';
}
