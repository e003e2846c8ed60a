/**
 * A pinned set of results for comparison: the parameter values they were computed at and
 * copies of what the views draw. Pinning copies; later results never change a snapshot.
 */
import type { Diagram } from '@loopwright/graph';
import type { AnalysisResult } from './results-store.ts';
import type { LiveValue } from '@loopwright/study';
import type { Cx, FrequencyData, LoopsData, Part, ResponseResult } from '@loopwright/study';

export interface AnalysisSnapshot {
  takenAt: string;
  label: string;
  /**
   * The design pinned: the document and the sweep value held then. Compare re-runs it under
   * the current simulation settings, so that two runs of different lengths are never compared.
   */
  diagram: Diagram;
  live: LiveValue | null;
  /** Named parameter values and gain-block values (block:<id>.k) in force. */
  values: Record<string, number>;
  poles: Cx[];
  frequency: FrequencyData | null;
  loops: LoopsData | null;
  response: ResponseResult | null;
}

/** Every value the results depend on that a user would tune: parameters and numeric gains, with the live sweep value in force. */
export function tunedValues(d: Diagram, live: LiveValue | null): Record<string, number> {
  const out: Record<string, number> = {};
  const gainKey = (id: string) => `${d.blocks.find((b) => b.id === id)?.label ?? id} · k`;
  for (const p of d.parameters) out[p.name] = p.value;
  for (const b of d.blocks) if (b.kind === 'gain' && typeof b.params.k === 'number') out[gainKey(b.id)] = b.params.k;
  if (live) out[live.target.kind === 'parameter' ? live.target.name : gainKey(live.target.block)] = live.value;
  return out;
}

export function takeSnapshot(
  label: string,
  design: { diagram: Diagram; live: LiveValue | null },
  values: Record<string, number>,
  a: AnalysisResult | null,
  loops: Part<LoopsData> | null,
  r: ResponseResult | null,
): AnalysisSnapshot {
  const copy = <T>(x: T): T => (x === null ? x : structuredClone(x));
  return {
    takenAt: new Date().toISOString(),
    label,
    diagram: design.diagram,
    live: design.live ? { ...design.live } : null,
    values: { ...values },
    poles: a?.poles.ok ? copy(a.poles.value.poles) : [],
    frequency: a?.frequency?.ok ? copy(a.frequency.value) : null,
    loops: loops?.ok ? copy(loops.value) : null,
    response: copy(r),
  };
}
