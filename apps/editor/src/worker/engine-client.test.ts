/**
 * The worker client with a fake worker: only the newest request's reply is delivered, and a
 * stale simulation is cancelled by restarting the worker and resending the newest request.
 */
import { describe, expect, it, vi } from 'vitest';
import { EngineClient, type WorkerLike } from './engine-client.ts';
import type { EngineReply, EngineRequest } from './protocol.ts';

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

describe('engine client', () => {
  it('drops replies to superseded requests and delivers the newest', () => {
    const workers: FakeWorker[] = [];
    const c = new EngineClient(() => {
      const w = new FakeWorker();
      workers.push(w);
      return w;
    });
    const got: EngineReply[] = [];
    c.onReply((r) => got.push(r));
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
    const workers: FakeWorker[] = [];
    const c = new EngineClient(() => {
      const w = new FakeWorker();
      workers.push(w);
      return w;
    });
    const got: EngineReply[] = [];
    c.onReply((r) => got.push(r));
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
      const workers: FakeWorker[] = [];
      const c = new EngineClient(() => {
        const w = new FakeWorker();
        workers.push(w);
        return w;
      }, 400);
      const got: EngineReply[] = [];
      c.onReply((r) => got.push(r));
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
});
