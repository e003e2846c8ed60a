/**
 * Charts as SVG text, with no DOM and no charting library (the report is built in a worker and
 * on the command line alike): panels stacked on one width, each with linear or log axes, nice
 * ticks, a grid, a legend, lines (solid, dashed, dotted), markers, reference lines, arrows and
 * point labels. Lines are clipped to their panel; long series are thinned per pixel column
 * keeping each column's extremes, so a peak is never lost.
 */
import { fmt } from './format.ts';

export type LineDash = 'solid' | 'dashed' | 'dotted';
export type Marker = 'cross' | 'circle' | 'diamond' | 'diamond-open' | 'square' | 'triangle';

export interface PlotSeries {
  /** Legend text ('' leaves it out of the legend). */
  name: string;
  x: readonly number[];
  y: readonly number[];
  color: string;
  /** Drawn as a line unless null (markers only). */
  line?: { dash?: LineDash; width?: number } | null;
  marker?: Marker;
  markerSize?: number;
  /** A text beside each point (null: none). */
  labels?: readonly (string | null)[];
}

export interface PlotAxis {
  scale: 'linear' | 'log';
  min: number;
  max: number;
  label: string;
}

export interface PlotRule {
  at: number;
  color: string;
  dash?: LineDash;
  label?: string;
}

/**
 * An arrow along a direction (degrees, counter-clockwise from +x in data space) from a data
 * point, or — `into` — coming from that direction and ending at the point.
 */
export interface PlotArrow {
  x: number;
  y: number;
  angleDeg: number;
  lengthPx: number;
  color: string;
  label?: string;
  into?: boolean;
}

export interface PlotPanel {
  x: PlotAxis;
  y: PlotAxis;
  series: PlotSeries[];
  /** Total height of the panel in px (axes, legend and title included). */
  height: number;
  title?: string;
  hRules?: PlotRule[];
  vRules?: PlotRule[];
  arrows?: PlotArrow[];
}

/** Space around a panel's plotting box, px: the box is (width − left − right) × (height − top − bottom). */
export const PLOT_MARGIN = { left: 70, right: 18, top: 44, bottom: 40 };

const TEXT = '#1d2329';
const MUTED = '#5d6670';
const GRID = '#e8ebee';
const AXIS = '#8a949e';

export const esc = (s: string): string => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
const r1 = (v: number) => Math.round(v * 10) / 10;
const DASHES: Record<LineDash, string> = { solid: '', dashed: '7 4', dotted: '2 3' };

/** Legend entries laid out left to right, wrapping at `width`: each entry's offset and the rows used. */
function legendLayout(series: readonly PlotSeries[], width: number): { at: [number, number][]; rows: number } {
  const at: [number, number][] = [];
  let x = 0;
  let row = 0;
  for (const s of series) {
    if (!s.name) {
      at.push([Number.NaN, Number.NaN]);
      continue;
    }
    const w = 30 + s.name.length * 6.2 + 14;
    if (x + w > width && x > 0) {
      x = 0;
      row++;
    }
    at.push([x, row * 14]);
    x += w;
  }
  return { at, rows: series.some((s) => s.name) ? row + 1 : 0 };
}

/** Space above a panel's box: the title and the legend rows (at least PLOT_MARGIN.top). */
function panelTop(series: readonly PlotSeries[], width: number, title: boolean): number {
  const rows = legendLayout(series, width - PLOT_MARGIN.left - PLOT_MARGIN.right).rows;
  return Math.max(PLOT_MARGIN.top, (title ? 22 : 6) + rows * 14 + 8);
}

/** The size of a panel's plotting box (its series and title decide the legend's room). */
export function plotBox(
  width: number,
  height: number,
  series: readonly PlotSeries[] = [],
  title = false,
): { width: number; height: number } {
  return {
    width: Math.max(1, width - PLOT_MARGIN.left - PLOT_MARGIN.right),
    height: Math.max(1, height - panelTop(series, width, title) - PLOT_MARGIN.bottom),
  };
}

/** Round-number tick positions: 1-2-5 steps on a linear axis; decades (and 2, 5 when few) on a log one. */
export function ticks(axis: PlotAxis, target = 6): number[] {
  const { min, max } = axis;
  if (!(max > min) || !Number.isFinite(min) || !Number.isFinite(max)) return [];
  if (axis.scale === 'log') {
    const lo = Math.floor(Math.log10(min));
    const hi = Math.ceil(Math.log10(max));
    const decades = hi - lo;
    const stride = Math.max(1, Math.ceil(decades / 8));
    const out: number[] = [];
    for (let e = lo; e <= hi; e += stride) {
      for (const m of decades <= 2 ? [1, 2, 5] : [1]) {
        const v = m * 10 ** e;
        if (v >= min * (1 - 1e-9) && v <= max * (1 + 1e-9)) out.push(v);
      }
    }
    return out;
  }
  const raw = (max - min) / target;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * mag).find((s) => s >= raw) ?? 10 * mag;
  const out: number[] = [];
  for (let v = Math.ceil(min / step) * step; v <= max + step * 1e-9; v += step) out.push(Math.abs(v) < step * 1e-9 ? 0 : v);
  return out;
}

