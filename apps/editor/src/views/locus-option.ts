/**
 * The Locus chart as an ECharts option (pure: data + window in, option out). Branches are
 * lines, open-loop poles ×, zeros ○, the current closed-loop poles filled diamonds, pinned
 * ones hollow diamonds; asymptotes dashed from the centroid; breakaways and axis crossings
 * labelled with their gains; optional constant-ζ rays and constant-ωn arcs.
 */
import type { Cx, LocusData } from '../worker/protocol.ts';
import { fmt } from '../analysis/sweep.ts';
import type { PlaneWindow, PlotBox } from '../analysis/locus-geometry.ts';
import type { Palette } from './palette.ts';
import type { ChartOption } from './echarts-setup.ts';

/** A filled × (ECharts path symbols are filled, so the cross is drawn as a polygon). */
export const CROSS_SYMBOL = 'path://M2,0L5,3L8,0L10,2L7,5L10,8L8,10L5,7L2,10L0,8L3,5L0,2Z';

export const LOCUS_GRID = { left: 58, right: 18, top: 34, bottom: 40 };

export function locusBox(width: number, height: number): PlotBox {
  return {
    left: LOCUS_GRID.left,
    top: LOCUS_GRID.top,
    width: Math.max(1, width - LOCUS_GRID.left - LOCUS_GRID.right),
    height: Math.max(1, height - LOCUS_GRID.top - LOCUS_GRID.bottom),
  };
}

export interface LocusOptionInput {
  locus: LocusData | null;
  current: Cx[];
  pinned: Cx[] | null;
  win: PlaneWindow;
  pal: Palette;
  dampingGuides: boolean;
  frequencyGuides: boolean;
  parameterLabel: string;
  hover: { s: Cx } | null;
}

const pts = (xs: readonly Cx[]) => xs.map((p) => [p.re, p.im]);

/** The segment from the centroid at an angle, clipped to the window. */
function ray(win: PlaneWindow, x0: number, y0: number, angleDeg: number): number[][] {
  const a = (angleDeg * Math.PI) / 180;
  const dx = Math.cos(a);
  const dy = Math.sin(a);
  let t = Infinity;
  if (dx > 1e-12) t = Math.min(t, (win.xMax - x0) / dx);
  if (dx < -1e-12) t = Math.min(t, (win.xMin - x0) / dx);
  if (dy > 1e-12) t = Math.min(t, (win.yMax - y0) / dy);
  if (dy < -1e-12) t = Math.min(t, (win.yMin - y0) / dy);
  if (!Number.isFinite(t) || t < 0) t = 0;
  return [
    [x0, y0],
    [x0 + t * dx, y0 + t * dy],
  ];
}

