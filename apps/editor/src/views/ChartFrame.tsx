/** A chart with its export buttons (PNG, SVG) in a small header. */
import type { ReactNode } from 'react';
import { Chart, type ChartProps } from './Chart.tsx';
import { chartPngDataUrl, chartSvgText } from './chart-registry.ts';
import { dataUrlToBlob, download, slug } from '../analysis/export.ts';
import { useDiagramStore } from '../store/diagram-store.ts';
import { useUiStore } from '../store/ui-store.ts';

export function exportChart(name: string, kind: 'png' | 'svg', background: string): void {
  const title = slug(useDiagramStore.getState().diagram.title);
  const data = kind === 'png' ? chartPngDataUrl(name, background) : chartSvgText(name, background);
  if (!data) {
    // The chart is being redrawn (theme change, tab switch): say so rather than do nothing.
    useUiStore.getState().notify({ kind: 'info', title: `The ${name} chart is still being drawn; export again in a moment.` });
    return;
  }
  if (kind === 'png') download(`${title}-${name}.png`, dataUrlToBlob(data));
  else download(`${title}-${name}.svg`, data, 'image/svg+xml');
}

export function ChartFrame(props: ChartProps & { title: string; background: string; extra?: ReactNode; overlay?: ReactNode }) {
  const { title, background, extra, overlay, ...chart } = props;
  return (
    <div className="lw-chart-frame">
      <div className="lw-chart-head">
        <span className="lw-chart-title">{title}</span>
        {extra}
        <span className="lw-spacer" />
        <button
          type="button"
          className="lw-mini"
          title={`Export ${title} as PNG`}
          data-export={`${chart.name}:png`}
          onClick={() => exportChart(chart.name, 'png', background)}
        >
          PNG
        </button>
        <button
          type="button"
          className="lw-mini"
          title={`Export ${title} as SVG`}
          data-export={`${chart.name}:svg`}
          onClick={() => exportChart(chart.name, 'svg', background)}
        >
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
