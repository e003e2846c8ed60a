/**
 * How charts take a slider step's new data without a browser: the data-only update path
 * (option-update.ts), the traces as typed arrays (response-option.ts) checked against ECharts'
 * own SVG rendering of the same points given as [t, y] pairs, and the locus marks' series.
 */
import { describe, expect, it } from 'vitest';
import { echarts } from './echarts-setup.ts';
import { dataPatch, optionShape } from './option-update.ts';
import { traceData, tracePairs } from './response-option.ts';
import { locusMarks } from './locus-option.ts';
import { withMarks } from './mark-layer.ts';
import { palette } from './palette.ts';
import { legendEntries, withoutLegend } from './html-legend.tsx';
import { actuatorOption } from './response-option.ts';
import { demoDiagrams } from '@loopwright/graph';
import { responseStudy } from '@loopwright/study';

const frame = (data: unknown, limit = 48, max = 0.3) => ({
  xAxis: { type: 'value', min: 0, max },
  yAxis: { type: 'value', axisLabel: { formatter: (v: number) => v.toFixed(2) } },
  series: [
    { type: 'line', name: 'speed', data, markLine: { data: [{ yAxis: limit }] } },
    { type: 'line', name: 'speed (linear)', data },
  ],
});

describe('data-only chart updates', () => {
  it('the shape ignores the series data (arrays or typed) and nothing else', () => {
    const a = optionShape(frame([[0, 1]]));
    expect(optionShape(frame([[0, 2]]))).toBe(a);
    expect(optionShape(frame(new Float64Array([0, 3, 1, 4])))).toBe(a);
    // a mark line's data is part of the frame, and so are the axes
    expect(optionShape(frame([[0, 1]], 24))).not.toBe(a);
    expect(optionShape(frame([[0, 1]], 48, 0.5))).not.toBe(a);
    // functions by their source
    const other = frame([[0, 1]]);
    other.yAxis.axisLabel.formatter = (v: number) => v.toFixed(3);
    expect(optionShape(other)).not.toBe(a);
  });

  it('the patch carries each series’ data by index', () => {
    const d = new Float64Array([0, 1, 0.1, 2]);
    expect(dataPatch(frame(d))).toEqual({ series: [{ data: d }, { data: d }] });
    expect(dataPatch({ series: { type: 'line', data: [[1, 2]] } })).toEqual({ series: [{ data: [[1, 2]] }] });
  });
});

describe('traces as typed arrays', () => {
  const t = Array.from({ length: 3002 }, (_, i) => i * 1e-3);
  const y = t.map((x) => Math.sin(40 * x));

  it('thins to at most 1,500 points, keeping the first and the last sample', () => {
    const d = traceData(t, y);
    // stride ⌈3002 / 1500⌉ = 3: samples 0, 3, …, 3000, then the last one, 3001
    expect(d.length).toBe(2 * (1001 + 1));
    expect([d[0], d[1]]).toEqual([t[0], y[0]]);
    expect([d[2], d[3]]).toEqual([t[3], y[3]]);
    expect([d[d.length - 4], d[d.length - 3]]).toEqual([t[3000], y[3000]]);
    expect([d[d.length - 2], d[d.length - 1]]).toEqual([t[3001], y[3001]]);
    const short = traceData(t.slice(0, 1000), y.slice(0, 1000));
    expect(Array.from(short)).toEqual(t.slice(0, 1000).flatMap((v, i) => [v, y[i]]));
    expect(traceData(t, undefined).length).toBe(0);
    expect(tracePairs(t, y)).toEqual(Array.from({ length: d.length / 2 }, (_, i) => [d[2 * i], d[2 * i + 1]]));
  });

  it('ECharts draws the typed array exactly as the same points given as pairs', () => {
    const render = (data: unknown, dims: boolean) => {
      const c = echarts.init(null, null, { renderer: 'svg', ssr: true, width: 400, height: 240 });
      try {
        c.setOption({
          animation: false,
          xAxis: { type: 'value', min: 0, max: 3 },
          yAxis: { type: 'value', scale: true },
          series: [{ type: 'line', showSymbol: false, ...(dims ? { dimensions: ['t', 'y'] } : {}), data }],
        });
        // the drawn geometry (class names differ from instance to instance)
        return [...c.renderToSVGString().matchAll(/ d="([^"]*)"/g)].map((m) => m[1]);
      } finally {
        c.dispose();
      }
    };
    const typed = render(traceData(t, y), true);
    expect(typed.some((d) => d.length > 10_000)).toBe(true); // the trace's path
    expect(typed).toEqual(render(tracePairs(t, y), false));
  });
});

describe('locus marks', () => {
  it('split the current poles by origin, and are added to the option as its last series', () => {
    const pal = palette(false);
    const poles = [
      { re: -1, im: 2 },
      { re: -1, im: -2 },
      { re: -30, im: 0 },
    ];
    const marks = locusMarks(poles, { s: { re: -5, im: 1 } }, ['exact', 'exact', 'approximant'], pal);
    expect(marks.map((m) => [m.id, m.data])).toEqual([
      [
        'closed-loop-poles',
        [
          [-1, 2],
          [-1, -2],
        ],
      ],
      ['closed-loop-poles-pade', [[-30, 0]]],
      ['hover', [[-5, 1]]],
    ]);
    const shown = withMarks({ series: [{ type: 'line', id: 'branch' }] }, marks) as { series: { id: string }[] };
    expect(shown.series.map((s) => s.id)).toEqual(['branch', 'closed-loop-poles', 'closed-loop-poles-pade', 'hover']);
  });
});

describe('HTML legends', () => {
  it('list the legend’s names with their series’ colour and line type; the screen option has no legend left', () => {
    const pal = palette(false);
    const d = demoDiagrams.find((x) => x.id === 'positioning-axis')!.diagram;
    const r = responseStudy(d, { linearOverlay: true });
    const option = actuatorOption(r, null, pal) as {
      legend: { data: string[] };
      series: { name: string; lineStyle: { color: string; type: string } }[];
    };
    const entries = legendEntries(option);
    expect(entries.map((e) => e.name)).toEqual(option.legend.data);
    expect(entries.length).toBe(r.actuators.length);
    for (const e of entries) {
      const s = option.series.find((x) => x.name === e.name)!;
      expect([e.color, e.type]).toEqual([s.lineStyle.color, 'solid']);
    }
    const screen = withoutLegend(option) as { legend?: unknown; series: unknown[] };
    expect(screen.legend).toBeUndefined();
    expect(screen.series).toBe(option.series);
    // without a name list, every series once, dashed and dotted kept
    expect(
      legendEntries({
        legend: {},
        series: [
          { name: 'a', lineStyle: { color: '#111', type: 'dashed' } },
          { name: 'a', lineStyle: { color: '#222' } },
          { name: 'b', itemStyle: { color: '#333' }, lineStyle: { type: 'dotted' } },
        ],
      }),
    ).toEqual([
      { name: 'a', color: '#111', type: 'dashed' },
      { name: 'b', color: '#333', type: 'dotted' },
    ]);
    expect(legendEntries({ series: [{ name: 'a' }] })).toEqual([]);
  });
});
