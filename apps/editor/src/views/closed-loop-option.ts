/**
 * Charts of a closed-loop form (the Closed loop view): the exact step response of T(s) (dead
 * time included) and its Bode magnitude and phase.
 */
import type { ClosedLoopData } from '@loopwright/study';
import { fmt, fmtLogTick } from '../analysis/sweep.ts';
import type { Palette } from './palette.ts';
import type { ChartOption } from './echarts-setup.ts';

const axis = (pal: Palette, extra: object) => ({
  nameTextStyle: { color: pal.muted },
  axisLine: { onZero: false, lineStyle: { color: pal.axis } },
  axisLabel: { color: pal.muted, formatter: (v: number) => fmt(v, 3) },
  splitLine: { lineStyle: { color: pal.grid } },
  ...extra,
});

const line = (name: string, data: number[][], color: string, extra: object = {}) => ({
  type: 'line',
  name,
  showSymbol: false,
  animation: false,
  lineStyle: { color, width: 2 },
  itemStyle: { color },
  data,
  ...extra,
});

export function closedLoopStepOption(c: ClosedLoopData, pal: Palette): ChartOption | null {
  if (!c.step) return null;
  const { time, value } = c.step;
  const final = Number.isFinite(c.staticGain) ? c.staticGain : null;
  return {
    animation: false,
    backgroundColor: pal.background,
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v) },
    grid: { left: 64, right: 16, top: 16, bottom: 38 },
    xAxis: axis(pal, { type: 'value', name: 't [s]', nameLocation: 'middle', nameGap: 24, min: 0, max: time[time.length - 1] }),
    yAxis: axis(pal, { type: 'value', name: 'step response', nameLocation: 'middle', nameGap: 44, scale: true }),
    series: [
      line(
        `${c.toLabel} for a unit step at ${c.fromLabel}`,
        time.map((t, i) => [t, value[i]]),
        pal.series[0],
        final === null
          ? {}
          : {
              markLine: {
                silent: true,
                symbol: 'none',
                animation: false,
                lineStyle: { color: pal.limit, type: 'dashed' },
                label: { formatter: `T(0) = ${fmt(final, 3)}`, color: pal.limit, fontSize: 10 },
                data: [{ yAxis: final }],
              },
            },
      ),
    ],
  };
}

export function closedLoopBodeOption(c: ClosedLoopData, pal: Palette): ChartOption | null {
  if (!c.bode) return null;
  const { omega, magDb, phaseDeg } = c.bode;
  const log = (gridIndex: number, named: boolean) =>
    axis(pal, {
      type: 'log',
      gridIndex,
      min: omega[0],
      max: omega[omega.length - 1],
      name: named ? 'ω [rad/s]' : '',
      nameLocation: 'middle',
      nameGap: 24,
      axisLabel: { color: pal.muted, formatter: fmtLogTick },
    });
  return {
    animation: false,
    backgroundColor: pal.background,
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v) },
    axisPointer: { link: [{ xAxisIndex: 'all' }] },
    grid: [
      { left: 62, right: 16, top: 14, height: '36%' },
      { left: 62, right: 16, top: '56%', bottom: 38 },
    ],
    xAxis: [log(0, false), log(1, true)],
    yAxis: [
      axis(pal, { type: 'value', gridIndex: 0, scale: true, name: '|T| [dB]', nameLocation: 'middle', nameGap: 42 }),
      axis(pal, { type: 'value', gridIndex: 1, scale: true, name: '∠T [°]', nameLocation: 'middle', nameGap: 42 }),
    ],
    series: [
      line(
        '|T| dB',
        omega.map((w, i) => [w, magDb[i]]),
        pal.series[0],
        { xAxisIndex: 0, yAxisIndex: 0 },
      ),
      line(
        '∠T °',
        omega.map((w, i) => [w, phaseDeg[i]]),
        pal.series[1],
        { xAxisIndex: 1, yAxisIndex: 1 },
      ),
    ],
  };
}
