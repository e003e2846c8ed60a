// Test-only helpers of @loopwright/sampled (`@loopwright/sampled/testing`): controller cases
// shared by the unit tests and the generated-code checks. Not part of the public API.
export { CASES } from './test-support/controller-cases.ts';
