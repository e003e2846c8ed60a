/**
 * Line traces drawn on a canvas layer of their own while a chart's data stream in (a slider
 * drag): ECharts runs its whole option pipeline for a data-only update — every axis, label and
 * series laid out again, the traces down-sampled, every layer repainted — which was 12–18 ms of
 * the page's work per slider step for the Response view's two charts (unminified build, Chromium),
 * most of a step's main-thread time. From the second data-only update in quick succession, the
 * chart keeps its axes and empties its series once, and each update draws the traces as plain
 * paths in those axes, widening an axis (a nice round range, one ECharts update) only when a
 * trace leaves it. A pause ends the stream: the chart gets its full option back, axes fitted
 * to the data again (also where the traces have shrunk meanwhile). What the screen shows is the same option throughout (chart-registry.ts
 * hands the data back to exports and the test hook while the layer holds it).
 */
import { echarts, type ChartInstance, type ChartOption } from './echarts-setup.ts';
import { seriesOf } from './option-update.ts';

/** Data-only updates closer together than this are a stream (a drag: one every 16–100 ms). */
export const STREAM_MS = 400;
/** This long after a stream's last update, the chart takes its full option again. */
export const SETTLE_MS = 300;
/** The layer above the chart's own (ECharts draws on level 0; the mark layer shares this one). */
const LEVEL = 1;

/** A range [lo, hi] grown to hold [a, b], rounded out to a multiple of a 1–2–5 step (about five ticks). */
export function widened(lo: number, hi: number, a: number, b: number): [number, number] {
  const l = Math.min(lo, a);
  const h = Math.max(hi, b);
  const span = h - l || Math.abs(h) || 1;
  const raw = span / 5;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const f = raw / mag;
  const step = (f <= 1 ? 1 : f <= 2 ? 2 : f <= 5 ? 5 : 10) * mag;
  return [Math.floor(l / step) * step, Math.ceil(h / step) * step];
}

/** The [t, y] points of a line series' data: flat [t0, y0, t1, y1, …] (typed) or [[t, y], …]. */
function pointsOf(data: unknown): { n: number; x(i: number): number; y(i: number): number } | null {
  if (ArrayBuffer.isView(data)) {
    const d = data as unknown as Float64Array;
    return { n: d.length >> 1, x: (i) => d[2 * i], y: (i) => d[2 * i + 1] };
  }
  if (Array.isArray(data)) {
    const d = data as unknown[];
    if (d.some((p) => !Array.isArray(p))) return null;
    const pairs = d as number[][];
    return { n: pairs.length, x: (i) => pairs[i][0], y: (i) => pairs[i][1] };
  }
  return null;
}

/** A polyline over pixel coordinates kept in one typed array (no point objects per step). */
const Trace = echarts.graphic.extendShape({
  type: 'lw-trace',
  shape: { xy: new Float64Array(0), n: 0 },
  buildPath(ctx: CanvasRenderingContext2D, shape: { xy: Float64Array; n: number }) {
    const { xy, n } = shape;
    for (let i = 0; i < n; i++) {
      const x = xy[2 * i];
      const y = xy[2 * i + 1];
      if (!Number.isFinite(x) || !Number.isFinite(y)) continue;
      if (i === 0 || !Number.isFinite(xy[2 * i - 2]) || !Number.isFinite(xy[2 * i - 1])) ctx.moveTo(x, y);
      else ctx.lineTo(x, y);
    }
  },
});

type AxisModel = { axis?: { type?: string; scale: { getExtent(): [number, number] } } };
type Model = { getComponent(t: string, i?: number): (AxisModel & { isSelected?(name: string): boolean }) | undefined };

interface Line {
  name: string;
  yAxis: number;
  color: string;
  width: number;
  type: string;
}

const livecharts = new WeakSet<ChartInstance>();

/** Whether a chart's traces are on its live layer now (its own series are empty). */
export const tracesLive = (chart: ChartInstance): boolean => livecharts.has(chart);

export class LiveTraces {
  private readonly group = new echarts.graphic.Group();
  private lastAt = -Infinity;
  private live = false;
  /** Each y-axis's held range while live. */
  private held: [number, number][] = [];
  private timer: ReturnType<typeof setTimeout> | null = null;
  private option: ChartOption | null = null;

  /** `settle(option)` gives the chart the option in full (the stream has ended). */
  constructor(
    private readonly chart: ChartInstance,
    private readonly settle: (option: ChartOption) => void,
    private readonly now: () => number = () => performance.now(),
  ) {
    chart.getZr().add(this.group);
  }

  /**
   * A data-only update: drawn on the layer (true), or left to the caller to give the chart as
   * usual (false: the first of a stream, or a chart whose series are not lines on value axes).
   */
  take(option: ChartOption): boolean {
    const t = this.now();
    const streaming = t - this.lastAt < STREAM_MS;
    this.lastAt = t;
    if (!this.live && (!streaming || !this.eligible(option))) return false;
    this.option = option;
    if (!this.live) this.enter(option);
    else this.fit(option);
    this.redraw();
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = setTimeout(() => this.end(), SETTLE_MS);
    return true;
  }

  /** Leaves the stream without settling (the caller gives the chart a new option in full). */
  stop(): void {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    this.live = false;
    livecharts.delete(this.chart);
    this.group.removeAll();
    this.lastAt = -Infinity;
  }

  /** The pause: the chart takes its full option (stop has reset the clock, so that update does not count as a step of a new stream). */
  private end(): void {
    const option = this.option;
    this.stop();
    if (option) this.settle(option);
  }

  private model(): Model {
    return (this.chart as unknown as { getModel(): Model }).getModel();
  }

