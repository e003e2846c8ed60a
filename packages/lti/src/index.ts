// Public API of @loopwright/lti: pure linear-systems math, no DOM or Node imports.
export * from './errors.ts';
export * from './complex.ts';
export * as poly from './poly.ts';
export type { Poly } from './poly.ts';
export * from './rational.ts';
export * from './transfer.ts';
export * from './roots.ts';
export * from './eigen.ts';
export * from './statespace.ts';
export * from './frequency.ts';
export * from './margins.ts';
export * from './parse.ts';
export * from './locus.ts';
export * from './pade.ts';
export * from './routh.ts';
export * from './cancel.ts';
export * from './exact-response.ts';
export * from './metrics.ts';
