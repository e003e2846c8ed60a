/**
 * Frequency charts as ECharts options: Bode magnitude and phase of L at the cut (crossovers
 * and margins marked), Nyquist of L with the critical point, and |S|, |T| with their peaks.
 * A pinned result is overlaid dotted.
 */
import type { FrequencyData, MarginsData } from '@loopwright/study';
import { fmt, fmtLogTick } from '../analysis/sweep.ts';
import type { Palette } from './palette.ts';
import type { ChartOption } from './echarts-setup.ts';

const zip = (x: readonly number[], y: readonly number[]) => x.map((v, i) => [v, y[i]]);
/** The margins in one line (GM at the phase crossover, PM at the gain crossover, DM). */
export function marginsText(m: MarginsData): string {
  const parts = [
    `GM ${m.gainMarginDb === null ? '∞' : `${fmt(m.gainMarginDb, 3)} dB`}${m.phaseCrossover ? ` @ ${fmt(m.phaseCrossover, 3)}` : ''}`,
    `PM ${m.phaseMarginDeg === null ? '—' : `${fmt(m.phaseMarginDeg, 3)}°`}${m.gainCrossover ? ` @ ${fmt(m.gainCrossover, 3)}` : ''}`,
  ];
  if (m.delayMargin !== null) parts.push(`DM ${fmt(m.delayMargin, 3)} s`);
  if (m.lowerGainMarginDb !== null) parts.push(`lower GM ${fmt(m.lowerGainMarginDb, 3)} dB`);
  return parts.join(' · ');
}

export function sensitivityText(m: MarginsData): string {
  return `Ms ${fmt(m.peakSensitivity, 3)} · Mt ${fmt(m.peakComplementary, 3)} · bandwidth ${m.bandwidth === null ? '—' : `${fmt(m.bandwidth, 3)} rad/s`}`;
}

function valueAxis(pal: Palette, name: string, extra: object = {}) {
  return {
    type: 'value',
    name,
    nameLocation: 'middle',
    nameGap: 42,
    nameTextStyle: { color: pal.muted },
    scale: true,
    axisLine: { onZero: false, lineStyle: { color: pal.axis } },
    axisLabel: { color: pal.muted, formatter: (v: number) => fmt(v, 3) },
    splitLine: { lineStyle: { color: pal.grid } },
    ...extra,
  };
}

function logAxis(pal: Palette, name: string, gridIndex: number, min: number, max: number, showName = true) {
  return {
    type: 'log',
    gridIndex,
    name: showName ? name : '',
    nameLocation: 'middle',
    nameGap: 24,
    nameTextStyle: { color: pal.muted },
    min,
    max,
    logBase: 10,
    axisLine: { onZero: false, lineStyle: { color: pal.axis } },
    axisLabel: { color: pal.muted, formatter: fmtLogTick },
    splitLine: { lineStyle: { color: pal.grid } },
    minorSplitLine: { show: false },
  };
}

const lineSeries = (name: string, data: number[][], color: string, extra: object = {}) => ({
  type: 'line',
  name,
  showSymbol: false,
  sampling: 'lttb',
  animation: false,
  lineStyle: { color, width: 2 },
  itemStyle: { color },
  data,
  ...extra,
});

const pinnedStyle = (pal: Palette) => ({ lineStyle: { color: pal.pinned, width: 1.5, type: 'dotted' }, itemStyle: { color: pal.pinned } });

