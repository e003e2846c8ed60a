/** A chart with its export buttons (PNG, SVG) in a small header. */
import type { ReactNode } from 'react';
import { Chart, type ChartProps } from './Chart.tsx';
import { chartPngDataUrl, chartSvgText } from './chart-registry.ts';
import { dataUrlToBlob, download, slug } from '../analysis/export.ts';
import { useDiagramStore } from '../store/diagram-store.ts';

export function exportChart(name: string, kind: 'png' | 'svg', background: string): void {
  const title = slug(useDiagramStore.getState().diagram.title);
  if (kind === 'png') {
    const url = chartPngDataUrl(name, background);
    if (url) download(`${title}-${name}.png`, dataUrlToBlob(url));
  } else {
    const svg = chartSvgText(name, background);
    if (svg) download(`${title}-${name}.svg`, svg, 'image/svg+xml');
  }
}

export function ChartFrame(props: ChartProps & { title: string; background: string; extra?: ReactNode; overlay?: ReactNode }) {
  const { title, background, extra, overlay, ...chart } = props;
  return (
    <div className="lw-chart-frame">
      <div className="lw-chart-head">
        <span className="lw-chart-title">{title}</span>
        {extra}
        <span className="lw-spacer" />
        <button type="button" className="lw-mini" title={`Export ${title} as PNG`} data-export={`${chart.name}:png`} onClick={() => exportChart(chart.name, 'png', background)}>
          PNG
        </button>
        <button type="button" className="lw-mini" title={`Export ${title} as SVG`} data-export={`${chart.name}:svg`} onClick={() => exportChart(chart.name, 'svg', background)}>
          SVG
        </button>
      </div>
      <div className="lw-chart-body">
        <Chart {...chart} height="100%" />
        {overlay}
      </div>
    </div>
  );
}
