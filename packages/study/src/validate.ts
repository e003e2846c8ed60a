/**
 * One validation for every study: what `loopwright check` reports as an error, every analysis
 * refuses with the same message (the first error finding, with its subject), so `reduce`,
 * `loops`, `locus`, `simulate` and the editor never compute on a diagram `check` rejects — a
 * wire into an output port, two wires into one input, a parameter defined twice, an ill-posed
 * algebraic loop, an unstable mode hidden by a cancellation.
 */
import { checkDiagram, findingSubject, type Diagram, type Finding } from '@loopwright/graph';
import { InputError } from '@loopwright/lti';
import { compileModel, simulate } from '@loopwright/sim';
import { isInputError } from './part.ts';
import { Lru, cached } from './cache.ts';
import { registerCache } from './caches.ts';
import { fingerprintText } from './fingerprint.ts';
import type { CheckData } from './types.ts';

const checks = registerCache(new Lru<Finding[]>(16));

/**
 * Every finding of the diagram (structural, then analytical), errors first, with the
 * simulator's verdict on algebraic loops (see simulationVerdict). Cached per diagram and overrides.
 */
export function findingsOf(d: Diagram, overrides: Record<string, number> = {}, deadline?: number): Finding[] {
  // A check stopped by the deadline throws (BudgetError) and is not cached.
  return cached(checks, `${fingerprintText(d)}|${JSON.stringify(overrides)}`, () =>
    simulationVerdict(d, overrides, checkDiagram(d, overrides, deadline !== undefined ? { deadline } : {})),
  );
}

/**
 * One verdict on an algebraic loop: the linear analyses solve a well-posed one, but whether a
 * time simulation can run it is the simulator's to say. It is asked (a run of no length, which
 * fails while the run is being built), and when it refuses, the finding says so in its words
 * instead of calling the loop solved — the Response view shows the same refusal.
 */
function simulationVerdict(d: Diagram, overrides: Record<string, number>, findings: Finding[]): Finding[] {
  const loops = findings.filter((f) => f.code === 'algebraic-loop' && f.severity !== 'error');
  if (loops.length === 0 || findings.some((f) => f.severity === 'error')) return findings;
  let refusal: string | null = null;
  try {
    simulate(compileModel(d), { until: 1e-6, overrides, maxSteps: 50, maxWallMs: 200, metricsFor: [] });
  } catch (e) {
    // Only a refusal counts; anything else is the run's business, not the finding's.
    if (isInputError(e)) refusal = (e as Error).message;
  }
  if (refusal === null) return findings;
  return findings.map((f) =>
    loops.includes(f)
      ? {
          ...f,
          message: `${f.message.replace(/; the signals are found by solving it$/, '')}. The linear analyses solve it, but the time simulation cannot run it: ${refusal}`,
        }
      : f,
  );
}

export function checkStudy(d: Diagram, overrides: Record<string, number> = {}, deadline?: number): CheckData {
  const findings = findingsOf(d, overrides, deadline);
  const count = (s: Finding['severity']) => findings.filter((f) => f.severity === s).length;
  return { findings, counts: { error: count('error'), warning: count('warning'), info: count('info') } };
}

/** A finding as `loopwright check` prints it after the severity: "block g: message". */
export const findingText = (f: Finding): string => {
  const subject = findingSubject(f);
  return `${subject ? `${subject}: ` : ''}${f.message}`;
};

/** An InputError carrying the finding that refuses a diagram (details.field points at it). */
export class RefusedDiagram extends InputError {
  override name = 'RefusedDiagram';
  constructor(
    readonly finding: Finding,
    readonly errors: number,
  ) {
    const more = errors > 1 ? ` (and ${errors - 1} more error${errors > 2 ? 's' : ''} in the findings)` : '';
    const at =
      finding.field ??
      (finding.blocks?.length ? `blocks.${finding.blocks[0]}` : finding.wires?.length ? `wires.${finding.wires[0]}` : undefined);
    super(`${findingText(finding)}${more}`, at ? { field: at } : {});
  }
}

/** Throws RefusedDiagram when the diagram has an error finding (with these overrides). */
export function assertAnalysable(d: Diagram, overrides: Record<string, number> = {}, deadline?: number): void {
  const errors = findingsOf(d, overrides, deadline).filter((f) => f.severity === 'error');
  if (errors.length) throw new RefusedDiagram(errors[0], errors.length);
}
