// Test-only helpers of @loopwright/study (`@loopwright/study/testing`): compact diagram builders
// and scenarios of our own used by tests across the repo. Not part of the public API.
export { build, unityLoop } from './testing/builders.ts';
export { coolingReverseActing, furnaceCascade, r27Cascade, tankFeedforward } from './testing/scenarios.ts';
export { firstNaN } from './testing/finite.ts';
