/**
 * The editor's side of the engine worker. One worker per channel, so a long simulation never
 * holds up the locus markers. Each channel keeps only its newest request: replies for older
 * ids are dropped, and a simulation that is still running when a newer request has waited
 * longer than `staleMs` is cancelled by ending its worker and starting a fresh one (a
 * synchronous integration inside a worker cannot see new messages until it returns).
 */
import { isProgress, type Channel, type EngineProgress, type EngineReply, type EngineRequest } from './protocol.ts';
import { unpackNumberArrays } from './number-arrays.ts';

type Listener = (reply: EngineReply) => void;
type ProgressListener = (p: EngineProgress) => void;

/** The reply a request gets when the user cancels it. */
export const CANCELLED = 'Cancelled: the computation was stopped before it finished.';
/** A request without its id (the client numbers it), kept as a union per channel. */
export type UnnumberedRequest = EngineRequest extends infer R ? (R extends EngineRequest ? Omit<R, 'id'> : never) : never;

export interface WorkerLike {
  postMessage(msg: unknown): void;
  terminate(): void;
  onmessage: ((e: MessageEvent) => void) | null;
  onerror: ((e: ErrorEvent) => void) | null;
}

export type WorkerFactory = () => WorkerLike;

interface ChannelState {
  worker: WorkerLike | null;
  /** Newest request id, shared with the worker when the page is cross-origin isolated (its sim polls it). */
  newest: Int32Array | null;
  seq: number;
  /** Newest request id sent and not yet answered (0 when idle). */
  pending: number;
  pendingRequest: EngineRequest | null;
  /** performance.now() when the request being computed was sent. */
  busySince: number;
  busyId: number;
  watchdog: ReturnType<typeof setTimeout> | null;
  restarts: number;
  dropped: number;
}

export class EngineClient {
  private readonly channels = new Map<Channel, ChannelState>();
  private readonly listeners = new Set<Listener>();
  private readonly progressListeners = new Set<ProgressListener>();

  constructor(
    private readonly factory: WorkerFactory,
    private readonly staleMs = 400,
    /** Channels whose stale work is cancelled by restarting the worker (analysis keeps its caches). */
    private readonly cancellable: readonly Channel[] = ['response', 'pinned'],
  ) {}

  onReply(fn: Listener): () => void {
    this.listeners.add(fn);
    return () => this.listeners.delete(fn);
  }

  /** Progress of the newest request of each channel, as the worker reports it. */
  onProgress(fn: ProgressListener): () => void {
    this.progressListeners.add(fn);
    return () => this.progressListeners.delete(fn);
  }

  /**
   * Stops the channel's computation at once (the user's Cancel): its worker is ended (a fresh
   * one serves the next request, so caches of that channel start empty) and the newest request
   * is answered with a cancelled reply. Returns false when nothing was pending.
   */
  cancel(channel: Channel): boolean {
    const ch = this.state(channel);
    const id = ch.pending;
    if (!id) return false;
    if (ch.watchdog) clearTimeout(ch.watchdog);
    ch.watchdog = null;
    ch.worker?.terminate();
    ch.worker = null;
    ch.newest = null;
    ch.pending = 0;
    ch.pendingRequest = null;
    ch.busyId = 0;
    this.emit({ channel, id, ok: false, error: CANCELLED, cancelled: true });
    return true;
  }

  /** Sends a request on its channel, superseding any older one; returns its id. */
  send(req: UnnumberedRequest): number {
    const ch = this.state(req.channel);
    const id = ++ch.seq;
    const full = { ...req, id } as EngineRequest;
    ch.pending = id;
    ch.pendingRequest = full;
    if (ch.newest) Atomics.store(ch.newest, 0, id);
    if (ch.busyId === 0) {
      ch.busyId = id;
      ch.busySince = performance.now();
    }
    this.worker(ch).postMessage(full);
    this.armWatchdog(req.channel, ch);
    return id;
  }

