/**
 * Is the sample time short enough for the loop's crossover? Guideline: a continuous design
 * carries over to a sampled one when ωc·T lies in about 0.15–0.5, ωc the gain crossover
 * (rad/s) — Åström & Wittenmark, Computer-Controlled Systems, 3rd ed., 1997, ch. 8 (from memory).
 * The phase the hold and the computation delay cost at ωc is ωc·T·(1/2 + D) rad.
 */
export const SAMPLE_RATE_GUIDELINE = {
  low: 0.15,
  high: 0.5,
  source: 'ωc·T ≈ 0.15–0.5: Åström & Wittenmark, Computer-Controlled Systems, 3rd ed., 1997, ch. 8 (from memory)',
} as const;

export interface SampleRateNote {
  /** 'slow-sampling': ωc·T above the guideline; 'crossover-beyond-nyquist': ωc at or above π/T. */
  code: 'slow-sampling' | 'crossover-beyond-nyquist';
  level: 'warning' | 'error';
  message: string;
  crossover: number;
  /** ωc·T. */
  product: number;
  /** Phase lost to hold and computation delay at ωc (degrees). */
  phaseLagDeg: number;
  /** Sample times that meet the guideline for this crossover: [0.15/ωc, 0.5/ωc] (s). */
  suggestedSampleTime: [number, number];
  guideline: string;
}

/** A note when the sample time is too slow for a gain crossover ωc (none when it is fine). */
export function sampleRateCheck(crossover: number | null, sampleTime: number, computeDelay = 0): SampleRateNote | null {
  if (crossover === null || !(crossover > 0) || !Number.isFinite(crossover)) return null;
  const product = crossover * sampleTime;
  const lag = product * (0.5 + computeDelay) * (180 / Math.PI);
  const suggested: [number, number] = [SAMPLE_RATE_GUIDELINE.low / crossover, SAMPLE_RATE_GUIDELINE.high / crossover];
  const fmt = (x: number) => Number(x.toPrecision(3)).toString();
  const base = { crossover, product, phaseLagDeg: lag, suggestedSampleTime: suggested, guideline: SAMPLE_RATE_GUIDELINE.source };
  if (product >= Math.PI) {
    return {
      ...base,
      code: 'crossover-beyond-nyquist',
      level: 'error',
      message: `the crossover ${fmt(crossover)} rad/s is at or above the Nyquist frequency π/T = ${fmt(Math.PI / sampleTime)} rad/s: a sampled controller cannot act there; use T ≤ ${fmt(suggested[1])} s`,
    };
  }
  if (product > SAMPLE_RATE_GUIDELINE.high) {
    return {
      ...base,
      code: 'slow-sampling',
      level: 'warning',
      message: `the sample time is slow for the crossover: ωc·T = ${fmt(product)} (guideline 0.15–0.5); hold and computation delay cost about ${fmt(lag)}° of phase at ωc; T between ${fmt(suggested[0])} and ${fmt(suggested[1])} s would meet the guideline`,
    };
  }
  return null;
}