export function bodeOption(f: FrequencyData, pinned: FrequencyData | null, pal: Palette): ChartOption {
  const m = f.margins;
  const wMin = f.omega[0];
  const wMax = f.omega[f.omega.length - 1];
  const vline = (x: number, label: string) => ({ xAxis: x, label: { formatter: label, color: pal.text, fontSize: 10 } });
  const magMarks: unknown[] = [{ yAxis: 0, label: { show: false }, lineStyle: { color: pal.axis, type: 'solid' } }];
  const inRange = (w: number) => w >= wMin && w <= wMax;
  for (const wc of m.gainCrossovers.filter(inRange).slice(0, 6))
    magMarks.push(wc === m.gainCrossover ? vline(wc, `ωc ${fmt(wc, 3)}`) : { xAxis: wc, label: { show: false } });
  const phaseMarks: unknown[] = [];
  const pMin = Math.min(...f.phaseDeg);
  const pMax = Math.max(...f.phaseDeg);
  for (let k = -1980; k <= 1980; k += 360) {
    if (k >= pMin - 30 && k <= pMax + 30)
      phaseMarks.push({ yAxis: k, label: { show: false }, lineStyle: { color: pal.axis, type: 'solid' } });
  }
  for (const wp of m.phaseCrossovers.filter(inRange).slice(0, 6))
    phaseMarks.push(wp === m.phaseCrossover ? vline(wp, `ω180 ${fmt(wp, 3)}`) : { xAxis: wp, label: { show: false } });
  const marks = { silent: true, symbol: 'none', lineStyle: { color: pal.limit, type: 'dashed' }, animation: false };

  const series: unknown[] = [
    lineSeries('|L| dB', zip(f.omega, f.magDb), pal.series[0], { xAxisIndex: 0, yAxisIndex: 0, markLine: { ...marks, data: magMarks } }),
    lineSeries('∠L °', zip(f.omega, f.phaseDeg), pal.series[1], { xAxisIndex: 1, yAxisIndex: 1, markLine: { ...marks, data: phaseMarks } }),
  ];
  // The margins as vertical bars: GM at the phase crossover, PM at the gain crossover.
  if (m.phaseCrossover !== null && m.gainMarginDb !== null) {
    series.push(
      lineSeries(
        'gain margin',
        [
          [m.phaseCrossover, 0],
          [m.phaseCrossover, -m.gainMarginDb],
        ],
        pal.limit,
        { xAxisIndex: 0, yAxisIndex: 0, lineStyle: { color: pal.limit, width: 3 } },
      ),
    );
  }
  if (m.gainCrossover !== null && m.phaseMarginDeg !== null) {
    const base = nearestMultiple(interpAt(f.omega, f.phaseDeg, m.gainCrossover) - m.phaseMarginDeg);
    series.push(
      lineSeries(
        'phase margin',
        [
          [m.gainCrossover, base],
          [m.gainCrossover, base + m.phaseMarginDeg],
        ],
        pal.limit,
        { xAxisIndex: 1, yAxisIndex: 1, lineStyle: { color: pal.limit, width: 3 } },
      ),
    );
  }
  if (pinned) {
    series.push(
      lineSeries('pinned |L| dB', zip(pinned.omega, pinned.magDb), pal.pinned, { xAxisIndex: 0, yAxisIndex: 0, ...pinnedStyle(pal) }),
    );
    series.push(
      lineSeries('pinned ∠L °', zip(pinned.omega, pinned.phaseDeg), pal.pinned, { xAxisIndex: 1, yAxisIndex: 1, ...pinnedStyle(pal) }),
    );
  }
  return {
    animation: false,
    backgroundColor: pal.background,
    tooltip: { trigger: 'axis', axisPointer: { type: 'cross' }, valueFormatter: (v: number) => fmt(v) },
    grid: [
      { left: 62, right: 16, top: 14, height: '38%' },
      { left: 62, right: 16, top: '56%', bottom: 38 },
    ],
    xAxis: [logAxis(pal, 'ω [rad/s]', 0, wMin, wMax, false), logAxis(pal, 'ω [rad/s]', 1, wMin, wMax)],
    yAxis: [valueAxis(pal, '|L| [dB]', { gridIndex: 0 }), valueAxis(pal, '∠L [°]', { gridIndex: 1 })],
    series,
  };
}

function interpAt(x: readonly number[], y: readonly number[], at: number): number {
  for (let i = 0; i + 1 < x.length; i++) {
    if (x[i] <= at && at <= x[i + 1]) {
      const t = (Math.log(at) - Math.log(x[i])) / (Math.log(x[i + 1]) - Math.log(x[i]));
      return y[i] + t * (y[i + 1] - y[i]);
    }
  }
  return y[y.length - 1];
}

/** The odd multiple of 180° nearest a phase (the critical phase line the margin is read from). */
function nearestMultiple(p: number): number {
  return Math.round((p - 180) / 360) * 360 + 180;
}

