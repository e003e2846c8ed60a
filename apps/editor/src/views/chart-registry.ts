/**
 * The charts on screen, by name, with the option and marks each was last given. Export (PNG
 * from the canvas instance, SVG from a throw-away SVG-renderer instance fed the same option and
 * marks) and the test hook read charts from here.
 */
import { echarts, type ChartInstance, type ChartOption } from './echarts-setup.ts';
import { withMarks, type MarkSeries } from './mark-layer.ts';
import { tracesLive } from './live-traces.ts';
import { seriesOf } from './option-update.ts';

interface Entry {
  instance: ChartInstance;
  option: ChartOption;
  marks?: MarkSeries[];
  /** The screen draws the option's legend as HTML (html-legend.tsx): a PNG is drawn afresh with ECharts' own. */
  htmlLegend?: boolean;
}

const charts = new Map<string, Entry>();

export function registerChart(
  name: string,
  instance: ChartInstance,
  option: ChartOption,
  marks?: MarkSeries[],
  htmlLegend?: boolean,
): void {
  charts.set(name, { instance, option, marks, htmlLegend });
}

export function unregisterChart(name: string, instance: ChartInstance): void {
  if (charts.get(name)?.instance === instance) charts.delete(name);
}

export const chartNames = (): string[] => [...charts.keys()];
export const chartInstance = (name: string): ChartInstance | undefined => charts.get(name)?.instance;

/**
 * What a chart on screen shows, as one option: its instance's option with its marks
 * (mark-layer.ts) added, and its traces' data while its live layer holds them (live-traces.ts).
 */
export function chartShownOption(name: string): ChartOption | null {
  const e = charts.get(name);
  if (!e) return null;
  let shown = e.instance.getOption() as ChartOption;
  if (tracesLive(e.instance)) {
    const given = seriesOf(e.option);
    shown = { ...shown, series: seriesOf(shown).map((s, i) => ({ ...s, data: given[i]?.data ?? s.data })) };
  }
  return withMarks(shown, e.marks);
}

/**
 * A chart's option with its marks, drawn afresh by a throw-away instance of the given renderer
 * at the chart's size (what `read` takes from it is returned; the instance is disposed).
 */
function drawnAfresh<T>(e: Entry, renderer: 'canvas' | 'svg', background: string | null, read: (c: ChartInstance) => T): T {
  const width = e.instance.getWidth() || 800;
  const height = e.instance.getHeight() || 500;
  const c =
    renderer === 'svg'
      ? echarts.init(null, null, { renderer: 'svg', ssr: true, width, height })
      : echarts.init(document.createElement('div'), null, { renderer: 'canvas', width, height });
  try {
    c.setOption({
      ...(withMarks(e.option, e.marks) as object),
      ...(background !== null ? { backgroundColor: background } : {}),
      animation: false,
    });
    return read(c);
  } finally {
    c.dispose();
  }
}

/** PNG data URL of a chart as drawn (2× pixel ratio, opaque background; with its legend drawn by ECharts). */
export function chartPngDataUrl(name: string, background = '#ffffff'): string | null {
  const e = charts.get(name);
  if (!e) return null;
  const png = (c: ChartInstance) => c.getDataURL({ type: 'png', pixelRatio: 2, backgroundColor: background });
  // a chart whose legend is HTML on screen is drawn afresh with ECharts' own
  return e.htmlLegend ? drawnAfresh(e, 'canvas', null, png) : png(e.instance);
}

/** SVG text of a chart: the same option rendered by the SVG renderer at the same size. */
export function chartSvgText(name: string, background = '#ffffff'): string | null {
  const e = charts.get(name);
  return e ? drawnAfresh(e, 'svg', background, (c) => c.renderToSVGString()) : null;
}
