// Test-only helpers of @loopwright/sim (`@loopwright/sim/testing`): a compact diagram builder
// for simulation tests and benches, and the exact engine's building blocks checked on their own
// (the exponential ladder and its cache, the step's products, the Hermite history). Not part of
// the public API.
export { buildDiagram } from './test-support/build-diagram.ts';
export { Ladder, clearLadders, ladderFor } from './exact/ladder.ts';
export { compress, matvecCompressed, matvecRect, mulRect } from './exact/dense.ts';
export { HermiteHistory } from './exact/hermite-history.ts';