export function nyquistOption(
  f: FrequencyData,
  pinned: FrequencyData | null,
  pal: Palette,
  size: { width: number; height: number },
): ChartOption {
  // Clip the view to a window around the critical point so that integrators do not squash it.
  const all: number[][] = zip(f.re, f.im);
  const R = 4;
  const inside = all.filter(([x, y]) => Math.hypot(x + 0.5, y) < R * 2);
  let xMin = -2;
  let xMax = 1;
  let yMin = -1.5;
  let yMax = 1.5;
  for (const [x, y] of inside) {
    xMin = Math.min(xMin, x);
    xMax = Math.max(xMax, x);
    yMin = Math.min(yMin, y, -y);
    yMax = Math.max(yMax, y, -y);
  }
  const w = Math.max(1, size.width - 68);
  const h = Math.max(1, size.height - 52);
  const ux = (xMax - xMin) / w;
  const uy = (yMax - yMin) / h;
  if (ux > uy) {
    const grow = (ux * h - (yMax - yMin)) / 2;
    yMin -= grow;
    yMax += grow;
  } else {
    const grow = (uy * w - (xMax - xMin)) / 2;
    xMin -= grow;
    xMax += grow;
  }
  const circle: number[][] = [];
  for (let i = 0; i <= 96; i++) circle.push([Math.cos((2 * Math.PI * i) / 96), Math.sin((2 * Math.PI * i) / 96)]);
  const series: unknown[] = [
    lineSeries('unit circle', circle, pal.guide, {
      silent: true,
      sampling: undefined,
      lineStyle: { color: pal.guide, width: 1, type: 'dotted' },
    }),
    // A parametric curve (x not monotonic): no down-sampling by x.
    lineSeries('L(jω), ω > 0', all, pal.series[0], { sampling: undefined }),
    lineSeries(
      'L(jω), ω < 0',
      zip(
        f.re,
        f.im.map((v) => -v),
      ),
      pal.series[0],
      { sampling: undefined, lineStyle: { color: pal.series[0], width: 1, type: 'dashed' } },
    ),
    {
      type: 'scatter',
      name: 'critical point −1',
      symbol: 'path://M2,0L5,3L8,0L10,2L7,5L10,8L8,10L5,7L2,10L0,8L3,5L0,2Z',
      symbolSize: 11,
      itemStyle: { color: pal.current },
      label: { show: true, position: 'bottom', formatter: '−1', color: pal.text },
      data: [[-1, 0]],
    },
  ];
  if (pinned) series.push(lineSeries('pinned L(jω)', zip(pinned.re, pinned.im), pal.pinned, { ...pinnedStyle(pal), sampling: undefined }));
  const ax = (name: string, min: number, max: number) =>
    valueAxis(pal, name, {
      min,
      max,
      scale: false,
      nameGap: name === 'Re L' ? 26 : 44,
      axisLabel: { color: pal.muted, showMinLabel: false, showMaxLabel: false, formatter: (v: number) => fmt(v, 3) },
    });
  return {
    animation: false,
    backgroundColor: pal.background,
    tooltip: { trigger: 'item', valueFormatter: (v: number) => fmt(v) },
    grid: { left: 54, right: 14, top: 14, bottom: 38 },
    xAxis: ax('Re L', xMin, xMax),
    yAxis: ax('Im L', yMin, yMax),
    series,
  };
}

export function sensitivityOption(f: FrequencyData, pinned: FrequencyData | null, pal: Palette): ChartOption {
  const m = f.margins;
  const marks: unknown[] = [{ yAxis: 0, label: { show: false }, lineStyle: { color: pal.axis, type: 'solid' } }];
  const points: unknown[] = [];
  if (m.peakSensitivity !== null && m.peakSensitivityFrequency !== null) {
    points.push({ coord: [m.peakSensitivityFrequency, 20 * Math.log10(m.peakSensitivity)], value: `Ms ${fmt(m.peakSensitivity, 3)}` });
  }
  const series: unknown[] = [
    lineSeries('|S| dB', zip(f.omega, f.sensDb), pal.series[2], {
      markLine: { silent: true, symbol: 'none', data: marks, animation: false },
      markPoint: {
        symbol: 'pin',
        symbolSize: 34,
        itemStyle: { color: pal.series[2] },
        label: { fontSize: 9, color: '#fff', formatter: 'Ms' },
        data: points,
      },
    }),
    lineSeries('|T| dB', zip(f.omega, f.compDb), pal.series[3]),
  ];
  if (pinned) {
    series.push(lineSeries('pinned |S| dB', zip(pinned.omega, pinned.sensDb), pal.pinned, pinnedStyle(pal)));
    series.push(lineSeries('pinned |T| dB', zip(pinned.omega, pinned.compDb), pal.pinned, pinnedStyle(pal)));
  }
  return {
    animation: false,
    backgroundColor: pal.background,
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v) },
    legend: { top: 2, right: 10, textStyle: { color: pal.muted } },
    grid: { left: 62, right: 16, top: 28, bottom: 38 },
    xAxis: logAxis(pal, 'ω [rad/s]', 0, f.omega[0], f.omega[f.omega.length - 1]),
    yAxis: valueAxis(pal, '[dB]'),
    series,
  };
}
