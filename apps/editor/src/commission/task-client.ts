/**
 * Requests to the task worker (task.worker.ts): a list of study requests with the diagram, one
 * result part each. Each lane ('fit', 'tune', …) keeps only its newest request: an answer to an
 * older one resolves as null, so a slow fit never overwrites the one asked for after it. Where
 * there is no Worker (unit tests in Node) the studies run in place.
 */
import type { Diagram } from '@loopwright/graph';
import { runStudies, type Part, type StudyRequest, type StudyResult } from '@loopwright/study';

export interface TaskRequest {
  id: number;
  diagram: Diagram;
  studies: StudyRequest[];
}

export type TaskReply =
  { id: number; ok: true; results: Part<StudyResult>[]; elapsedMs: number } | { id: number; ok: false; error: string };

let worker: Worker | null = null;
let seq = 0;
const newest = new Map<string, number>();
const waiting = new Map<number, (r: TaskReply) => void>();

function taskWorker(): Worker {
  if (worker) return worker;
  const w = new Worker(new URL('./task.worker.ts', import.meta.url), { type: 'module', name: 'loopwright-tasks' });
  w.onmessage = (e: MessageEvent<TaskReply>) => {
    const done = waiting.get(e.data.id);
    waiting.delete(e.data.id);
    done?.(e.data);
  };
  w.onerror = (e) => {
    e.preventDefault();
    for (const [id, done] of waiting) done({ id, ok: false, error: `task worker failed: ${e.message || 'unknown error'}` });
    waiting.clear();
    worker?.terminate();
    worker = null;
  };
  worker = w;
  return w;
}

/** Runs the studies; null when a newer request of the same lane was sent meanwhile. */
export async function runTask(lane: string, diagram: Diagram, studies: StudyRequest[]): Promise<Part<StudyResult>[] | null> {
  const id = ++seq;
  newest.set(lane, id);
  let reply: TaskReply;
  if (typeof Worker === 'undefined') {
    reply = { id, ok: true, results: runStudies(diagram, studies), elapsedMs: 0 };
  } else {
    reply = await new Promise<TaskReply>((resolve) => {
      waiting.set(id, resolve);
      taskWorker().postMessage({ id, diagram, studies } satisfies TaskRequest);
    });
  }
  if (newest.get(lane) !== id) return null;
  if (!reply.ok) throw new Error(reply.error);
  return reply.results;
}