/** A linear range that holds the values, padded 5 % (a flat signal gets ±1 or ±10 % around it). */
export function linearRange(values: Iterable<number>, opts: { pad?: number; include?: number[] } = {}): { min: number; max: number } {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  for (const v of opts.include ?? []) {
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  if (!Number.isFinite(lo)) return { min: -1, max: 1 };
  if (hi - lo <= 1e-12 * Math.max(1, Math.abs(hi))) {
    const d = Math.abs(hi) > 0 ? Math.abs(hi) * 0.1 : 1;
    return { min: lo - d, max: hi + d };
  }
  const pad = (opts.pad ?? 0.05) * (hi - lo);
  return { min: lo - pad, max: hi + pad };
}

/** A tick label: short exponent form for powers of ten far from 1 ("1e5"), else 3 digits. */
function tickText(v: number): string {
  const e = Math.log10(Math.abs(v));
  if (v !== 0 && Number.isInteger(Math.round(e * 1e9) / 1e9) && Math.abs(e) >= 4) return `${v < 0 ? '−' : ''}1e${Math.round(e)}`;
  return fmt(v, 3);
}

interface Frame {
  px(x: number): number;
  py(y: number): number;
  box: { left: number; top: number; width: number; height: number };
}

function frameOf(p: PlotPanel, width: number, top: number): Frame {
  const box = {
    left: PLOT_MARGIN.left,
    top: top + panelTop(p.series, width, Boolean(p.title)),
    ...plotBox(width, p.height, p.series, Boolean(p.title)),
  };
  const map = (a: PlotAxis, lo: number, span: number, flip: boolean) => {
    const log = a.scale === 'log';
    const f = (v: number) => (log ? Math.log10(v) : v);
    const a0 = f(a.min);
    const a1 = f(a.max);
    return (v: number) => {
      if (log && !(v > 0)) return Number.NaN;
      const t = (f(v) - a0) / (a1 - a0);
      // Far outside the box a coordinate only needs to point the right way (clipped anyway).
      const c = Math.max(-20, Math.min(21, t));
      return flip ? lo + span - c * span : lo + c * span;
    };
  };
  return { px: map(p.x, box.left, box.width, false), py: map(p.y, box.top, box.height, true), box };
}

/** Pixel points of a series, split at gaps (non-finite values), thinned per pixel column when x rises monotonically. */
function polylines(s: PlotSeries, f: Frame): [number, number][][] {
  const n = Math.min(s.x.length, s.y.length);
  const runs: [number, number][][] = [];
  let cur: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    const X = f.px(s.x[i]);
    const Y = f.py(s.y[i]);
    if (!Number.isFinite(X) || !Number.isFinite(Y)) {
      if (cur.length) runs.push(cur);
      cur = [];
      continue;
    }
    cur.push([X, Y]);
  }
  if (cur.length) runs.push(cur);
  return runs.map((r) => (r.length > 2 * f.box.width && r.every((p, i) => i === 0 || p[0] >= r[i - 1][0]) ? thinByColumn(r) : r));
}

/** One pixel column → its first, lowest, highest and last point (in order): the drawn shape is unchanged. */
function thinByColumn(r: [number, number][]): [number, number][] {
  const out: [number, number][] = [];
  let col = Math.floor(r[0][0]);
  let bucket: [number, number][] = [];
  const flush = () => {
    if (!bucket.length) return;
    let lo = bucket[0];
    let hi = bucket[0];
    for (const p of bucket) {
      if (p[1] < lo[1]) lo = p;
      if (p[1] > hi[1]) hi = p;
    }
    const keep = new Set([bucket[0], lo, hi, bucket[bucket.length - 1]]);
    for (const p of bucket) if (keep.has(p)) out.push(p);
    bucket = [];
  };
  for (const p of r) {
    const c = Math.floor(p[0]);
    if (c !== col) {
      flush();
      col = c;
    }
    bucket.push(p);
  }
  flush();
  return out;
}

