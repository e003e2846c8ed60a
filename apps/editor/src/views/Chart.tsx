/**
 * One ECharts chart in a React component: created once, given each new option (in full,
 * without animation, unless only its series' data changed: option-update.ts), resized with its
 * box, registered by name for export and tests. `marks` move without touching the option
 * (mark-layer.ts); `htmlLegend` draws the option's legend as HTML over the chart
 * (html-legend.tsx). `liveTraces` draws a stream of data-only updates (a slider drag) on a layer
 * of its own in held axes (live-traces.ts). `onSize` reports the drawing size so views can fit axes (the locus keeps
 * equal aspect).
 */
import { useEffect, useLayoutEffect, useMemo, useRef } from 'react';
import { echarts, type ChartInstance, type ChartOption } from './echarts-setup.ts';
import { registerChart, unregisterChart } from './chart-registry.ts';
import { MarkLayer, type MarkSeries } from './mark-layer.ts';
import { LiveTraces } from './live-traces.ts';
import { dataPatch, optionShape } from './option-update.ts';
import { HtmlLegend, legendEntries, withoutLegend } from './html-legend.tsx';

export interface ChartProps {
  name: string;
  option: ChartOption;
  /** Scatter marks on a layer of their own above the chart, moved without a new option. */
  marks?: MarkSeries[];
  /** The option's legend as HTML over the chart, not redrawn with each update (exports keep ECharts' own). */
  htmlLegend?: boolean;
  /** Line traces on value axes: a stream of data-only updates is drawn on a layer of its own (live-traces.ts). */
  liveTraces?: boolean;
  height?: number | string;
  onSize?(size: { width: number; height: number }): void;
  /** Pixel-level pointer events on the whole drawing surface (offsetX/offsetY). */
  onPointerMove?(chart: ChartInstance, x: number, y: number): void;
  onPointerLeave?(chart: ChartInstance): void;
  onPointerClick?(chart: ChartInstance, x: number, y: number): void;
  /** Mouse wheel over the chart; return true to stop the page from scrolling. */
  onWheel?(chart: ChartInstance, x: number, y: number, delta: number): boolean;
}

export function Chart(props: ChartProps) {
  const box = useRef<HTMLDivElement>(null);
  const inst = useRef<ChartInstance | null>(null);
  const layer = useRef<MarkLayer | null>(null);
  const live = useRef<LiveTraces | null>(null);
  /** The shape (optionShape) of the option the chart holds. */
  const shape = useRef('');
  const handlers = useRef(props);
  // The latest handlers, for the chart's own event callbacks (refs are written after render, not during it).
  useLayoutEffect(() => {
    handlers.current = props;
  });

  useLayoutEffect(() => {
    const el = box.current!;
    const chart = echarts.init(el, null, { renderer: 'canvas' });
    inst.current = chart;
    layer.current = new MarkLayer(chart);
    if (handlers.current.liveTraces)
      live.current = new LiveTraces(chart, (option) => {
        chart.setOption({ animation: false, ...(option as object) }, { notMerge: true, lazyUpdate: false });
        layer.current?.draw(handlers.current.marks);
      });
    const zr = chart.getZr();
    zr.on('mousemove', (e: { offsetX: number; offsetY: number }) => handlers.current.onPointerMove?.(chart, e.offsetX, e.offsetY));
    zr.on('globalout', () => handlers.current.onPointerLeave?.(chart));
    zr.on('click', (e: { offsetX: number; offsetY: number }) => handlers.current.onPointerClick?.(chart, e.offsetX, e.offsetY));
    zr.on('mousewheel', (e: { offsetX: number; offsetY: number; wheelDelta: number; event?: { preventDefault?(): void } }) => {
      if (handlers.current.onWheel?.(chart, e.offsetX, e.offsetY, e.wheelDelta)) e.event?.preventDefault?.();
    });
    const ro = new ResizeObserver(() => {
      chart.resize();
      layer.current?.redraw();
      live.current?.redraw();
      handlers.current.onSize?.({ width: el.clientWidth, height: el.clientHeight });
    });
    ro.observe(el);
    handlers.current.onSize?.({ width: el.clientWidth, height: el.clientHeight });
    return () => {
      ro.disconnect();
      live.current?.stop();
      live.current = null;
      unregisterChart(handlers.current.name, chart);
      chart.dispose();
      inst.current = null;
      layer.current = null;
      shape.current = '';
    };
  }, []);

  useEffect(() => {
    const chart = inst.current;
    if (!chart) return;
    const screen = props.htmlLegend ? withoutLegend(props.option) : props.option;
    const next = optionShape(screen);
    if (next === shape.current) {
      if (!live.current?.take(screen)) chart.setOption(dataPatch(screen), { notMerge: false, lazyUpdate: false });
    } else {
      live.current?.stop();
      chart.setOption({ animation: false, ...(screen as object) }, { notMerge: true, lazyUpdate: false });
    }
    shape.current = next;
    // the axes may have moved
    layer.current?.draw(handlers.current.marks);
    registerChart(props.name, chart, props.option, handlers.current.marks, props.htmlLegend);
  }, [props.option, props.name, props.htmlLegend]);

  useEffect(() => {
    const chart = inst.current;
    if (!chart) return;
    layer.current?.draw(props.marks);
    registerChart(props.name, chart, props.option, props.marks, props.htmlLegend);
  }, [props.marks]); // eslint-disable-line react-hooks/exhaustive-deps

  const entries = useMemo(() => (props.htmlLegend ? legendEntries(props.option) : []), [props.option, props.htmlLegend]);

  return (
    <>
      <div ref={box} className="lw-chart" data-chart={props.name} style={{ width: '100%', height: props.height ?? 320 }} />
      {props.htmlLegend && <HtmlLegend option={props.option} entries={entries} />}
    </>
  );
}
