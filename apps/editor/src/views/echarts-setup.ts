/**
 * ECharts, imported module by module (the full bundle is several hundred kB more): line and
 * scatter series on cartesian grids, tooltips, legends, mark lines/points/areas, titles, the
 * canvas renderer for the screen and PNG export, the SVG renderer for SVG export.
 */
import * as echarts from 'echarts/core';
import { LineChart, ScatterChart } from 'echarts/charts';
import {
  GridComponent,
  TooltipComponent,
  LegendComponent,
  MarkLineComponent,
  MarkPointComponent,
  MarkAreaComponent,
  TitleComponent,
  GraphicComponent,
  DataZoomInsideComponent,
} from 'echarts/components';
import { CanvasRenderer, SVGRenderer } from 'echarts/renderers';

echarts.use([
  LineChart,
  ScatterChart,
  GridComponent,
  TooltipComponent,
  LegendComponent,
  MarkLineComponent,
  MarkPointComponent,
  MarkAreaComponent,
  TitleComponent,
  GraphicComponent,
  DataZoomInsideComponent,
  CanvasRenderer,
  SVGRenderer,
]);

export { echarts };
export type ChartOption = echarts.EChartsCoreOption;
export type ChartInstance = echarts.ECharts;
