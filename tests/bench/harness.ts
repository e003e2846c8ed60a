/**
 * Shared bench harness: medians and ratios from the same run (absolute times on shared
 * machines are noisy, ratios much less so). Each *.bench.ts exports `run(): Promise<void>`
 * and prints through `report`, `ratio` and `record`.
 *
 * Every figure printed is also recorded under a stable name `<bench file>.<key>` (the file
 * name without `.bench.ts`; the key given, or a slug of the printed label) and run.ts writes
 * them all to test-artifacts/bench.json as `{ "<name>": { "value": number, "unit": string } }`.
 */
export interface BenchResult {
  name: string;
  runs: number;
  median: number;
  p95: number;
  min: number;
}

export interface BenchOptions {
  /** At least this many timed runs (default 15). */
  minRuns?: number;
  /** Keep running until this much time has been spent (default 300 ms). */
  minMs?: number;
  /** Untimed warm-up runs (default 3). */
  warmup?: number;
}

export interface Figure {
  value: number;
  unit: string;
}

const figures: Record<string, Figure> = {};
let prefix = '';

/** Names the figures recorded from now on `<name>.<key>` (run.ts: the bench file's name). */
export function figurePrefix(name: string): void {
  prefix = name;
}

/** Every figure recorded so far, by name. */
export function recordedFigures(): Readonly<Record<string, Figure>> {
  return figures;
}

/** A printed label as a name part: lower case, runs of anything else than a–z and 0–9 as one '-'. */
export function slug(label: string): string {
  return label
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-|-$/g, '');
}

/**
 * Records a figure that is printed, under `<bench file>.<key>`; returns the value so that it
 * can sit inside the printed line. Values that are not finite (no margin, say) are printed
 * but not recorded (JSON has no Infinity).
 */
export function record(key: string, value: number, unit: string): number {
  if (Number.isFinite(value)) figures[prefix ? `${prefix}.${key}` : key] = { value, unit };
  return value;
}

export function bench(name: string, fn: () => unknown, opts: BenchOptions = {}): BenchResult {
  const { minRuns = 15, minMs = 300, warmup = 3 } = opts;
  for (let i = 0; i < warmup; i++) fn();
  const times: number[] = [];
  const start = performance.now();
  while (times.length < minRuns || performance.now() - start < minMs) {
    const t0 = performance.now();
    fn();
    times.push(performance.now() - t0);
    if (times.length > 100000) break;
  }
  times.sort((a, b) => a - b);
  const q = (f: number) => times[Math.min(times.length - 1, Math.floor(f * times.length))];
  return { name, runs: times.length, median: q(0.5), p95: q(0.95), min: times[0] };
}

/** Least-squares slope of log(y) against log(x): cost ∝ x^exponent. */
export function fitExponent(xs: readonly number[], ys: readonly number[]): number {
  const lx = xs.map(Math.log);
  const ly = ys.map(Math.log);
  const mx = lx.reduce((a, b) => a + b, 0) / lx.length;
  const my = ly.reduce((a, b) => a + b, 0) / ly.length;
  let num = 0;
  let den = 0;
  for (let i = 0; i < lx.length; i++) {
    num += (lx[i] - mx) * (ly[i] - my);
    den += (lx[i] - mx) ** 2;
  }
  return num / den;
}

const fmt = (ms: number) => (ms < 1 ? `${(ms * 1000).toFixed(1)} µs` : `${ms.toFixed(2)} ms`);

/** Prints one result line, with an optional target (ms) judged on the median; records median, p95 and runs. */
export function report(r: BenchResult, targetMs?: number, key = slug(r.name)): void {
  record(`${key}.median`, r.median, 'ms');
  record(`${key}.p95`, r.p95, 'ms');
  record(`${key}.runs`, r.runs, 'runs');
  const verdict =
    targetMs === undefined ? '' : r.median <= targetMs ? `  (target ≤ ${targetMs} ms: met)` : `  (target ≤ ${targetMs} ms: MISSED)`;
  console.log(`  ${r.name.padEnd(58)} median ${fmt(r.median).padStart(10)}  p95 ${fmt(r.p95).padStart(10)}  n=${r.runs}${verdict}`);
}

export function section(title: string): void {
  console.log(`\n## ${title}`);
}

/** Prints and records (`<key>.ratio`) the ratio of two medians, with an optional target. */
export function ratio(
  label: string,
  a: BenchResult,
  b: BenchResult,
  target?: { atLeast?: number; atMost?: number },
  key = slug(label),
): number {
  const x = record(`${key}.ratio`, a.median / b.median, 'ratio');
  let verdict = '';
  if (target?.atLeast !== undefined)
    verdict = x >= target.atLeast ? `  (target ≥ ${target.atLeast}: met)` : `  (target ≥ ${target.atLeast}: MISSED)`;
  if (target?.atMost !== undefined)
    verdict = x <= target.atMost ? `  (target ≤ ${target.atMost}: met)` : `  (target ≤ ${target.atMost}: MISSED)`;
  console.log(`  ratio ${label.padEnd(52)} ${x.toFixed(2)}×${verdict}`);
  return x;
}
