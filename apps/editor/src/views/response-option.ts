/**
 * Response charts: the chosen probes from the simulation with nonlinearities (solid) over the
 * linear model's response (dashed), the pinned design's run dotted, in small multiples (one
 * panel per unit); and the actuator signals with their limits marked.
 */
import { responsePanels, type ResponseResult } from '@loopwright/study';
import { fmt } from '../analysis/sweep.ts';
import type { Palette } from './palette.ts';
import type { ChartOption } from './echarts-setup.ts';

const MAX_POINTS = 1500;

/**
 * A trace as ECharts line data: [t0, y0, t1, y1, …] in one typed array (with the series'
 * `dimensions`), thinned to at most MAX_POINTS (keeps the first and last sample). ECharts copies
 * a typed array straight into its storage, where 1,000 [t, y] pairs are each cloned and parsed:
 * a slider step's traces draw in about half the time (measured in ECharts' SVG renderer).
 */
export function traceData(t: readonly number[], y: readonly number[] | undefined): Float64Array {
  if (!y) return new Float64Array(0);
  const n = Math.min(t.length, y.length);
  const stride = Math.max(1, Math.ceil(n / MAX_POINTS));
  const last = n > 0 && (n - 1) % stride !== 0;
  const out = new Float64Array(2 * (Math.ceil(n / stride) + (last ? 1 : 0)));
  let k = 0;
  for (let i = 0; i < n; i += stride) {
    out[k++] = t[i];
    out[k++] = y[i];
  }
  if (last) {
    out[k] = t[n - 1];
    out[k + 1] = y[n - 1];
  }
  return out;
}

/** The same points as [t, y] pairs (charts whose data mixes traces with other points). */
export function tracePairs(t: readonly number[], y: readonly number[] | undefined): number[][] {
  const d = traceData(t, y);
  const out: number[][] = [];
  for (let i = 0; i < d.length; i += 2) out.push([d[i], d[i + 1]]);
  return out;
}

/** A probe keeps its colour whichever probes are shown. */
export function probeColor(r: ResponseResult, id: string, pal: Palette): string {
  const i = Math.max(
    0,
    r.probes.findIndex((p) => p.id === id),
  );
  return pal.series[i % pal.series.length];
}

const axisStyle = (pal: Palette) => ({
  nameTextStyle: { color: pal.muted },
  axisLine: { onZero: false, lineStyle: { color: pal.axis } },
  axisLabel: { color: pal.muted, formatter: (v: number) => fmt(v, 3) },
  splitLine: { lineStyle: { color: pal.grid } },
});

function timeAxis(pal: Palette, until: number, gridIndex = 0, named = true) {
  return {
    type: 'value',
    gridIndex,
    name: named ? 't [s]' : '',
    nameLocation: 'middle',
    nameGap: 24,
    min: 0,
    max: until,
    ...axisStyle(pal),
  };
}

function valueAxis(pal: Palette, name: string, gridIndex = 0) {
  return { type: 'value', gridIndex, name, nameLocation: 'middle', nameGap: 44, scale: true, ...axisStyle(pal) };
}

const line = (name: string, data: Float64Array, color: string, type: 'solid' | 'dashed' | 'dotted', width = 2) => ({
  type: 'line',
  name,
  dimensions: ['t', 'y'],
  showSymbol: false,
  // Down-sample to the pixel width when drawing (largest-triangle-three-buckets keeps peaks).
  sampling: 'lttb',
  animation: false,
  lineStyle: { color, width, type },
  itemStyle: { color },
  data,
});

/** Height of one panel of the response's small multiples, px (the view sizes the chart from it). */
export const PANEL_PX = 130;
const LEGEND_PX = 28;
const AXIS_PX = 34;

/** The chart height for a number of panels. */
export const responseHeight = (panels: number): number => Math.max(240, LEGEND_PX + panels * PANEL_PX + 10);

/**
 * The response as small multiples on one time axis: probes of one unit share a panel and its
 * y-axis (a probe without a unit has its own), so a 10 mm position is never a flat line under a
 * 500 rad/s speed. Solid: the run as drawn; dashed: the linear model; dotted: the pinned design.
 */
