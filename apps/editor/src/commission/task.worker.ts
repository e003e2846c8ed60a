/// <reference lib="webworker" />
/**
 * The worker for the work a button asks for — fitting a test log, a tuning, the cascade
 * workflow, a damping target: the study requests of a message run through @loopwright/study
 * and nothing else. Apart from the analysis channels, so a fit never holds up the views.
 */
import { runStudies } from '@loopwright/study';
import type { TaskReply, TaskRequest } from './task-client.ts';

const scope = self as unknown as DedicatedWorkerGlobalScope;

scope.onmessage = (e: MessageEvent<TaskRequest>) => {
  const t0 = performance.now();
  let reply: TaskReply;
  try {
    reply = { id: e.data.id, ok: true, results: runStudies(e.data.diagram, e.data.studies), elapsedMs: performance.now() - t0 };
  } catch (err) {
    reply = { id: e.data.id, ok: false, error: err instanceof Error ? err.message : String(err) };
  }
  scope.postMessage(reply);
};
