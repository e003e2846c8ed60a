// Public API of @loopwright/graph: the diagram document, block catalogue, reduction, cuts, sweeps.
export * from './document-types.ts';