  stats(channel: Channel) {
    const ch = this.state(channel);
    return { seq: ch.seq, pending: ch.pending, restarts: ch.restarts, dropped: ch.dropped };
  }

  dispose(): void {
    for (const ch of this.channels.values()) {
      if (ch.watchdog) clearTimeout(ch.watchdog);
      ch.worker?.terminate();
      ch.worker = null;
    }
    this.listeners.clear();
    this.progressListeners.clear();
  }

  private state(channel: Channel): ChannelState {
    let ch = this.channels.get(channel);
    if (!ch) {
      ch = {
        worker: null,
        newest: null,
        seq: 0,
        pending: 0,
        pendingRequest: null,
        busySince: 0,
        busyId: 0,
        watchdog: null,
        restarts: 0,
        dropped: 0,
      };
      this.channels.set(channel, ch);
    }
    return ch;
  }

  private worker(ch: ChannelState): WorkerLike {
    if (ch.worker) return ch.worker;
    const w = this.factory();
    w.onmessage = (e: MessageEvent) => {
      // (the worker posts long number arrays packed: number-arrays.ts)
      const m = unpackNumberArrays(e.data as EngineReply | EngineProgress);
      if (isProgress(m)) {
        // Only the newest request's progress is of interest.
        if (m.id === ch.pending) for (const fn of this.progressListeners) fn(m);
        return;
      }
      this.receive(ch, m);
    };
    w.onerror = (e: ErrorEvent) => {
      // A crashed worker answers nothing more: report the failure for the newest request.
      e.preventDefault?.();
      const id = ch.pending;
      const channel = ch.pendingRequest?.channel ?? 'analysis';
      ch.worker?.terminate();
      ch.worker = null;
      ch.busyId = 0;
      if (id) this.emit({ channel, id, ok: false, error: `engine worker failed: ${e.message ?? 'unknown error'}` });
    };
    ch.worker = w;
    // Where shared memory is allowed, the worker's simulation sees a newer request at once and
    // stops (sim isCancelled); elsewhere the watchdog below restarts the worker instead.
    if (typeof SharedArrayBuffer !== 'undefined' && (globalThis as { crossOriginIsolated?: boolean }).crossOriginIsolated) {
      ch.newest = new Int32Array(new SharedArrayBuffer(4));
      Atomics.store(ch.newest, 0, ch.pending);
      w.postMessage({ channel: 'control', newest: ch.newest });
    }
    return w;
  }

  private receive(ch: ChannelState, reply: EngineReply): void {
    // The worker has finished one request; whatever it computes next is the newest it holds.
    ch.busyId = reply.id < ch.pending ? ch.pending : 0;
    ch.busySince = performance.now();
    if (reply.id !== ch.pending) {
      ch.dropped++;
      return;
    }
    ch.pending = 0;
    ch.pendingRequest = null;
    if (ch.watchdog) clearTimeout(ch.watchdog);
    ch.watchdog = null;
    this.emit(reply);
  }

  private emit(reply: EngineReply): void {
    for (const fn of this.listeners) fn(reply);
  }

  /** Cancels a stale computation: restart the worker and resend only the newest request. */
  private armWatchdog(channel: Channel, ch: ChannelState): void {
    if (!this.cancellable.includes(channel)) return;
    if (ch.watchdog) clearTimeout(ch.watchdog);
    ch.watchdog = setTimeout(() => {
      ch.watchdog = null;
      if (!ch.pending || !ch.pendingRequest) return;
      const computingOlder = ch.busyId !== 0 && ch.busyId < ch.pending;
      if (!computingOlder || performance.now() - ch.busySince < this.staleMs) {
        this.armWatchdog(channel, ch);
        return;
      }
      ch.worker?.terminate();
      ch.worker = null;
      ch.restarts++;
      ch.busyId = ch.pending;
      ch.busySince = performance.now();
      this.worker(ch).postMessage(ch.pendingRequest);
      this.armWatchdog(channel, ch);
    }, this.staleMs);
  }
}
