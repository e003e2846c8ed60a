// Public API of @loopwright/sim: diagram -> hybrid ODE on odex (saturation, rate limit, dead
// zone, dead time, PID anti-windup), budgets, traces and metrics.
export { compileModel, type CompiledModel, type CompiledBlock } from './compile.ts';
export { simulate } from './simulate.ts';
export type { SimulateOptions, SimResult, SimStatus, SimEvent, ActuatorFigures, SimStats } from './types.ts';
export { tracesCsv } from './csv.ts';
