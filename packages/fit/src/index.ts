// Public API of @loopwright/fit: test logs (CSV) and process models fitted to them. Pure.
export * from './process-model.ts';
export * from './response.ts';
export * from './test-log.ts';
export * from './csv.ts';
export * from './sha256.ts';
export * from './two-point.ts';
export * from './half-rule.ts';
export * from './student-t.ts';
export * from './fit.ts';
export * from './provenance.ts';
export * from './demos/index.ts';
