/**
 * Messages between the editor and its engine worker. A request carries the diagram and a list
 * of study requests (@loopwright/study); the reply carries one result part per request. The
 * result types live in the study package; nothing here decides anything about the analysis.
 *
 * Channels: 'check' (findings, once per edit), 'analysis' (locus, closed-loop poles, frequency
 * data at the cut), 'loops' (the loops table), 'response' (time simulation), 'closed-loop'
 * (the transfer function between two points), 'pinned' (the pinned design re-run under the
 * current simulation settings) — the views' channels — and 'report' (the design report, on
 * demand). Each request carries an id that grows per channel; the worker answers
 * only the newest request it holds per channel and the client drops any reply that is not for
 * its newest request. While computing, the worker posts progress messages for the request.
 */
import type { Diagram } from '@loopwright/graph';
import type { Part, StudyProgress, StudyRequest, StudyResult } from '@loopwright/study';

export type Channel = 'check' | 'analysis' | 'loops' | 'response' | 'closed-loop' | 'pinned' | 'report';
/** The channels the views' results come through (the driver keeps them current). */
export const CHANNELS: readonly Exclude<Channel, 'report'>[] = ['check', 'analysis', 'loops', 'response', 'closed-loop', 'pinned'];
export type ViewChannel = (typeof CHANNELS)[number];

export interface EngineRequest {
  channel: Channel;
  id: number;
  diagram: Diagram;
  studies: StudyRequest[];
}

export type EngineReply =
  | { channel: Channel; id: number; ok: true; results: Part<StudyResult>[]; elapsedMs: number }
  | { channel: Channel; id: number; ok: false; error: string; cancelled?: boolean };

/** How far the worker has got with a request (posted at most every PROGRESS_MS while it computes). */
export interface EngineProgress {
  channel: Channel;
  id: number;
  progress: StudyProgress;
}

export const PROGRESS_MS = 100;

export const isProgress = (m: EngineReply | EngineProgress): m is EngineProgress => 'progress' in m;
