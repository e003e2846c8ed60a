/**
 * Export: chart pictures (PNG from the drawn canvas, SVG from the SVG renderer), traces as
 * CSV, and file download through a temporary link.
 */
import type { ResponseResult } from '@loopwright/study';

/** Offers a file to the user (the browser's download). */
export function download(filename: string, data: Blob | string, type = 'application/octet-stream'): void {
  const blob = typeof data === 'string' ? new Blob([data], { type }) : data;
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  a.style.display = 'none';
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function dataUrlToBlob(url: string): Blob {
  const [head, body] = url.split(',', 2);
  const type = /data:([^;,]+)/.exec(head)?.[1] ?? 'application/octet-stream';
  if (head.includes(';base64')) {
    const bin = atob(body);
    const bytes = new Uint8Array(bin.length);
    for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
    return new Blob([bytes], { type });
  }
  return new Blob([decodeURIComponent(body)], { type });
}

/** A file-name-safe slug of a title. */
export const slug = (s: string): string =>
  s
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '') || 'diagram';

const csvCell = (s: string): string => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
const num = (v: number | undefined): string => (v === undefined || Number.isNaN(v) ? '' : String(v));

/**
 * Traces as CSV: a column `t` and, per recorded trace, its value with nonlinearities and the
 * linear model's value ("<name> (linear)") when the run has a linear overlay. The two runs share one time grid only when their
 * grids agree; otherwise each row holds the nonlinear grid and the linear value interpolated.
 */
export function responseCsv(r: ResponseResult): string {
  const label = (key: string) => r.probes.find((p) => p.id === key)?.label ?? r.actuators.find((a) => a.key === key)?.label ?? key;
  const keys = Object.keys(r.run.traces);
  const lin = r.linear;
  const header = ['t', ...keys.flatMap((k) => (lin ? [label(k), `${label(k)} (linear)`] : [label(k)]))];
  const lines = [header.map(csvCell).join(',')];
  const tn = r.run.time;
  const tl = lin?.time ?? [];
  const sameGrid = tn.length === tl.length && tn.every((t, i) => t === tl[i]);
  let j = 0;
  for (let i = 0; i < tn.length; i++) {
    const t = tn[i];
    const row = [num(t)];
    if (!sameGrid) while (j + 1 < tl.length && tl[j + 1] < t) j++;
    for (const k of keys) {
      row.push(num(r.run.traces[k][i]));
      if (!lin) continue;
      const trace = lin.traces[k];
      if (!trace) row.push('');
      else if (sameGrid) row.push(num(trace[i]));
      else if (j + 1 < tl.length && tl[j + 1] !== tl[j]) {
        const f = Math.min(1, Math.max(0, (t - tl[j]) / (tl[j + 1] - tl[j])));
        row.push(num(trace[j] + f * (trace[j + 1] - trace[j])));
      } else row.push(num(trace[j]));
    }
    lines.push(row.join(','));
  }
  return lines.join('\n') + '\n';
}
