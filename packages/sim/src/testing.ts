// Test-only helpers of @loopwright/sim (`@loopwright/sim/testing`): a compact diagram builder
// for simulation tests and benches. Not part of the public API.
export { buildDiagram } from './test-support/build-diagram.ts';
