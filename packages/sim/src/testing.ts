// Test-only helpers of @loopwright/sim (`@loopwright/sim/testing`): a compact diagram builder
// for simulation tests and benches, and the exact engine's building blocks checked on their own
// (the exponential ladder, the Hermite history). Not part of the public API.
export { buildDiagram } from './test-support/build-diagram.ts';
export { Ladder, clearLadders } from './exact/ladder.ts';
export { HermiteHistory } from './exact/hermite-history.ts';
