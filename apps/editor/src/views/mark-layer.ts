/**
 * Marks that move on every slider step or pointer move (the locus's closed-loop poles and hover
 * ring), drawn as plain shapes on a canvas layer of their own above the chart. Moving them
 * repaints that layer only: given to ECharts as series, every step re-ran its whole option
 * pipeline and repainted every series (a locus has thousands of points), 11–20 ms per step in
 * Chromium. They are kept in the shape of ECharts scatter series, so SVG export and the test
 * hook add them to the chart's option as they are (`withMarks`), and a PNG export, which
 * composites every layer, has them too.
 */
import { echarts, type ChartInstance, type ChartOption } from './echarts-setup.ts';
import { seriesOf } from './option-update.ts';

export interface MarkSeries {
  type: 'scatter';
  id: string;
  name: string;
  silent: true;
  symbol: 'diamond' | 'circle';
  symbolSize: number;
  itemStyle: { color: string; borderColor: string; borderWidth: number };
  /** [x, y] in the first grid's data coordinates. */
  data: number[][];
}

/** The chart's option with the marks as its last series (what the chart shows, in one option). */
export function withMarks(option: ChartOption, marks: readonly MarkSeries[] | undefined): ChartOption {
  if (!marks || marks.length === 0) return option;
  return { ...option, series: [...seriesOf(option), ...marks] };
}

/** The layer above every series (ECharts draws on level 0). */
const LEVEL = 1;

function shape(m: MarkSeries, x: number, y: number, order: number) {
  const style = { fill: m.itemStyle.color, stroke: m.itemStyle.borderColor, lineWidth: m.itemStyle.borderWidth };
  const r = m.symbolSize / 2;
  const common = { zlevel: LEVEL, z2: order, silent: true, style };
  return m.symbol === 'circle'
    ? new echarts.graphic.Circle({ ...common, shape: { cx: x, cy: y, r } })
    : new echarts.graphic.Polygon({
        ...common,
        shape: {
          points: [
            [x, y - r],
            [x + r, y],
            [x, y + r],
            [x - r, y],
          ],
        },
      });
}

/** Each chart's layer, for `drawnMarks`. */
const layers = new WeakMap<ChartInstance, MarkLayer>();

/** The marks a chart's layer holds now, in chart pixels (for the test hook). */
export function drawnMarks(chart: ChartInstance): { id: string; x: number; y: number }[] {
  return layers.get(chart)?.drawn.map((d) => ({ ...d })) ?? [];
}

export class MarkLayer {
  private readonly group = new echarts.graphic.Group();
  private marks: readonly MarkSeries[] = [];
  /** What `redraw` placed, in chart pixels. */
  drawn: { id: string; x: number; y: number }[] = [];

  constructor(private readonly chart: ChartInstance) {
    chart.getZr().add(this.group);
    layers.set(chart, this);
  }

  /** Draws the marks (kept for `redraw`); points outside the first grid are left out, as ECharts clips a scatter. */
  draw(marks: readonly MarkSeries[] | undefined): void {
    this.marks = marks ?? [];
    this.redraw();
  }

  /** Places the marks again: after the axes changed (a new option) or the chart was resized. */
  redraw(): void {
    this.group.removeAll();
    this.drawn = [];
    const chart = this.chart;
    this.marks.forEach((m, order) => {
      for (const p of m.data) {
        let px: number[] | undefined;
        try {
          px = chart.convertToPixel({ gridIndex: 0 }, p) as number[] | undefined;
        } catch {
          return; // no grid yet: the option has not been set
        }
        if (!px || !Number.isFinite(px[0]) || !Number.isFinite(px[1]) || !chart.containPixel({ gridIndex: 0 }, px)) continue;
        this.group.add(shape(m, px[0], px[1], order));
        this.drawn.push({ id: m.id, x: px[0], y: px[1] });
      }
    });
  }
}
