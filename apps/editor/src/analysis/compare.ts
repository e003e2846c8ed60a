/**
 * Differences between a pinned snapshot and the current results: tuned values, each loop's
 * margins (in the reading to act on), each probe's response metrics, and the dominant closed-loop pole. Response figures
 * are compared only between runs of one length and tolerances: the pinned design re-run under
 * the current settings (never the run made when it was pinned, which may be of another length).
 */
import type { AnalysisSnapshot } from './snapshot.ts';
import type { Cx, LoopRow, ResponseResult } from '@loopwright/study';
import type { PinnedRun } from './results-store.ts';

export interface DiffRow {
  group: 'value' | 'loop' | 'response' | 'poles';
  item: string;
  quantity: string;
  pinned: number | null;
  current: number | null;
}

/** The slowest closed-loop pole (largest real part): it sets the settling. */
export function dominantPole(poles: readonly Cx[]): Cx | null {
  let best: Cx | null = null;
  for (const p of poles) if (!best || p.re > best.re) best = p;
  return best;
}

const MARGINS: [string, string][] = [
  ['gainCrossover', 'crossover [rad/s]'],
  ['phaseMarginDeg', 'phase margin [°]'],
  ['gainMarginDb', 'gain margin [dB]'],
  ['delayMargin', 'delay margin [s]'],
  ['peakSensitivity', 'Ms'],
  ['bandwidth', 'bandwidth [rad/s]'],
];
const METRICS: [string, string][] = [
  ['riseTime', 'rise time [s]'],
  ['overshootPct', 'overshoot [%]'],
  ['settlingTime', 'settling time [s]'],
  ['steadyStateError', 'steady-state error'],
  ['iae', 'IAE'],
  ['timeInSaturation', 'time at limit [s]'],
  ['peakEffort', 'peak effort'],
];

const numOrNull = (v: unknown): number | null => (typeof v === 'number' ? v : null);

/**
 * Why two runs cannot be compared (null when they can): a different end time or tolerances.
 */
export function runsDiffer(a: ResponseResult, b: ResponseResult): string | null {
  if (a.settings.until !== b.settings.until) return `the runs end at ${a.settings.until} s and ${b.settings.until} s`;
  if (a.settings.rtol !== b.settings.rtol || a.settings.atol !== b.settings.atol) return 'the runs use different tolerances';
  return null;
}

/** `pinnedRun`: the pinned design re-run under the current settings (null: no response rows). */
export function differences(pinned: AnalysisSnapshot, now: AnalysisSnapshot, pinnedRun: ResponseResult | null): DiffRow[] {
  const rows: DiffRow[] = [];
  const names = new Set([...Object.keys(pinned.values), ...Object.keys(now.values)]);
  for (const n of names)
    rows.push({ group: 'value', item: n, quantity: 'value', pinned: pinned.values[n] ?? null, current: now.values[n] ?? null });
  const cuts = new Set([...(pinned.loops?.rows ?? []), ...(now.loops?.rows ?? [])].map((r) => r.cutId));
  for (const c of cuts) {
    const a = pinned.loops?.rows.find((r) => r.cutId === c);
    const b = now.loops?.rows.find((r) => r.cutId === c);
    // Each loop by the reading to act on (the engine's advice, now's when both exist), taken
    // alike from both designs: an enclosed loop inner-first, so a negative PM read with the
    // outer loops closed is not listed as the design's margin.
    const innerFirst = (b ?? a)!.advice.actOn === 'inner-first';
    const reading = (r: LoopRow | undefined) => (!r ? null : innerFirst ? (r.alone?.margins ?? null) : r.margins);
    const ma = reading(a);
    const mb = reading(b);
    const label = `${b?.label ?? a?.label ?? c}${innerFirst ? ' (inner-first)' : ''}`;
    for (const [f, q] of MARGINS) {
      rows.push({
        group: 'loop',
        item: label,
        quantity: q,
        pinned: ma ? numOrNull((ma as unknown as Record<string, unknown>)[f]) : null,
        current: mb ? numOrNull((mb as unknown as Record<string, unknown>)[f]) : null,
      });
    }
  }
  const current = now.response;
  const comparable = pinnedRun && current && runsDiffer(pinnedRun, current) === null ? pinnedRun : null;
  const probes = new Set([...(comparable?.metrics ?? []), ...(comparable ? (current?.metrics ?? []) : [])].map((m) => m.probe));
  for (const p of probes) {
    const a = comparable?.metrics.find((m) => m.probe === p);
    const b = current?.metrics.find((m) => m.probe === p);
    for (const [f, q] of METRICS) {
      const pa = a ? numOrNull((a as unknown as Record<string, unknown>)[f]) : null;
      const pb = b ? numOrNull((b as unknown as Record<string, unknown>)[f]) : null;
      if (pa === null && pb === null) continue;
      rows.push({ group: 'response', item: b?.label ?? a?.label ?? p, quantity: q, pinned: pa, current: pb });
    }
  }
  const da = dominantPole(pinned.poles);
  const db = dominantPole(now.poles);
  if (da || db) {
    rows.push({ group: 'poles', item: 'dominant pole', quantity: 'Re s', pinned: da?.re ?? null, current: db?.re ?? null });
    rows.push({
      group: 'poles',
      item: 'dominant pole',
      quantity: '|Im s|',
      pinned: da ? Math.abs(da.im) : null,
      current: db ? Math.abs(db.im) : null,
    });
  }
  return rows;
}

/** The pinned design's re-run when it can be compared with the current run (same length and tolerances), else null. */
export function comparableRun(p: PinnedRun | null, current: ResponseResult | null): ResponseResult | null {
  return p?.ok && current && runsDiffer(p.value, current) === null ? p.value : null;
}
