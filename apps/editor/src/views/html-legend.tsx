/**
 * A chart's legend drawn as HTML over the band its option keeps for it, instead of by ECharts:
 * ECharts lays its legend out again on every update, which was about 40 % of redrawing a
 * response chart in Chromium on each slider step, while the names and line styles stay the
 * same for a whole drag. Only on screen: exports draw the option's own legend (chart-registry.ts).
 */
import type { ChartOption } from './echarts-setup.ts';
import { seriesOf } from './option-update.ts';

export interface LegendEntry {
  name: string;
  color: string;
  type: 'solid' | 'dashed' | 'dotted';
}

interface LegendOption {
  data?: unknown[];
  left?: number | string;
  right?: number | string;
  top?: number | string;
}

type SeriesLike = { name?: unknown; lineStyle?: { color?: unknown; type?: unknown }; itemStyle?: { color?: unknown } };

const legendOf = (option: ChartOption): LegendOption | null => {
  const l = (option as { legend?: unknown }).legend;
  return l && typeof l === 'object' && !Array.isArray(l) ? (l as LegendOption) : null;
};

/** The option without its legend (what the screen draws with an HTML legend over it). */
export function withoutLegend(option: ChartOption): ChartOption {
  if (!legendOf(option)) return option;
  const { legend: _drop, ...rest } = option as { legend?: unknown };
  return rest as ChartOption;
}

/** The legend's entries: its names (all series' names when it lists none), each with the first series of that name's colour and line type. */
export function legendEntries(option: ChartOption): LegendEntry[] {
  const legend = legendOf(option);
  if (!legend) return [];
  const series = seriesOf(option) as SeriesLike[];
  const names = legend.data
    ? legend.data.map((d) => (typeof d === 'string' ? d : String((d as { name?: unknown }).name ?? '')))
    : [...new Set(series.map((x) => String(x.name ?? '')))];
  return names.flatMap((name) => {
    const first = series.find((x) => x.name === name);
    if (!first) return [];
    const color = first.lineStyle?.color ?? first.itemStyle?.color;
    const type = first.lineStyle?.type;
    return [
      { name, color: typeof color === 'string' ? color : 'currentColor', type: type === 'dashed' || type === 'dotted' ? type : 'solid' },
    ];
  });
}

const px = (v: number | string | undefined, fallback: number) => (typeof v === 'number' ? `${v}px` : (v ?? `${fallback}px`));

export function HtmlLegend({ option, entries }: { option: ChartOption; entries: LegendEntry[] }) {
  const legend = legendOf(option);
  if (!legend || entries.length === 0) return null;
  return (
    <div className="lw-html-legend" data-legend style={{ left: px(legend.left, 60), right: px(legend.right, 10), top: px(legend.top, 0) }}>
      {entries.map((e) => (
        <span key={e.name} className="lw-html-legend-item" title={e.name}>
          <span className="lw-html-legend-line" style={{ borderTopColor: e.color, borderTopStyle: e.type }} />
          <span className="lw-html-legend-name">{e.name}</span>
        </span>
      ))}
    </div>
  );
}
