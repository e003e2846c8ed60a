import { OdexEngine } from './odex/odex-engine.ts';
import type { RunState, SegmentEngine } from './run-state.ts';

/** Picks the engine for a run (see the README: which engine, and why). */
export function chooseEngine(rs: RunState, _metricCols: number[]): SegmentEngine {
  return new OdexEngine(rs);
}