function markerPath(m: Marker, x: number, y: number, size: number, color: string): string {
  const h = size / 2;
  const at = `${r1(x)},${r1(y)}`;
  switch (m) {
    case 'cross':
      return `<path d="M${r1(x - h)},${r1(y - h)}L${r1(x + h)},${r1(y + h)}M${r1(x - h)},${r1(y + h)}L${r1(x + h)},${r1(y - h)}" stroke="${color}" stroke-width="2"/>`;
    case 'circle':
      return `<circle cx="${r1(x)}" cy="${r1(y)}" r="${r1(h)}" fill="none" stroke="${color}" stroke-width="1.8"/>`;
    case 'square':
      return `<rect x="${r1(x - h * 0.8)}" y="${r1(y - h * 0.8)}" width="${r1(h * 1.6)}" height="${r1(h * 1.6)}" fill="${color}"/>`;
    case 'triangle':
      return `<path d="M${at}m0,${r1(-h)}l${r1(h)},${r1(1.7 * h)}h${r1(-2 * h)}z" fill="${color}"/>`;
    case 'diamond':
    case 'diamond-open':
      return `<path d="M${at}m0,${r1(-h)}l${r1(h)},${r1(h)}l${r1(-h)},${r1(h)}l${r1(-h)},${r1(-h)}z" ${m === 'diamond' ? `fill="${color}"` : `fill="#ffffff" stroke="${color}" stroke-width="1.6"`}/>`;
  }
}

function legendSvg(series: PlotSeries[], left: number, top: number, width: number): string {
  const parts: string[] = [];
  const { at } = legendLayout(series, width);
  series.forEach((s, i) => {
    if (!s.name) return;
    const x = left + at[i][0];
    const y = top + at[i][1];
    if (s.line !== null) {
      parts.push(
        `<line x1="${r1(x)}" y1="${r1(y)}" x2="${r1(x + 24)}" y2="${r1(y)}" stroke="${s.color}" stroke-width="${Math.min(s.line?.width ?? 2, 5)}" stroke-dasharray="${DASHES[s.line?.dash ?? 'solid']}"/>`,
      );
    }
    if (s.marker) parts.push(markerPath(s.marker, x + 12, y, 8, s.color));
    parts.push(`<text x="${r1(x + 30)}" y="${r1(y + 4)}" font-size="11" fill="${MUTED}">${esc(s.name)}</text>`);
  });
  return parts.join('');
}

