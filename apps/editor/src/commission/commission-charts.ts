/**
 * Chart options of the Test log and Tune views: the fitted response over the logged data (with
 * the recorded input on its own axis), the residuals of a fit, and the set-point and load step
 * responses of a tuning before (today, dashed) and after (the suggestion, solid).
 */
import type { FitData, FittedModel, StepResponses } from '@loopwright/study';
import { fmt } from '../analysis/sweep.ts';
import { tracePairs } from '../views/response-option.ts';
import type { ChartOption } from '../views/echarts-setup.ts';
import type { Palette } from '../views/palette.ts';

const axis = (pal: Palette, name: string, extra: Record<string, unknown> = {}) => ({
  type: 'value',
  name,
  nameLocation: 'middle',
  nameGap: 44,
  scale: true,
  nameTextStyle: { color: pal.muted },
  axisLine: { onZero: false, lineStyle: { color: pal.axis } },
  axisLabel: { color: pal.muted, formatter: (v: number) => fmt(v, 4) },
  splitLine: { lineStyle: { color: pal.grid } },
  ...extra,
});

const line = (name: string, data: (number | null)[][], color: string, type: 'solid' | 'dashed' | 'dotted', width = 2, yAxisIndex = 0) => ({
  type: 'line',
  name,
  showSymbol: false,
  sampling: 'lttb',
  animation: false,
  connectNulls: false,
  yAxisIndex,
  lineStyle: { color, width, type },
  itemStyle: { color },
  data,
});

function frame(pal: Palette, names: string[], xMax: number, yAxis: unknown, series: unknown[], rightGap = 16): ChartOption {
  // A legend of more than three names wraps onto a second row (a paged legend would hide the fits).
  const rows = names.length > 3 ? 2 : 1;
  return {
    animation: false,
    backgroundColor: pal.background,
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v) },
    legend: { type: 'plain', top: 0, left: 60, right: 10, itemWidth: 18, itemGap: 8, data: names, textStyle: { color: pal.muted } },
    grid: { left: 64, right: rightGap, top: 10 + 20 * rows, bottom: 38 },
    xAxis: { ...axis(pal, 't [s]', { nameGap: 24, scale: false, min: 0, max: xMax }) },
    yAxis,
    series,
  };
}

const MODEL_COLOR: Record<string, number> = { fopdt: 1, sopdt: 0, ipdt: 2 };

/** Logged output (thin), the chosen fit (solid) and the other fits (dashed), the recorded input on the right axis. */
export function fitOption(fit: FitData, chosen: string, pal: Palette): ChartOption {
  const { log } = fit;
  const t0 = log.time[0] ?? 0;
  const t = log.time.map((x) => x - t0);
  const end = t[t.length - 1] ?? 1;
  // Short legend names (the axes carry the column names).
  const names = ['measured', 'input'];
  const series: unknown[] = [
    line(names[0], tracePairs(t, log.output), pal.muted, 'solid', 1),
    line(names[1], tracePairs(t, log.input), pal.series[4], 'solid', 1.2, 1),
  ];
  for (const f of fit.fits) {
    if (!f.result.ok) continue;
    const name = f.model.toUpperCase();
    names.push(name);
    const mine = f.model === chosen;
    series.push(
      line(name, tracePairs(t, f.result.value.fitted), pal.series[MODEL_COLOR[f.model]], mine ? 'solid' : 'dashed', mine ? 2.2 : 1.2),
    );
  }
  return frame(
    pal,
    names,
    end,
    [axis(pal, log.columns.output), axis(pal, log.columns.input, { nameGap: 40, splitLine: { show: false } })],
    series,
    64,
  );
}

/** Residuals (measured − fitted) of one fit against time, with the zero line. */
export function residualOption(fit: FitData, f: FittedModel, pal: Palette): ChartOption {
  const t0 = fit.log.time[0] ?? 0;
  const t = f.time.map((x) => x - t0);
  const name = `${f.model.kind.toUpperCase()} residual`;
  const data = tracePairs(t, f.residuals);
  return frame(pal, [name], t[t.length - 1] ?? 1, axis(pal, `residual ${fit.log.columns.output}`), [
    {
      type: 'scatter',
      name,
      symbolSize: 2.5,
      animation: false,
      itemStyle: { color: pal.series[MODEL_COLOR[f.model.kind]] },
      data,
      markLine: {
        silent: true,
        symbol: 'none',
        animation: false,
        label: { show: false },
        lineStyle: { color: pal.axis, width: 1 },
        data: [{ yAxis: 0 }],
      },
    },
  ]);
}

const pairs = (t: number[], y: (number | null)[]) => t.map((x, i) => [x, y[i]]);

/** One of the two step responses: today (dashed, muted) and the suggestion (solid). */
export function stepOption(r: StepResponses, which: 'setpoint' | 'load', pal: Palette, yName: string): ChartOption {
  const s = r[which];
  const names: string[] = [];
  const series: unknown[] = [];
  if (s.before) {
    names.push('today');
    series.push(line('today', pairs(r.time, s.before), pal.pinned, 'dashed', 1.6));
  }
  names.push('suggested');
  series.push(line('suggested', pairs(r.time, s.after), pal.series[0], 'solid', 2.2));
  return frame(pal, names, r.time[r.time.length - 1] ?? 1, axis(pal, yName), series);
}
