/**
 * Progress and cancel for long computations: every engine channel that has been computing for
 * a moment is listed with what it computes, how long it has run and, where the worker can tell
 * (runs, the report), how far it has got — each with a Cancel button that stops it at once. A
 * cancelled channel says so and offers to compute again (its views show nothing stale).
 */
import { useEffect, useState } from 'react';
import { useResultsStore } from '../analysis/results-store.ts';
import { cancelChannel, computeAgain } from '../analysis/driver.ts';
import { CANCELLED } from '../worker/engine-client.ts';
import { CHANNELS, type Channel } from '../worker/protocol.ts';

/** A computation is shown once it has run this long (ms): quick ones never flash a bar. */
export const SHOW_AFTER_MS = 300;

const WHAT: Record<Channel, string> = {
  check: 'findings',
  analysis: 'locus and closed-loop poles',
  loops: 'loops table',
  response: 'simulation',
  'closed-loop': 'closed loop',
  pinned: 'pinned design (re-run)',
  report: 'design report',
};

/**
 * True while a channel has been computing for longer than SHOW_AFTER_MS: the view then dims
 * what it still shows (the results of the inputs before), so they never pass for current.
 */
export function useStale(channel: Channel): boolean {
  const since = useResultsStore((s) => s.busy[channel]?.since ?? null);
  const [stale, setStale] = useState(false);
  useEffect(() => {
    setStale(false);
    if (since === null) return;
    const t = setTimeout(() => setStale(true), Math.max(0, since + SHOW_AFTER_MS - performance.now()));
    return () => clearTimeout(t);
  }, [since]);
  return stale;
}

export function BusyBar() {
  const busy = useResultsStore((s) => s.busy);
  const errors = useResultsStore((s) => s.errors);
  const [now, setNow] = useState(() => performance.now());
  const anyBusy = Object.values(busy).some(Boolean);
  // A clock for the elapsed times while anything computes.
  useEffect(() => {
    if (!anyBusy) return;
    const t = setInterval(() => setNow(performance.now()), 200);
    return () => clearInterval(t);
  }, [anyBusy]);
  const running = (Object.keys(busy) as Channel[]).filter((c) => busy[c] && now - busy[c]!.since >= SHOW_AFTER_MS);
  const cancelled = CHANNELS.filter((c) => errors[c] === CANCELLED && !busy[c]);
  if (running.length === 0 && cancelled.length === 0) return null;
  return (
    <div className="lw-busy" role="status" aria-label="Computations in progress">
      {running.map((c) => {
        const b = busy[c]!;
        const secs = (Math.max(0, now - b.since) / 1000).toFixed(1);
        return (
          <span key={c} className="lw-busy-item" data-busy={c}>
            <span>
              Computing the {WHAT[c]}… {secs} s
            </span>
            {b.fraction !== null ? (
              <progress max={1} value={b.fraction} aria-label={`Progress of the ${WHAT[c]}`} />
            ) : (
              <progress aria-label={`Progress of the ${WHAT[c]}`} />
            )}
            {b.fraction !== null && <span className="lw-muted">{Math.round(b.fraction * 100)} %</span>}
            <button type="button" className="lw-mini" aria-label={`Cancel the ${WHAT[c]}`} onClick={() => cancelChannel(c)}>
              Cancel
            </button>
          </span>
        );
      })}
      {cancelled.map((c) => (
        <span key={c} className="lw-busy-item lw-cancelled" data-cancelled={c}>
          <span>The {WHAT[c]} was cancelled.</span>
          <button type="button" className="lw-mini" aria-label={`Compute the ${WHAT[c]} again`} onClick={() => computeAgain(c)}>
            Compute again
          </button>
        </span>
      ))}
    </div>
  );
}
