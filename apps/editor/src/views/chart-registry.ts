/**
 * The charts on screen, by name, with the option and marks each was last given. Export (PNG
 * from the canvas instance, SVG from a throw-away SVG-renderer instance fed the same option and
 * marks) and the test hook read charts from here.
 */
import { echarts, type ChartInstance, type ChartOption } from './echarts-setup.ts';
import { withMarks, type MarkSeries } from './mark-layer.ts';

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

/** What a chart on screen shows, as one option: its instance's option with its marks (mark-layer.ts) added. */
export function chartShownOption(name: string): ChartOption | null {
  const e = charts.get(name);
  return e ? withMarks(e.instance.getOption() as ChartOption, e.marks) : null;
}

/** PNG data URL of a chart as drawn (2× pixel ratio, opaque background; with its legend drawn by ECharts). */
export function chartPngDataUrl(name: string, background = '#ffffff'): string | null {
  const e = charts.get(name);
  if (!e) return null;
  if (!e.htmlLegend) return e.instance.getDataURL({ type: 'png', pixelRatio: 2, backgroundColor: background });
  // drawn afresh, at the same size, from the option with its legend (the screen's is HTML)
  const width = e.instance.getWidth() || 800;
  const height = e.instance.getHeight() || 500;
  const png = echarts.init(document.createElement('div'), null, { renderer: 'canvas', width, height });
  try {
    png.setOption({ ...(withMarks(e.option, e.marks) as object), animation: false });
    return png.getDataURL({ type: 'png', pixelRatio: 2, backgroundColor: background });
  } finally {
    png.dispose();
  }
}

/** SVG text of a chart: the same option rendered by the SVG renderer at the same size. */
export function chartSvgText(name: string, background = '#ffffff'): string | null {
  const e = charts.get(name);
  if (!e) return null;
  const width = e.instance.getWidth() || 800;
  const height = e.instance.getHeight() || 500;
  const svg = echarts.init(null, null, { renderer: 'svg', ssr: true, width, height });
  try {
    svg.setOption({ ...(withMarks(e.option, e.marks) as object), backgroundColor: background, animation: false });
    return svg.renderToSVGString();
  } finally {
    svg.dispose();
  }
}
