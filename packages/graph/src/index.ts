// Public API of @loopwright/graph: the diagram document, block catalogue, reduction, cuts, sweeps.
export * from './document-types.ts';
// Document, catalogue and parameter resolution (graph-document helper).
export * from './catalogue/index.ts';
export * from './resolve.ts';
export * from './schema.ts';
export * from './document.ts';
// Checks (graph-document helper): the Finding type and structural checks.
export * from './checks/finding.ts';
export * from './checks/structure.ts';
// Analysis: reduction, cuts, sweeps, loop interaction, analytical checks (graph-analysis helper).
export * from './analysis/linear-graph.ts';
export { linearGraphOf } from './analysis/from-diagram.ts';
export { type SignalRef, describeRef, prepareCut } from './analysis/points.ts';
export * from './analysis/reduce.ts';
export * from './analysis/state-space.ts';
export * from './analysis/cuts.ts';
export * from './analysis/sweep.ts';
export * from './analysis/loops.ts';
export * from './analysis/hidden-modes.ts';
export { type ExactEvaluator, exactEvaluator } from './analysis/cut-exact.ts';
export * from './checks/analytic.ts';
// checkDiagram (structural + analytical findings) and the demo diagrams (graph-document helper).
export * from './checks/diagram.ts';
export { demoDiagrams } from './demos/index.ts';
export { positioningAxis } from './demos/positioning-axis.ts';
export { heatingCascade } from './demos/heating-cascade.ts';
export { supplyLoop } from './demos/supply-loop.ts';
export { sampledAxis } from './demos/sampled-axis.ts';
