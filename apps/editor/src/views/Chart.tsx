/**
 * One ECharts chart in a React component: created once, given a new option on every render
 * (notMerge, no animation), resized with its box, registered by name for export and tests.
 * `onSize` reports the drawing size so views can fit axes (the locus keeps equal aspect).
 */
import { useEffect, useLayoutEffect, useRef } from 'react';
import { echarts, type ChartInstance, type ChartOption } from './echarts-setup.ts';
import { registerChart, unregisterChart } from './chart-registry.ts';

export interface ChartProps {
  name: string;
  option: ChartOption;
  /** A merge patch applied over `option` (cheap updates of a few series by id). */
  patch?: ChartOption;
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
  const handlers = useRef(props);
  // The latest handlers, for the chart's own event callbacks (refs are written after render, not during it).
  useLayoutEffect(() => {
    handlers.current = props;
  });

  useLayoutEffect(() => {
    const el = box.current!;
    const chart = echarts.init(el, null, { renderer: 'canvas' });
    inst.current = chart;
    const zr = chart.getZr();
    zr.on('mousemove', (e: { offsetX: number; offsetY: number }) => handlers.current.onPointerMove?.(chart, e.offsetX, e.offsetY));
    zr.on('globalout', () => handlers.current.onPointerLeave?.(chart));
    zr.on('click', (e: { offsetX: number; offsetY: number }) => handlers.current.onPointerClick?.(chart, e.offsetX, e.offsetY));
    zr.on('mousewheel', (e: { offsetX: number; offsetY: number; wheelDelta: number; event?: { preventDefault?(): void } }) => {
      if (handlers.current.onWheel?.(chart, e.offsetX, e.offsetY, e.wheelDelta)) e.event?.preventDefault?.();
    });
    const ro = new ResizeObserver(() => {
      chart.resize();
      handlers.current.onSize?.({ width: el.clientWidth, height: el.clientHeight });
    });
    ro.observe(el);
    handlers.current.onSize?.({ width: el.clientWidth, height: el.clientHeight });
    return () => {
      ro.disconnect();
      unregisterChart(handlers.current.name, chart);
      chart.dispose();
      inst.current = null;
    };
  }, []);

  useEffect(() => {
    const chart = inst.current;
    if (!chart) return;
    chart.setOption({ animation: false, ...(props.option as object) }, { notMerge: true, lazyUpdate: false });
    if (handlers.current.patch) chart.setOption(handlers.current.patch, { notMerge: false, lazyUpdate: false });
    registerChart(props.name, chart, props.option, handlers.current.patch);
  }, [props.option, props.name]);

  useEffect(() => {
    const chart = inst.current;
    if (!chart || !props.patch) return;
    chart.setOption(props.patch, { notMerge: false, lazyUpdate: false });
    registerChart(props.name, chart, props.option, props.patch);
  }, [props.patch]); // eslint-disable-line react-hooks/exhaustive-deps

  return <div ref={box} className="lw-chart" data-chart={props.name} style={{ width: '100%', height: props.height ?? 320 }} />;
}