export function responseOption(r: ResponseResult, probes: string[], pinned: ResponseResult | null, pal: Palette): ChartOption {
  const panels = responsePanels(r.probes, probes);
  const n = Math.max(1, panels.length);
  const height = responseHeight(n);
  const slot = (height - LEGEND_PX - 6) / n;
  const series: unknown[] = [];
  const names: string[] = [];
  panels.forEach((g, i) => {
    for (const id of g.probes) {
      const label = r.probes.find((p) => p.id === id)?.label ?? id;
      const color = probeColor(r, id, pal);
      names.push(label);
      const at = { xAxisIndex: i, yAxisIndex: i };
      series.push({ ...line(label, traceData(r.run.time, r.run.traces[id]), color, 'solid'), ...at });
      if (r.linear)
        series.push({ ...line(`${label} (linear)`, traceData(r.linear.time, r.linear.traces[id]), color, 'dashed', 1.5), ...at });
      if (pinned?.run.traces[id])
        series.push({ ...line(`${label} (pinned)`, traceData(pinned.run.time, pinned.run.traces[id]), pal.pinned, 'dotted', 1.5), ...at });
    }
  });
  const grids = Array.from({ length: n }, (_, i) => ({
    left: 64,
    right: 16,
    top: LEGEND_PX + i * slot,
    height: slot - AXIS_PX,
    outerBoundsMode: 'none',
  }));
  return {
    animation: false,
    backgroundColor: pal.background,
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v) },
    axisPointer: { link: [{ xAxisIndex: 'all' }] },
    legend: { type: 'scroll', top: 0, left: 60, right: 10, data: names, textStyle: { color: pal.muted } },
    grid: grids,
    xAxis: grids.map((_, i) => timeAxis(pal, r.until, i, i === n - 1)),
    yAxis: grids.map((_, i) => valueAxis(pal, panels[i]?.unit ?? 'value', i)),
    series,
  };
}

/** The frame both time charts share: tooltip, scrolling legend, grid and time/value axes. */
function timeChart(pal: Palette, until: number, yName: string, names: string[], series: unknown[]): ChartOption {
  return {
    animation: false,
    backgroundColor: pal.background,
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v) },
    legend: { type: 'scroll', top: 0, left: 60, right: 10, data: names, textStyle: { color: pal.muted } },
    grid: { left: 64, right: 16, top: 28, bottom: 38, outerBoundsMode: 'none' },
    xAxis: timeAxis(pal, until),
    yAxis: valueAxis(pal, yName),
    series,
  };
}

export function actuatorOption(r: ResponseResult, pinned: ResponseResult | null, pal: Palette): ChartOption {
  const series: unknown[] = [];
  const names: string[] = [];
  r.actuators.forEach((a, i) => {
    const color = pal.series[(i + 4) % pal.series.length];
    names.push(a.label);
    const limits = [a.lower, a.upper]
      .filter((v): v is number => v !== null && Number.isFinite(v))
      .map((v) => ({ yAxis: v, label: { formatter: `limit ${fmt(v, 3)}`, color: pal.limit, fontSize: 10, position: 'insideEndTop' } }));
    series.push({
      ...line(a.label, traceData(r.run.time, r.run.traces[a.key]), color, 'solid'),
      markLine: {
        silent: true,
        symbol: 'none',
        animation: false,
        lineStyle: { color: pal.limit, type: 'dashed', width: 1.5 },
        data: limits,
      },
    });
    if (r.linear) series.push(line(`${a.label} (linear)`, traceData(r.linear.time, r.linear.traces[a.key]), color, 'dashed', 1.5));
    if (pinned?.run.traces[a.key])
      series.push(line(`${a.label} (pinned)`, traceData(pinned.run.time, pinned.run.traces[a.key]), pal.pinned, 'dotted', 1.5));
  });
  return timeChart(pal, r.until, 'actuator', names, series);
}
