/// <reference lib="webworker" />
/**
 * The engine worker. Requests are held per channel and only the newest of each is computed:
 * messages that arrive while a computation runs queue up behind it, and the drain that
 * follows takes just the latest (older ones are answered by nothing; the client drops any
 * stray reply by id anyway). One request is computed per task so new messages get in between.
 * Progress is posted while a request computes; the user's Cancel ends the worker (the client
 * starts a fresh one), which stops any computation at once.
 */
import { computeReply, throttled } from './compute.ts';
import { PROGRESS_MS, type Channel, type EngineProgress, type EngineReply, type EngineRequest } from './protocol.ts';
import { packNumberArrays } from './number-arrays.ts';

const scope = self as unknown as DedicatedWorkerGlobalScope;
const held = new Map<Channel, EngineRequest>();
/** The client's newest request id (shared memory, cross-origin isolated pages only). */
let newest: Int32Array | null = null;
let scheduled = false;

function schedule(): void {
  if (scheduled) return;
  scheduled = true;
  setTimeout(drain, 0);
}

function drain(): void {
  scheduled = false;
  const next = held.entries().next();
  if (next.done) return;
  const [channel, req] = next.value;
  held.delete(channel);
  // Where shared memory is allowed, a simulation sees a newer request at once and stops.
  const isCancelled = newest ? () => Atomics.load(newest!, 0) > req.id : undefined;
  // Progress of this request, at most every PROGRESS_MS (the client shows it and offers Cancel).
  const onProgress = throttled(
    (progress: EngineProgress['progress']) => scope.postMessage({ channel, id: req.id, progress } satisfies EngineProgress),
    PROGRESS_MS,
  );
  const reply: EngineReply = computeReply(req, { isCancelled, onProgress });
  const { message, transfer } = packNumberArrays(reply);
  scope.postMessage(message, transfer);
  if (held.size > 0) schedule();
}

scope.onmessage = (e: MessageEvent<EngineRequest | { channel: 'control'; newest: Int32Array }>) => {
  if (e.data.channel === 'control') {
    newest = e.data.newest;
    return;
  }
  held.set(e.data.channel, e.data);
  schedule();
};
