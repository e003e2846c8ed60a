/**
 * Live traces without a browser (ECharts' SVG renderer in node): the first data-only update
 * goes to the chart, the next ones in quick succession are drawn on the layer in held axes, an
 * axis widens only when a trace leaves it (and does not shrink while the stream lasts), and
 * a pause gives the chart its full option back. The layer's paths are checked against the
 * chart's own mapping of the same points (convertToPixel).
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { echarts, type ChartInstance, type ChartOption } from './echarts-setup.ts';
import { LiveTraces, SETTLE_MS, STREAM_MS, tracesLive, widened } from './live-traces.ts';

const trace = (gain: number) => {
  const d = new Float64Array(2 * 101);
  for (let i = 0; i <= 100; i++) {
    d[2 * i] = i / 100;
    d[2 * i + 1] = gain * (1 - Math.exp(-5 * (i / 100)));
  }
  return d;
};

/** A line series on grid i's axes. */
const line = (name: string, i: number, lineStyle: object, data: Float64Array) => ({
  type: 'line',
  name,
  dimensions: ['t', 'y'],
  xAxisIndex: i,
  yAxisIndex: i,
  lineStyle,
  data,
});

const option = (gain: number): ChartOption => ({
  animation: false,
  grid: [
    { left: 50, right: 10, top: 10, height: 80 },
    { left: 50, right: 10, top: 130, height: 80 },
  ],
  xAxis: [
    { type: 'value', gridIndex: 0, min: 0, max: 1 },
    { type: 'value', gridIndex: 1, min: 0, max: 1 },
  ],
  yAxis: [
    { type: 'value', gridIndex: 0, scale: true },
    { type: 'value', gridIndex: 1, scale: true },
  ],
  series: [
    line('a', 0, { color: '#123456', width: 2, type: 'solid' }, trace(gain)),
    line('b', 1, { color: '#654321', width: 1.5, type: 'dashed' }, trace(-gain)),
  ],
});

const charts: ChartInstance[] = [];
afterEach(() => {
  vi.useRealTimers();
  while (charts.length) charts.pop()!.dispose();
});

function setup() {
  const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width: 400, height: 240 });
  charts.push(chart);
  chart.setOption(option(10));
  let t = 0;
  const settled: ChartOption[] = [];
  const live = new LiveTraces(
    chart,
    (o) => settled.push(o),
    () => t,
  );
  return { chart, live, settled, at: (ms: number) => (t = ms) };
}

const yExtent = (chart: ChartInstance, i: number) =>
  (chart as unknown as { getModel(): { getComponent(t: string, i: number): { axis: { scale: { getExtent(): number[] } } } } })
    .getModel()
    .getComponent('yAxis', i)
    .axis.scale.getExtent();

const seriesData = (chart: ChartInstance) =>
  ((chart.getOption() as { series: { data: unknown }[] }).series ?? []).map((s) => (s.data as ArrayLike<unknown>).length);

/** The layer's paths: their pixel points, in series order. */
const layerPaths = (live: LiveTraces) =>
  (live as unknown as { group: { children(): { shape: { xy: Float64Array; n: number } }[] } }).group
    .children()
    .map((c) => Array.from(c.shape.xy.subarray(0, 2 * c.shape.n)));

describe('live traces', () => {
  it('rounds a grown range out to a 1–2–5 step', () => {
    expect(widened(0, 10, 0, 9.9)).toEqual([0, 10]);
    expect(widened(0, 10, -1, 12)).toEqual([-5, 15]);
    expect(widened(-50, 150, -2.5, 164.9)).toEqual([-50, 200]);
    expect(widened(0, 0, 0, 0)).toEqual([0, 0]);
  });

  it('streams after the first update, holds the axes, and settles after a pause', () => {
    vi.useFakeTimers();
    const { chart, live, settled, at } = setup();
    const y0 = yExtent(chart, 0);
    at(1000);
    // the first data-only update after a pause is the chart's own
    expect(live.take(option(9.8))).toBe(false);
    chart.setOption(option(9.8));
    at(1000 + STREAM_MS / 2);
    expect(live.take(option(9.6))).toBe(true);
    expect(tracesLive(chart)).toBe(true);
    // the chart keeps its axes and no series data of its own; the layer has the two traces
    expect(seriesData(chart)).toEqual([0, 0]);
    expect(yExtent(chart, 0)).toEqual(y0);
    const paths = layerPaths(live);
    expect(paths.length).toBe(2);
    // each point where the chart itself maps it (to a hundredth of a pixel)
    const d = trace(9.6);
    for (const i of [0, 17, 100]) {
      const px = chart.convertToPixel({ seriesIndex: 0 }, [d[2 * i], d[2 * i + 1]]) as number[];
      expect(paths[0][2 * i]).toBeCloseTo(px[0], 2);
      expect(paths[0][2 * i + 1]).toBeCloseTo(px[1], 2);
    }
    // a trace that leaves its axis widens it, with room to spare; the other stays put
    const y1 = yExtent(chart, 1);
    at(1000 + STREAM_MS);
    expect(live.take(option(14))).toBe(true);
    expect(yExtent(chart, 0)[1]).toBeGreaterThanOrEqual(14 + 0.25 * 14);
    expect(yExtent(chart, 1)[0]).toBeLessThanOrEqual(-14);
    expect(y1[0]).toBeGreaterThan(-14);
    // traces that shrink leave the axes as they are while the stream lasts
    const grown = yExtent(chart, 0);
    at(1000 + 1.5 * STREAM_MS);
    expect(live.take(option(2))).toBe(true);
    expect(yExtent(chart, 0)).toEqual(grown);
    // a pause: the chart gets the last option in full, the layer is empty
    expect(settled.length).toBe(0);
    vi.advanceTimersByTime(SETTLE_MS + 1);
    expect(settled.length).toBe(1);
    expect((settled[0] as { series: { data: Float64Array }[] }).series[0].data).toEqual(trace(2));
    expect(tracesLive(chart)).toBe(false);
    expect(layerPaths(live).length).toBe(0);
    // the settled option, given to the chart, fits its axis to the small traces again
    chart.setOption(settled[0], { notMerge: true });
    expect(yExtent(chart, 0)[1]).toBeLessThanOrEqual(4);
    // …and the next update starts afresh (the chart's own)
    at(1000 + 1.5 * STREAM_MS + 10);
    expect(live.take(option(3))).toBe(false);
  });

  it('stop: a new option in full ends the stream at once', () => {
    vi.useFakeTimers();
    const { chart, live, settled, at } = setup();
    at(0);
    live.take(option(9));
    at(10);
    expect(live.take(option(8))).toBe(true);
    live.stop();
    expect(tracesLive(chart)).toBe(false);
    expect(layerPaths(live).length).toBe(0);
    vi.advanceTimersByTime(SETTLE_MS + 1);
    expect(settled.length).toBe(0);
  });

  it('leaves charts it cannot draw to ECharts (a log axis)', () => {
    const { chart, live, at } = setup();
    const log = {
      ...option(5),
      xAxis: [
        { type: 'log', gridIndex: 0 },
        { type: 'value', gridIndex: 1 },
      ],
    } as ChartOption;
    chart.setOption(log, { notMerge: true });
    at(0);
    live.take(log);
    at(10);
    expect(live.take(log)).toBe(false);
  });
});