  /** Line series on value (linear) axes only: the layer maps them linearly. */
  private eligible(option: ChartOption): boolean {
    const m = this.model();
    const series = seriesOf(option);
    if (series.length === 0) return false;
    return series.every((s) => {
      const ax = this.axesOf(s);
      return (
        s.type === 'line' &&
        pointsOf(s.data) !== null &&
        m.getComponent('xAxis', ax.x)?.axis?.type === 'value' &&
        m.getComponent('yAxis', ax.y)?.axis?.type === 'value'
      );
    });
  }

  private axesOf(s: Record<string, unknown>): { x: number; y: number } {
    return { x: typeof s.xAxisIndex === 'number' ? s.xAxisIndex : 0, y: typeof s.yAxisIndex === 'number' ? s.yAxisIndex : 0 };
  }

  /** Holds each y-axis where ECharts put it (grown to the new data if needed) and empties the series. */
  private enter(option: ChartOption): void {
    const m = this.model();
    this.held = [];
    for (let i = 0; ; i++) {
      const a = m.getComponent('yAxis', i)?.axis;
      if (!a) break;
      this.held.push([...a.scale.getExtent()]);
    }
    this.grow(option);
    this.live = true;
    livecharts.add(this.chart);
    this.chart.setOption(
      { yAxis: this.held.map(([min, max]) => ({ min, max })), series: seriesOf(option).map(() => ({ data: [] })) },
      { notMerge: false, lazyUpdate: false },
    );
  }

  /** Widens the held axes a trace has left (one ECharts update); the common case changes nothing. */
  private fit(option: ChartOption): void {
    if (this.grow(option)) {
      this.chart.setOption({ yAxis: this.held.map(([min, max]) => ({ min, max })) }, { notMerge: false, lazyUpdate: false });
    }
  }

  /**
   * Grows `held` to the traces: an axis grows when a trace leaves it and otherwise stays put,
   * also when the traces shrink (the fit to them comes with the pause that ends the stream: an
   * axis that rescaled back and forth during a drag would both cost an ECharts update and make
   * the traces jump; a drag that went high and came back showed three refits in eleven steps).
   * True when an axis changed.
   */
  private grow(option: ChartOption): boolean {
    const lo = this.held.map(() => Infinity);
    const hi = this.held.map(() => -Infinity);
    for (const s of seriesOf(option)) {
      const p = pointsOf(s.data);
      const y = this.axesOf(s).y;
      if (!p || y >= this.held.length) continue;
      for (let i = 0; i < p.n; i++) {
        const v = p.y(i);
        if (v < lo[y]) lo[y] = v;
        if (v > hi[y]) hi[y] = v;
      }
    }
    let changed = false;
    this.held.forEach((h, y) => {
      if (!(lo[y] < h[0] || hi[y] > h[1])) return;
      // with a quarter of the new span to spare on the side that grew: a drag that keeps
      // raising a peak then refits every few steps, not every step
      const pad = 0.25 * (Math.max(hi[y], h[1]) - Math.min(lo[y], h[0]));
      this.held[y] = widened(h[0], h[1], lo[y] < h[0] ? lo[y] - pad : lo[y], hi[y] > h[1] ? hi[y] + pad : hi[y]);
      changed = true;
    });
    return changed;
  }

  /** Draws the traces again (a new update, or the chart was resized). */
  redraw(): void {
    this.group.removeAll();
    if (!this.live || !this.option) return;
    const chart = this.chart;
    const legend = this.model().getComponent('legend');
    seriesOf(this.option).forEach((s, i) => {
      const p = pointsOf(s.data);
      const line = lineOf(s, this.axesOf(s));
      if (!p || p.n === 0 || (legend?.isSelected && !legend.isSelected(line.name))) return;
      // the axes are linear: two points give the map from data to pixels
      const h = this.held[line.yAxis];
      const x0 = p.x(0);
      const x1 = p.x(p.n - 1) !== x0 ? p.x(p.n - 1) : x0 + 1;
      const a = chart.convertToPixel({ seriesIndex: i }, [x0, h[0]]) as number[] | undefined;
      const b = chart.convertToPixel({ seriesIndex: i }, [x1, h[1]]) as number[] | undefined;
      if (!a || !b) return;
      const sx = (b[0] - a[0]) / (x1 - x0);
      const sy = (b[1] - a[1]) / (h[1] - h[0] || 1);
      const xy = new Float64Array(2 * p.n);
      for (let k = 0; k < p.n; k++) {
        xy[2 * k] = a[0] + (p.x(k) - x0) * sx;
        xy[2 * k + 1] = a[1] + (p.y(k) - h[0]) * sy;
      }
      this.group.add(
        new Trace({
          zlevel: LEVEL,
          z2: i,
          silent: true,
          shape: { xy, n: p.n },
          style: {
            fill: 'none',
            stroke: line.color,
            lineWidth: line.width,
            lineDash: line.type === 'dashed' || line.type === 'dotted' ? line.type : undefined,
          },
        }),
      );
    });
  }
}

function lineOf(s: Record<string, unknown>, ax: { y: number }): Line {
  const ls = (s.lineStyle ?? {}) as { color?: unknown; width?: unknown; type?: unknown };
  const item = (s.itemStyle ?? {}) as { color?: unknown };
  const color = typeof ls.color === 'string' ? ls.color : typeof item.color === 'string' ? item.color : '#888';
  return {
    name: String(s.name ?? ''),
    yAxis: ax.y,
    color,
    width: typeof ls.width === 'number' ? ls.width : 2,
    type: typeof ls.type === 'string' ? ls.type : 'solid',
  };
}
