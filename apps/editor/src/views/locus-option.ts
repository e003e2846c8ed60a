/**
 * The Locus chart as an ECharts option (pure: data + window in, option out). Branches are
 * lines, open-loop poles ×, zeros ○, pinned closed-loop poles hollow grey diamonds (the current
 * ones are marks on a layer of their own: `locusMarks`); asymptotes dashed from the
 * centroid; breakaways and axis crossings labelled with their gains; departure and arrival
 * angles as arrows; optional constant-ζ rays and constant-ωn arcs.
 */
import { originAt, type Cx, type LocusData, type PoleOrigin } from '@loopwright/study';
import { fmt } from '../analysis/sweep.ts';
import type { PlaneWindow, PlotBox } from '../analysis/locus-geometry.ts';
import type { Palette } from './palette.ts';
import type { ChartOption } from './echarts-setup.ts';
import type { MarkSeries } from './mark-layer.ts';

/** A filled × (ECharts path symbols are filled, so the cross is drawn as a polygon). */
export const CROSS_SYMBOL = 'path://M2,0L5,3L8,0L10,2L7,5L10,8L8,10L5,7L2,10L0,8L3,5L0,2Z';

export const LOCUS_GRID = { left: 58, right: 14, top: 26, bottom: 38 };

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
  pinned: Cx[] | null;
  win: PlaneWindow;
  pal: Palette;
  dampingGuides: boolean;
  frequencyGuides: boolean;
  parameterLabel: string;
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
    (locus.rangeBranches ?? []).forEach((b, i) => {
      series.push({
        ...lineBase,
        name: i === 0 ? 'slider range' : `slider range ${i + 1}`,
        z: 2,
        lineStyle: { color: pal.sweep, width: 8, cap: 'round' },
        data: b.re.map((re, j) => [re, b.im[j]]),
      });
    });
    locus.branches.forEach((b, i) => {
      series.push({
        ...lineBase,
        name: `branch ${i + 1}`,
        lineStyle: { color: pal.series[i % pal.series.length], width: 2 },
        data: b.re.map((re, j) => [re, b.im[j]]),
      });
    });
    (locus.oppositeBranches ?? []).forEach((b, i) => {
      series.push({
        ...lineBase,
        name: `${locus.direction === 'negative' ? 'positive' : 'negative'} branch ${i + 1}`,
        lineStyle: { color: pal.series[i % pal.series.length], width: 1.5, type: 'dashed', opacity: 0.7 },
        data: b.re.map((re, j) => [re, b.im[j]]),
      });
    });
    if (locus.asymptotes && locus.asymptotes.anglesDeg.length > 0) {
      const c = locus.asymptotes.centroid;
      for (const ang of locus.asymptotes.anglesDeg) {
        series.push({
          ...lineBase,
          name: 'asymptote',
          z: 2,
          lineStyle: { color: pal.axis, width: 1, type: 'dashed' },
          data: ray(win, c, 0, ang),
        });
      }
      series.push({
        type: 'scatter',
        name: 'centroid',
        silent: true,
        z: 5,
        symbol: 'triangle',
        symbolSize: 9,
        itemStyle: { color: pal.axis },
        label: {
          show: c >= win.xMin && c <= win.xMax,
          position: 'bottom',
          color: pal.muted,
          fontSize: 10,
          formatter: `centroid ${fmt(c, 3)}`,
        },
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
      // Fixed poles (common to N0 and D0) do not move with the sweep: a branch of no length.
      data: pts([...locus.poles, ...locus.fixedPoles]),
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
    const inside = (re: number, im: number) => re >= win.xMin && re <= win.xMax && im >= win.yMin && im <= win.yMax;
    const labelled: number[][] = [];
    // One label per neighbourhood (8 % of the window): crowded special points keep their marker only.
    const roomFor = (re: number, im: number) => {
      const r = 0.08 * (win.xMax - win.xMin);
      if (labelled.some(([x, y]) => Math.hypot(x - re, y - im) < r)) return false;
      labelled.push([re, im]);
      return true;
    };
    const breakaways = locus.breakaways.filter((b) => inside(b.s.re, b.s.im));
    const crossings = locus.crossings.filter((c) => inside(0, c.omega));
    if (breakaways.length > 0) {
      series.push({
        type: 'scatter',
        name: 'breakaway points',
        silent: true,
        z: 6,
        symbol: 'rect',
        symbolSize: 7,
        itemStyle: { color: pal.muted },
        label: {
          show: true,
          position: 'top',
          color: pal.text,
          fontSize: 10,
          formatter: (p: { value: number[] }) => `k=${fmt(p.value[2], 3)}`,
        },
        data: breakaways.map((b) => ({ value: [b.s.re, b.s.im, b.gain], label: { show: roomFor(b.s.re, b.s.im) } })),
      });
    }
    if (crossings.length > 0) {
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
        data: crossings.flatMap((c) =>
          c.omega === 0
            ? [{ value: [0, 0, c.gain], label: { show: roomFor(0, 0) } }]
            : [
                { value: [0, c.omega, c.gain], label: { show: roomFor(0, c.omega) } },
                { value: [0, -c.omega, c.gain], label: { show: false } },
              ],
        ),
      });
    }
  }
  if (locus) {
    // Departure angles at complex poles and arrival angles at complex zeros, as short arrows
    // along the branch tangent (the angle and its label; Padé artefacts' left out), listed too.
    const len = 0.09 * (win.xMax - win.xMin);
    const arrow = (at: Cx, deg: number, into: boolean, label: string) => {
      const a = (deg * Math.PI) / 180;
      const tip = { re: at.re + len * Math.cos(a), im: at.im + len * Math.sin(a) };
      const [from, to] = into ? [tip, at] : [at, tip];
      return [
        { coord: [from.re, from.im], symbol: 'none' },
        {
          coord: [to.re, to.im],
          symbol: 'arrow',
          label: { show: true, formatter: label, color: pal.text, fontSize: 10, position: into ? 'start' : 'end' },
        },
      ];
    };
    const shown = (at: Cx) => at.im > 0 && at.re >= win.xMin && at.re <= win.xMax && at.im <= win.yMax;
    const deps = locus.departures.filter((d) => shown(d.at) && originAt(d.at, locus.poles, locus.poleOrigin) !== 'approximant');
    const arrs = locus.arrivals.filter((d) => shown(d.at) && originAt(d.at, locus.zeros, locus.zeroOrigin) !== 'approximant');
    if (deps.length + arrs.length > 0) {
      series.push({
        ...lineBase,
        id: 'angles',
        name: 'departure and arrival angles',
        z: 7,
        data: [],
        markLine: {
          silent: true,
          animation: false,
          symbolSize: 9,
          lineStyle: { color: pal.text, width: 1.5, type: 'solid' },
          data: [
            ...deps.map((d) => arrow(d.at, d.angleDeg, false, `θd ${fmt(d.angleDeg, 4)}°`)),
            ...arrs.map((d) => arrow(d.at, d.angleDeg, true, `θa ${fmt(d.angleDeg, 4)}°`)),
          ],
        },
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
  // Ticks on multiples of the step (ECharts would start them at the window edge, which is
  // not a round number in an equal-aspect window); grid lines drawn as mark lines to match.
  const ticks = (min: number, max: number) => {
    const out: number[] = [];
    for (let v = Math.ceil(min / win.step) * win.step; v <= max + 1e-9 * win.step; v += win.step)
      out.push(Math.abs(v) < 1e-12 * win.step ? 0 : v);
    return out;
  };
  const xt = ticks(win.xMin, win.xMax);
  const yt = ticks(win.yMin, win.yMax);
  const axis = (name: string, min: number, max: number, values: number[]) => ({
    type: 'value',
    name,
    nameLocation: 'middle',
    nameGap: name === 'Re s' ? 24 : 42,
    nameTextStyle: { color: pal.muted },
    min,
    max,
    axisLine: { onZero: false, lineStyle: { color: pal.axis } },
    axisTick: { customValues: values, lineStyle: { color: pal.axis } },
    axisLabel: { customValues: values, color: pal.muted, formatter: (v: number) => fmt(v, 3) },
    splitLine: { show: false },
  });
  const gridLines = {
    silent: true,
    symbol: 'none',
    animation: false,
    label: { show: false },
    lineStyle: { color: pal.grid, type: 'solid', width: 1 },
    data: [...xt.map((v) => ({ xAxis: v })), ...yt.map((v) => ({ yAxis: v }))],
  };

  return {
    animation: false,
    backgroundColor: pal.background,
    grid: { ...LOCUS_GRID, containLabel: false },
    xAxis: axis('Re s', win.xMin, win.xMax, xt),
    yAxis: axis('Im s', win.yMin, win.yMax, yt),
    series: [
      ...series,
      // The imaginary axis, drawn over the grid.
      {
        ...lineBase,
        name: 'imaginary axis',
        z: 2,
        lineStyle: { color: pal.axis, width: 1 },
        data: [
          [0, win.yMin],
          [0, win.yMax],
        ],
      },
      {
        ...lineBase,
        name: 'real axis',
        z: 2,
        lineStyle: { color: pal.axis, width: 1 },
        data: [
          [win.xMin, 0],
          [win.xMax, 0],
        ],
      },
      { ...lineBase, name: 'grid', z: 0, lineStyle: { width: 0 }, data: [], markLine: gridLines },
    ],
  };
}

/** Where a ζ label goes: near the top edge along the upper ray. */
function labelOnRay(win: PlaneWindow, th: number): { coord: number[] }[] {
  const r = Math.min(win.yMax / Math.max(Math.sin(th), 1e-6), -win.xMin / Math.max(Math.cos(th), 1e-6)) * 0.92;
  return [{ coord: [-r * Math.cos(th), r * Math.sin(th)] }];
}

/**
 * What changes while the slider moves or the pointer hovers: the current closed-loop poles
 * (those of a Padé approximant hollow, apart) and the hover ring, as marks on their own layer
 * (mark-layer.ts), so that the rest of the locus is not redrawn on every slider step.
 */
export function locusMarks(current: Cx[], hover: { s: Cx } | null, origin: readonly PoleOrigin[], pal: Palette): MarkSeries[] {
  const mark = (
    id: string,
    name: string,
    symbol: MarkSeries['symbol'],
    symbolSize: number,
    itemStyle: MarkSeries['itemStyle'],
    data: number[][],
  ) => ({ type: 'scatter', id, name, silent: true, symbol, symbolSize, itemStyle, data }) satisfies MarkSeries;
  return [
    mark(
      'closed-loop-poles',
      'closed-loop poles',
      'diamond',
      12,
      { color: pal.current, borderColor: pal.background, borderWidth: 1 },
      pts(current.filter((_, i) => origin[i] !== 'approximant')),
    ),
    mark(
      'closed-loop-poles-pade',
      'poles of a Padé approximant',
      'diamond',
      11,
      { color: pal.background, borderColor: pal.current, borderWidth: 1.5 },
      pts(current.filter((_, i) => origin[i] === 'approximant')),
    ),
    mark(
      'hover',
      'hover',
      'circle',
      9,
      { color: 'rgba(0,0,0,0)', borderColor: pal.text, borderWidth: 2 },
      hover ? [[hover.s.re, hover.s.im]] : [],
    ),
  ];
}
