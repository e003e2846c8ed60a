/**
 * The worker's compute entry, as a plain function (unit-tested in node without a worker): the
 * request's studies run through @loopwright/study, and nothing else. Slider-independent work
 * (the locus, compiled models, findings) is cached inside the study package.
 */
import { runStudies, type StudyContext } from '@loopwright/study';
import type { EngineReply, EngineRequest } from './protocol.ts';

const now = () => (typeof performance !== 'undefined' ? performance.now() : Date.now());

export function computeReply(req: EngineRequest, ctx: StudyContext = {}): EngineReply {
  const t0 = now();
  try {
    const results = runStudies(req.diagram, req.studies, ctx);
    return { channel: req.channel, id: req.id, ok: true, results, elapsedMs: now() - t0 };
  } catch (e) {
    return { channel: req.channel, id: req.id, ok: false, error: e instanceof Error ? e.message : String(e) };
  }
}

/**
 * A progress callback that passes on at most one report per `everyMs` (the first at once),
 * so that a run reporting every 1 % does not flood the page with messages.
 */
export function throttled<T>(post: (p: T) => void, everyMs: number, clock: () => number = now): (p: T) => void {
  let last = -Infinity;
  return (p) => {
    const t = clock();
    if (t - last < everyMs) return;
    last = t;
    post(p);
  };
}
