// Public API of @loopwright/tune: controller settings from published rules, an Ms-constrained
// tuner, the gain for a target damping on an exact locus, and cascade separation checks. Pure.
export * from './controller.ts';
export * from './predict.ts';
export * from './rules.ts';
export * from './ultimate.ts';
export * from './robust.ts';
export * from './damping.ts';
export * from './cascade.ts';
export * from './suggest.ts';
