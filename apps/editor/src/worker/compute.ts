/**
 * The worker's compute entry, as a plain function (unit-tested in node without a worker): the
 * request's studies run through @loopwright/study, and nothing else. Slider-independent work
 * (the locus, compiled models, findings) is cached inside the study package.
 */
import { runStudies, type StudyContext } from '@loopwright/study';
import type { EngineReply, EngineRequest } from './protocol.ts';

const now = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

/**
 * Wall-time budget of one request when the caller gives no deadline (ms): an analysis past it
 * ends as a failed part with reason 'budget' and a message naming it, never a worker that stays
 * busy (simulation runs keep their own, shorter budget inside this one).
 */
export const REQUEST_BUDGET_MS = 20_000;

export function computeReply(req: EngineRequest, ctx: StudyContext = {}): EngineReply {
  const t0 = now();
  try {
    const results = runStudies(req.diagram, req.studies, { ...ctx, deadline: ctx.deadline ?? t0 + REQUEST_BUDGET_MS });
    return { channel: req.channel, id: req.id, ok: true, results, elapsedMs: now() - t0 };
  } catch (e) {
    return { channel: req.channel, id: req.id, ok: false, error: e instanceof Error ? e.message : String(e) };
  }
}

/**
 * A progress callback that passes on at most one report per `everyMs`, the first once `everyMs`
 * has passed: a run reporting every 1 % does not flood the page with messages, and a request
 * computed sooner (a slider step) posts none — the page shows progress only after 300 ms, and a
 * message it must handle while the step computes competes with it for the CPU.
 */
export function throttled<T>(post: (p: T) => void, everyMs: number, clock: () => number = now): (p: T) => void {
  let last = clock();
  return (p) => {
    const t = clock();
    if (t - last < everyMs) return;
    last = t;
    post(p);
  };
}
