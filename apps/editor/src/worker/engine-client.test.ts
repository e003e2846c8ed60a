/**
 * The worker client with a fake worker: only the newest request's reply is delivered, and a
 * stale simulation is cancelled by restarting the worker and resending the newest request; the
 * user's Cancel ends a computation at once; progress reaches the page, throttled.
 */
import { describe, expect, it, vi } from 'vitest';
import { CANCELLED, EngineClient, type WorkerLike } from './engine-client.ts';
import { throttled } from './compute.ts';
import type { EngineProgress, EngineReply, EngineRequest } from './protocol.ts';

class FakeWorker implements WorkerLike {
  onmessage: ((e: MessageEvent) => void) | null = null;
  onerror: ((e: ErrorEvent) => void) | null = null;
  received: EngineRequest[] = [];
  terminated = false;
  postMessage(msg: unknown): void {
    this.received.push(msg as EngineRequest);
  }
  terminate(): void {
    this.terminated = true;
  }
  reply(r: EngineReply): void {
    this.onmessage?.({ data: r } as MessageEvent);
  }
}

const diagram = {} as never;

/** A client whose workers are fakes (kept in order of creation) and the replies it delivers. */
function fakeClient(staleMs?: number) {
  const workers: FakeWorker[] = [];
  const c = new EngineClient(() => {
    const w = new FakeWorker();
    workers.push(w);
    return w;
  }, staleMs);
  const got: EngineReply[] = [];
  c.onReply((r) => got.push(r));
  return { c, workers, got };
}

describe('engine client', () => {
  it('drops replies to superseded requests and delivers the newest', () => {
    const { c, workers, got } = fakeClient();
    const a = c.send({ channel: 'analysis', diagram, studies: [] });
    const b = c.send({ channel: 'analysis', diagram, studies: [] });
    expect(workers).toHaveLength(1);
    workers[0].reply({ channel: 'analysis', id: a, ok: false, error: 'old' });
    expect(got).toHaveLength(0);
    workers[0].reply({ channel: 'analysis', id: b, ok: false, error: 'new' });
    expect(got.map((r) => r.id)).toEqual([b]);
    expect(c.stats('analysis').dropped).toBe(1);
    c.dispose();
  });
  it('channels are independent: a long simulation does not hold up the analysis', () => {
    const { c, workers, got } = fakeClient();
    c.send({ channel: 'response', diagram, studies: [] });
    const a = c.send({ channel: 'analysis', diagram, studies: [] });
    expect(workers).toHaveLength(2);
    workers[1].reply({ channel: 'analysis', id: a, ok: false, error: 'x' });
    expect(got.map((r) => r.channel)).toEqual(['analysis']);
    c.dispose();
  });
  it('a stale simulation is cancelled: the worker is ended and the newest request resent to a fresh one', () => {
    vi.useFakeTimers();
    try {
      const { c, workers, got } = fakeClient(400);
      c.send({ channel: 'response', diagram, studies: [{ kind: 'run', overrides: { k: 1 } }] });
      vi.advanceTimersByTime(100);
      const newest = c.send({ channel: 'response', diagram, studies: [{ kind: 'run', overrides: { k: 2 } }] });
      vi.advanceTimersByTime(500);
      expect(workers[0].terminated).toBe(true);
      expect(workers).toHaveLength(2);
      expect(workers[1].received.map((r) => r.id)).toEqual([newest]);
      expect(c.stats('response').restarts).toBe(1);
      workers[1].reply({ channel: 'response', id: newest, ok: false, error: 'done' });
      expect(got.map((r) => r.id)).toEqual([newest]);
      c.dispose();
    } finally {
      vi.useRealTimers();
    }
  });
  it('Cancel ends the worker at once, answers the newest request as cancelled, and the next request gets a fresh worker', () => {
    const { c, workers, got } = fakeClient();
    const id = c.send({ channel: 'loops', diagram, studies: [] });
    expect(c.cancel('loops')).toBe(true);
    expect(workers[0].terminated).toBe(true);
    expect(got).toEqual([{ channel: 'loops', id, ok: false, error: CANCELLED, cancelled: true }]);
    // A late answer of the ended worker is not delivered; nothing is pending any more.
    workers[0].reply({ channel: 'loops', id, ok: false, error: 'late' });
    expect(got).toHaveLength(1);
    expect(c.cancel('loops')).toBe(false);
    const next = c.send({ channel: 'loops', diagram, studies: [] });
    expect(workers).toHaveLength(2);
    expect(workers[1].received.map((r) => r.id)).toEqual([next]);
    c.dispose();
  });
  it('progress reaches its listeners for the newest request only', () => {
    const { c, workers } = fakeClient();
    const seen: EngineProgress[] = [];
    c.onProgress((p) => seen.push(p));
    const old = c.send({ channel: 'report', diagram, studies: [] });
    const id = c.send({ channel: 'report', diagram, studies: [] });
    const progress = { part: 0, parts: 1, kind: 'report' as const, fraction: 0.5 };
    workers[0].onmessage?.({ data: { channel: 'report', id: old, progress } } as MessageEvent);
    workers[0].onmessage?.({ data: { channel: 'report', id, progress } } as MessageEvent);
    expect(seen).toEqual([{ channel: 'report', id, progress }]);
    c.dispose();
  });
  it('the worker posts progress at most once per interval, the first after one (a quick request posts none)', () => {
    let t = 0;
    const posted: number[] = [];
    const post = throttled(
      (p: number) => posted.push(p),
      100,
      () => t,
    );
    for (let i = 0; i <= 30; i++) {
      post(i);
      t += 10;
    }
    // none before 100 ms, then one per 100 ms
    expect(posted).toEqual([10, 20, 30]);
  });
});
