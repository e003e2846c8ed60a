import type { SimResult } from './types.ts';

const cell = (s: string) => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);

/** Traces as CSV: a header row "time,<trace>,…", then one row per output time (shortest round-trip numbers). */
export function tracesCsv(res: Pick<SimResult, 'time' | 'traces'>): string {
  const keys = Object.keys(res.traces);
  const rows = [['time', ...keys].map(cell).join(',')];
  for (let i = 0; i < res.time.length; i++) {
    rows.push([res.time[i], ...keys.map((k) => res.traces[k][i])].map((v) => String(v)).join(','));
  }
  return rows.join('\n') + '\n';
}
