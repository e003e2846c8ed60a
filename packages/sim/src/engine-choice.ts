import { InputError } from '@loopwright/lti';
import { ExactEngine } from './exact/exact-engine.ts';
import { layoutOf } from './exact/mode-system.ts';
import { OdexEngine } from './odex/odex-engine.ts';
import type { RunState, SegmentEngine } from './run-state.ts';

/**
 * Above this many entries of the exact state z the matrix exponentials (N³ per mode) cost more
 * than odex's evaluations (N per stage): such diagrams run on odex.
 */
export const EXACT_MAX_SIZE = 120;

/**
 * Picks the engine for a run. 'auto' takes the exact engine when every operation is affine
 * within a mode, the exact state is at most EXACT_MAX_SIZE long, and the steps it needs (at most
 * the shortest dead time each) fit in the step budget; otherwise odex, which may step past a
 * dead time by extrapolating it. An explicit 'exact' that cannot apply is an input error.
 */
export function chooseEngine(rs: RunState, metricCols: number[]): SegmentEngine {
  const { net, s } = rs;
  if (s.engine === 'odex') return new OdexEngine(rs);
  const notAffine = net.nodes.find((nd) => !nd.op.affine);
  const size = layoutOf(net).N;
  const steps = ExactEngine.plannedSteps(s.until, s.dt, rs.built.delays[0] ?? Infinity, net.guards.length > 0);
  let why = '';
  if (notAffine) why = `block ${rs.blockId(notAffine.block)} is not piecewise affine`;
  else if (size > EXACT_MAX_SIZE) why = `the diagram has ${size - 1} states and inputs, above ${EXACT_MAX_SIZE - 1}`;
  else if (steps > s.maxSteps)
    why = `steps no longer than the shortest dead time would need about ${Math.ceil(steps)} steps, above the budget of ${s.maxSteps}`;
  if (why === '') return new ExactEngine(rs, metricCols);
  if (s.engine === 'exact')
    throw new InputError(`simulation option engine: the exact engine does not apply here: ${why}`, { field: 'engine' });
  return new OdexEngine(rs);
}