function panelSvg(p: PlotPanel, width: number, top: number, id: string): string {
  const f = frameOf(p, width, top);
  const { box } = f;
  const parts: string[] = [];
  const clip = `${id}-clip`;
  parts.push(
    `<clipPath id="${clip}"><rect x="${box.left}" y="${box.top}" width="${r1(box.width)}" height="${r1(box.height)}"/></clipPath>`,
  );
  if (p.title) parts.push(`<text x="${box.left}" y="${top + 14}" font-size="12" font-weight="600" fill="${TEXT}">${esc(p.title)}</text>`);
  parts.push(legendSvg(p.series, box.left, top + (p.title ? 30 : 12), box.width));
  // Grid and tick labels.
  const xt = ticks(p.x);
  const yt = ticks(p.y, Math.max(3, Math.round(box.height / 45)));
  for (const v of xt) {
    const X = f.px(v);
    parts.push(`<line x1="${r1(X)}" y1="${box.top}" x2="${r1(X)}" y2="${r1(box.top + box.height)}" stroke="${GRID}"/>`);
    parts.push(
      `<text x="${r1(X)}" y="${r1(box.top + box.height + 14)}" font-size="10" text-anchor="middle" fill="${MUTED}">${esc(tickText(v))}</text>`,
    );
  }
  for (const v of yt) {
    const Y = f.py(v);
    parts.push(`<line x1="${box.left}" y1="${r1(Y)}" x2="${r1(box.left + box.width)}" y2="${r1(Y)}" stroke="${GRID}"/>`);
    parts.push(`<text x="${box.left - 6}" y="${r1(Y + 3.5)}" font-size="10" text-anchor="end" fill="${MUTED}">${esc(tickText(v))}</text>`);
  }
  parts.push(`<rect x="${box.left}" y="${box.top}" width="${r1(box.width)}" height="${r1(box.height)}" fill="none" stroke="${AXIS}"/>`);
  parts.push(
    `<text x="${r1(box.left + box.width / 2)}" y="${r1(box.top + box.height + 32)}" font-size="11" text-anchor="middle" fill="${MUTED}">${esc(p.x.label)}</text>`,
  );
  parts.push(
    `<text transform="translate(${r1(box.left - 52)},${r1(box.top + box.height / 2)}) rotate(-90)" font-size="11" text-anchor="middle" fill="${MUTED}">${esc(p.y.label)}</text>`,
  );
  const body: string[] = [];
  const rule = (x1: number, y1: number, x2: number, y2: number, r: PlotRule, lx: number, ly: number, anchor: string) => {
    body.push(
      `<line x1="${r1(x1)}" y1="${r1(y1)}" x2="${r1(x2)}" y2="${r1(y2)}" stroke="${r.color}" stroke-width="1.2" stroke-dasharray="${DASHES[r.dash ?? 'dashed']}"/>`,
    );
    if (r.label)
      body.push(`<text x="${r1(lx)}" y="${r1(ly)}" font-size="10" text-anchor="${anchor}" fill="${r.color}">${esc(r.label)}</text>`);
  };
  for (const r of p.hRules ?? []) {
    const Y = f.py(r.at);
    // The label above the line, or below it when the line runs along the top edge.
    if (Number.isFinite(Y))
      rule(box.left, Y, box.left + box.width, Y, r, box.left + box.width - 4, Y - box.top < 14 ? Y + 12 : Y - 4, 'end');
  }
  for (const r of p.vRules ?? []) {
    const X = f.px(r.at);
    if (Number.isFinite(X)) rule(X, box.top, X, box.top + box.height, r, X + 4, box.top + 12, 'start');
  }
  for (const s of p.series) {
    if (s.line !== null) {
      for (const run of polylines(s, f)) {
        if (run.length < 2) continue;
        body.push(
          `<polyline points="${run.map(([x, y]) => `${r1(x)},${r1(y)}`).join(' ')}" fill="none" stroke="${s.color}" stroke-width="${s.line?.width ?? 2}" stroke-linejoin="round" stroke-dasharray="${DASHES[s.line?.dash ?? 'solid']}"/>`,
        );
      }
    }
    if (s.marker || s.labels) {
      const n = Math.min(s.x.length, s.y.length);
      for (let i = 0; i < n; i++) {
        const X = f.px(s.x[i]);
        const Y = f.py(s.y[i]);
        if (
          !Number.isFinite(X) ||
          !Number.isFinite(Y) ||
          X < box.left - 1 ||
          X > box.left + box.width + 1 ||
          Y < box.top - 1 ||
          Y > box.top + box.height + 1
        )
          continue;
        if (s.marker) body.push(markerPath(s.marker, X, Y, s.markerSize ?? 9, s.color));
        const t = s.labels?.[i];
        if (t) body.push(`<text x="${r1(X + 6)}" y="${r1(Y - 6)}" font-size="10" fill="${TEXT}">${esc(t)}</text>`);
      }
    }
  }
  for (const a of p.arrows ?? []) {
    const X = f.px(a.x);
    const Y = f.py(a.y);
    if (!Number.isFinite(X) || !Number.isFinite(Y)) continue;
    // The direction in pixels: the data-space direction through the axes' scales.
    const eps = 1e-6 * Math.max(1, Math.abs(a.x), Math.abs(a.y));
    const th = (a.angleDeg * Math.PI) / 180;
    let dx = f.px(a.x + eps * Math.cos(th)) - X;
    let dy = f.py(a.y + eps * Math.sin(th)) - Y;
    const len = Math.hypot(dx, dy);
    if (!(len > 0)) continue;
    dx /= len;
    dy /= len;
    const X2 = X + dx * a.lengthPx;
    const Y2 = Y + dy * a.lengthPx;
    // The head at the far end, or (into) at the point itself, pointing at it.
    const [tipX, tipY, ux, uy] = a.into ? [X, Y, -dx, -dy] : [X2, Y2, dx, dy];
    const hx = -ux * 7;
    const hy = -uy * 7;
    body.push(
      `<path d="M${r1(X)},${r1(Y)}L${r1(X2)},${r1(Y2)}M${r1(tipX)},${r1(tipY)}l${r1(hx - hy * 0.5)},${r1(hy + hx * 0.5)}M${r1(tipX)},${r1(tipY)}l${r1(hx + hy * 0.5)},${r1(hy - hx * 0.5)}" stroke="${a.color}" stroke-width="1.8" fill="none"/>`,
    );
    if (a.label)
      body.push(`<text x="${r1(X2 + dx * 4 + 3)}" y="${r1(Y2 + dy * 4 + 3)}" font-size="10" fill="${a.color}">${esc(a.label)}</text>`);
  }
  parts.push(`<g clip-path="url(#${clip})">${body.join('')}</g>`);
  return parts.join('');
}

/** Panels stacked on one width, as one SVG element. `id` keeps its clip paths apart from other charts on the page. */
export function plotSvg(panels: readonly PlotPanel[], opts: { width: number; id: string; title?: string }): string {
  const head = opts.title ? 22 : 0;
  let top = head;
  const parts: string[] = [];
  if (opts.title)
    parts.push(`<text x="${PLOT_MARGIN.left}" y="15" font-size="13" font-weight="600" fill="${TEXT}">${esc(opts.title)}</text>`);
  panels.forEach((p, i) => {
    parts.push(panelSvg(p, opts.width, top, `${opts.id}-${i}`));
    top += p.height;
  });
  const height = Math.ceil(top);
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${opts.width} ${height}" width="${opts.width}" height="${height}" font-family="system-ui, sans-serif" role="img" aria-label="${esc(opts.title ?? opts.id)}"><rect width="100%" height="100%" fill="#ffffff"/>${parts.join('')}</svg>`;
}
