// Test-only helpers of @loopwright/graph (`@loopwright/graph/testing`): compact builders for
// diagrams and linear graphs used by tests and benches. Not part of the public API.
export { diagramOf, threeLoopAxis } from './analysis/test-diagrams.ts';
export { graph, nestedChain, probeBlock, sourceBlock, sumBlock, tfBlock, wires } from './analysis/test-graphs.ts';
