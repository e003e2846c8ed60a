// Public API of @loopwright/sim: a diagram as a piecewise-affine model (saturation, rate limit,
// dead zone, dead time, PID anti-windup), moved exactly by matrix exponentials or by odex;
// budgets, traces and figures.
export { compileModel, type CompiledModel, type CompiledBlock } from './compile.ts';
export { simulate } from './simulate.ts';
export type { SimulateOptions, SimResult, SimStatus, SimEvent, ActuatorFigures, SimStats } from './types.ts';
export { tracesCsv } from './csv.ts';
