/**
 * Messages between the editor and its engine worker. A request carries the diagram and a list
 * of study requests (@loopwright/study); the reply carries one result part per request. The
 * result types live in the study package; nothing here decides anything about the analysis.
 *
 * Channels: 'check' (findings, once per edit), 'analysis' (locus, closed-loop poles, frequency
 * data at the cut), 'loops' (the loops table) and 'response' (time simulation). Each request
 * carries an id that grows per channel; the worker answers only the newest request it holds
 * per channel and the client drops any reply that is not for its newest request.
 */
import type { Diagram } from '@loopwright/graph';
import type { Part, StudyRequest, StudyResult } from '@loopwright/study';

export type Channel = 'check' | 'analysis' | 'loops' | 'response';
export const CHANNELS: readonly Channel[] = ['check', 'analysis', 'loops', 'response'];

export interface EngineRequest {
  channel: Channel;
  id: number;
  diagram: Diagram;
  studies: StudyRequest[];
}

export type EngineReply =
  | { channel: Channel; id: number; ok: true; results: Part<StudyResult>[]; elapsedMs: number }
  | { channel: Channel; id: number; ok: false; error: string };
