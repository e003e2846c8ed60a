// Public API of @loopwright/sampled: sampled-data controllers and loops (pure; no DOM or Node imports).
export * from './discrete.ts';
export * from './hold.ts';
export * from './tustin.ts';
export * from './pid.ts';
export * from './controller.ts';
export * from './executor.ts';
export * from './test-vector.ts';
export { checkCodeName, coefficientsText, describeController, cNumber, stNumber, ST_NO_LIMIT } from './codegen-common.ts';
export * from './codegen-c.ts';
export * from './codegen-st.ts';
export * from './export.ts';
export * from './unit-circle.ts';
export * from './jury.ts';
export * from './sampled-loop.ts';
export * from './sample-rate.ts';
export * from './sampled-margins.ts';
export * from './zlocus.ts';
export * from './delay-margin.ts';
