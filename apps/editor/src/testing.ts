// Test-only entry of the editor (`@loopwright/editor/testing`): the worker's compute entry and
// the study requests the driver builds, for tests that compare the editor with the CLI.
export { computeReply } from './worker/compute.ts';
export { channelStudies, reportRequest, type AnalysisInputs } from './analysis/driver.ts';
/** The channels channelStudies gives requests for. */
export type Channel = Exclude<import('./worker/protocol.ts').ViewChannel, 'pinned'>;
// Canvas geometry the browser tests read wires with: the drawn path's corner points and the lane spacing.
export { pathPoints, type Point } from './canvas/wire-geometry.ts';
export { LANE_GAP } from './canvas/lanes.ts';
export { feedbackLanes, type Box } from './canvas/lanes.ts';
// The study requests of the Test log and Tune views (the agreement test sends them as the CLI does).
export { fitStudyRequests, tuneStudyRequest, type TuneOptions } from './commission/commission-store.ts';
