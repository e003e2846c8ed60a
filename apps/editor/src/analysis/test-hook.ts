/**
 * `window.__loopwright.analysis`: the data the analysis views draw, for browser tests and the
 * bench (read the charts' data, not their pixels), plus pixel positions on the locus chart
 * so a test can click a branch point.
 */
import { useResultsStore, resultsComplete } from './results-store.ts';
import { useAnalysisStore } from './analysis-store.ts';
import { currentInputs } from './driver.ts';
import { engineParameterName } from '@loopwright/study';
import { chartInstance, chartNames, chartShownOption } from '../views/chart-registry.ts';
import { tracesLive } from '../views/live-traces.ts';
import { drawnMarks } from '../views/mark-layer.ts';

export interface AnalysisHook {
  state(): unknown;
  /** ECharts getOption() of a chart on screen with its marks as series (functions dropped). */
  chartOption(name: string): unknown;
  chartNames(): string[];
  /** Whether a chart's traces are on its live layer now (a slider drag: live-traces.ts). */
  liveTraces(name: string): boolean;
  /** The drawn extent [min, max] of each y-axis of a chart (what its panels show). */
  yExtents(name: string): [number, number][] | null;
  /** Page coordinates (CSS px) of the s-plane point (re, im) on the locus chart. */
  locusPagePoint(re: number, im: number): { x: number; y: number } | null;
  /** Page coordinates (CSS px) of the marks a chart's mark layer has drawn (mark-layer.ts). */
  markPoints(name: string): { id: string; x: number; y: number }[];
  latencies(): number[];
  /** Per drawn generation: [input → last engine reply, last reply → drawn], ms. */
  breakdown(): [number, number][];
}

/** A plain copy: functions dropped, a series' typed-array data as rows of its dimensions ([t, y] pairs). */
const json = <T>(x: T): T =>
  JSON.parse(
    JSON.stringify(x, function (this: { dimensions?: unknown[] }, _k, v: unknown) {
      if (typeof v === 'function') return undefined;
      if (!(v instanceof Float64Array)) return v;
      const d = Math.max(1, this.dimensions?.length ?? 1);
      return Array.from({ length: Math.floor(v.length / d) }, (_, i) => Array.from(v.subarray(i * d, i * d + d)));
    }),
  ) as T;

export function installAnalysisHook(): void {
  const hook: AnalysisHook = {
    state() {
      const rs = useResultsStore.getState();
      const ui = useAnalysisStore.getState();
      const inp = currentInputs();
      const a = rs.analysis;
      return json({
        generation: rs.generation,
        renderedGeneration: rs.renderedGeneration,
        complete: resultsComplete(rs) && rs.renderedGeneration === rs.generation,
        view: ui.view,
        sweep: inp.sweep.choice
          ? {
              key: inp.sweep.choice.key,
              label: inp.sweep.choice.label,
              value: inp.sweep.value,
              live: ui.liveValue,
              parameter: engineParameterName(inp.sweep.choice.target),
            }
          : null,
        poles: a?.poles.ok ? a.poles.value.poles : null,
        polesDetail: a?.poles.ok ? a.poles.value : null,
        findings: rs.check?.findings ?? null,
        locus: a?.locus?.ok ? a.locus.value : null,
        locusError: a?.locus && !a.locus.ok ? a.locus.error : null,
        frequency: a?.frequency?.ok ? a.frequency.value : null,
        loops: rs.loops?.ok ? rs.loops.value : null,
        computeMs: rs.computeMs,
        response: rs.response,
        closedLoop: rs.closedLoop,
        pinnedRun: rs.pinnedRun,
        busy: rs.busy,
        errors: rs.errors,
        pinned: ui.pinned ? { label: ui.pinned.label, values: ui.pinned.values, until: ui.pinned.response?.settings.until ?? null } : null,
      });
    },
    chartOption: (name) => {
      const o = chartShownOption(name);
      return o ? json(o) : null;
    },
    chartNames,
    liveTraces: (name) => {
      const c = chartInstance(name);
      return c ? tracesLive(c) : false;
    },
    yExtents(name) {
      const c = chartInstance(name) as unknown as
        | { getModel(): { getComponent(t: string, i: number): { axis?: { scale: { getExtent(): [number, number] } } } | undefined } }
        | undefined;
      if (!c) return null;
      const out: [number, number][] = [];
      for (let i = 0; ; i++) {
        const axis = c.getModel().getComponent('yAxis', i)?.axis;
        if (!axis) return out;
        out.push(axis.scale.getExtent());
      }
    },
    locusPagePoint(re, im) {
      const c = chartInstance('locus');
      if (!c) return null;
      const p = c.convertToPixel({ gridIndex: 0 }, [re, im]) as number[];
      const rect = c.getDom().getBoundingClientRect();
      return { x: rect.left + p[0], y: rect.top + p[1] };
    },
    markPoints(name) {
      const c = chartInstance(name);
      if (!c) return [];
      const rect = c.getDom().getBoundingClientRect();
      return drawnMarks(c).map((m) => ({ id: m.id, x: rect.left + m.x, y: rect.top + m.y }));
    },
    latencies: () => [...useResultsStore.getState().latencies],
    breakdown: () => useResultsStore.getState().breakdown.map((b) => [...b] as [number, number]),
  };
  const w = window as unknown as { __loopwright?: Record<string, unknown> };
  w.__loopwright = w.__loopwright ?? {};
  w.__loopwright.analysis = hook;
}