export function locusOption(inp: LocusOptionInput): ChartOption {
  const { locus, win, pal } = inp;
  const series: unknown[] = [];
  const lineBase = { type: 'line', showSymbol: false, silent: true, animation: false, clip: true, z: 3 };

  // Guides first (underneath).
  if (inp.dampingGuides) {
    for (const zeta of [0.2, 0.4, 0.6, 0.707, 0.9]) {
      const th = Math.acos(zeta);
      const r = Math.hypot(win.xMin, Math.max(win.yMax, -win.yMin)) * 1.5;
      series.push({
        ...lineBase,
        name: `ζ = ${zeta}`,
        z: 1,
        lineStyle: { color: pal.guide, width: 1, type: 'dotted' },
        data: [
          [-r * Math.cos(th), r * Math.sin(th)],
          [0, 0],
          [-r * Math.cos(th), -r * Math.sin(th)],
        ],
        endLabel: { show: false },
        markPoint: {
          silent: true,
          symbol: 'none',
          label: { color: pal.muted, fontSize: 10, formatter: `ζ=${zeta}` },
          data: labelOnRay(win, th),
        },
      });
    }
  }
  if (inp.frequencyGuides) {
    const rMax = Math.hypot(Math.min(win.xMin, 0), Math.max(win.yMax, -win.yMin));
    const step = win.step;
    for (let r = step; r < rMax; r += step) {
      const data: number[][] = [];
      for (let i = 0; i <= 48; i++) {
        const a = Math.PI / 2 + (i / 48) * Math.PI;
        data.push([r * Math.cos(a), r * Math.sin(a)]);
      }
      series.push({ ...lineBase, name: `ωn = ${fmt(r)}`, z: 1, lineStyle: { color: pal.guide, width: 1, type: 'dotted' }, data });
    }
  }

  if (locus) {
    locus.branches.forEach((b, i) => {
      series.push({
        ...lineBase,
        name: `branch ${i + 1}`,
        lineStyle: { color: pal.series[i % pal.series.length], width: 2 },
        data: b.re.map((re, j) => [re, b.im[j]]),
      });
    });
    (locus.negativeBranches ?? []).forEach((b, i) => {
      series.push({
        ...lineBase,
        name: `negative branch ${i + 1}`,
        lineStyle: { color: pal.series[i % pal.series.length], width: 1.5, type: 'dashed', opacity: 0.7 },
        data: b.re.map((re, j) => [re, b.im[j]]),
      });
    });
    if (locus.asymptotes && locus.asymptotes.anglesDeg.length > 0) {
      const c = locus.asymptotes.centroid;
      for (const ang of locus.asymptotes.anglesDeg) {
        series.push({ ...lineBase, name: 'asymptote', z: 2, lineStyle: { color: pal.axis, width: 1, type: 'dashed' }, data: ray(win, c, 0, ang) });
      }
      series.push({
        type: 'scatter',
        name: 'centroid',
        silent: true,
        z: 5,
        symbol: 'triangle',
        symbolSize: 9,
        itemStyle: { color: pal.axis },
        label: { show: true, position: 'bottom', color: pal.muted, fontSize: 10, formatter: `centroid ${fmt(c, 3)}` },
        data: [[c, 0]],
      });
    }
    series.push({
      type: 'scatter',
      name: 'open-loop poles',
      silent: true,
      z: 6,
      symbol: CROSS_SYMBOL,
      symbolSize: 11,
      itemStyle: { color: pal.pole },
      data: pts(locus.poles),
    });
    series.push({
      type: 'scatter',
      name: 'zeros',
      silent: true,
      z: 6,
      symbol: 'circle',
      symbolSize: 11,
      itemStyle: { color: 'rgba(0,0,0,0)', borderColor: pal.zero, borderWidth: 2 },
      data: pts(locus.zeros),
    });
    if (locus.breakaways.length > 0) {
      series.push({
        type: 'scatter',
        name: 'breakaway points',
        silent: true,
        z: 6,
        symbol: 'rect',
        symbolSize: 7,
        itemStyle: { color: pal.muted },
        label: { show: true, position: 'top', color: pal.text, fontSize: 10, formatter: (p: { value: number[] }) => `k=${fmt(p.value[2], 3)}` },
        data: locus.breakaways.map((b) => [b.s.re, b.s.im, b.gain]),
      });
    }
    if (locus.crossings.length > 0) {
      series.push({
        type: 'scatter',
        name: 'axis crossings',
        silent: true,
        z: 6,
        symbol: 'rect',
        symbolSize: 7,
        itemStyle: { color: pal.limit },
        label: {
          show: true,
          position: 'right',
          color: pal.text,
          fontSize: 10,
          formatter: (p: { value: number[] }) => `k=${fmt(p.value[2], 3)}  ω=${fmt(Math.abs(p.value[1]), 3)}`,
        },
        data: locus.crossings.flatMap((c) => (c.omega === 0 ? [[0, 0, c.gain]] : [[0, c.omega, c.gain], [0, -c.omega, c.gain]])),
      });
    }
  }
  if (inp.pinned && inp.pinned.length > 0) {
    series.push({
      type: 'scatter',
      name: 'pinned poles',
      silent: true,
      z: 7,
      symbol: 'diamond',
      symbolSize: 12,
      itemStyle: { color: 'rgba(0,0,0,0)', borderColor: pal.pinned, borderWidth: 2 },
      data: pts(inp.pinned),
    });
  }
  series.push({
    type: 'scatter',
    name: 'closed-loop poles',
    silent: true,
    z: 8,
    symbol: 'diamond',
    symbolSize: 12,
    itemStyle: { color: pal.current, borderColor: pal.background, borderWidth: 1 },
    data: pts(inp.current),
  });
  if (inp.hover) {
    series.push({
      type: 'scatter',
      name: 'hover',
      silent: true,
      z: 9,
      symbol: 'circle',
      symbolSize: 9,
      itemStyle: { color: 'rgba(0,0,0,0)', borderColor: pal.text, borderWidth: 2 },
      data: [[inp.hover.s.re, inp.hover.s.im]],
    });
  }

  const axis = (name: string, min: number, max: number) => ({
    type: 'value',
    name,
    nameLocation: 'middle',
    nameGap: name === 'Re s' ? 26 : 40,
    nameTextStyle: { color: pal.muted },
    min,
    max,
    interval: win.step,
    axisLine: { onZero: false, lineStyle: { color: pal.axis } },
    axisTick: { lineStyle: { color: pal.axis } },
    axisLabel: { color: pal.muted, showMinLabel: false, showMaxLabel: false, formatter: (v: number) => fmt(v, 3) },
    splitLine: { lineStyle: { color: pal.grid } },
  });

  return {
    animation: false,
    backgroundColor: pal.background,
    title: { text: `Locus — ${inp.parameterLabel}`, left: 8, top: 4, textStyle: { color: pal.text, fontSize: 13, fontWeight: 'normal' } },
    grid: { ...LOCUS_GRID, containLabel: false },
    xAxis: axis('Re s', win.xMin, win.xMax),
    yAxis: axis('Im s', win.yMin, win.yMax),
    series: [
      ...series,
      // The imaginary axis, drawn over the grid.
      { ...lineBase, name: 'imaginary axis', z: 2, lineStyle: { color: pal.axis, width: 1 }, data: [[0, win.yMin], [0, win.yMax]] },
      { ...lineBase, name: 'real axis', z: 2, lineStyle: { color: pal.axis, width: 1 }, data: [[win.xMin, 0], [win.xMax, 0]] },
    ],
  };
}

/** Where a ζ label goes: near the top edge along the upper ray. */
function labelOnRay(win: PlaneWindow, th: number): { coord: number[] }[] {
  const r = Math.min(win.yMax / Math.max(Math.sin(th), 1e-6), -win.xMin / Math.max(Math.cos(th), 1e-6)) * 0.92;
  return [{ coord: [-r * Math.cos(th), r * Math.sin(th)] }];
}
