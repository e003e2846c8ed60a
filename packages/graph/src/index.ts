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
