/**
 * One validation for every study: what `loopwright check` reports as an error, every analysis
 * refuses with the same message (the first error finding, with its subject), so `reduce`,
 * `loops`, `locus`, `simulate` and the editor never compute on a diagram `check` rejects — a
 * wire into an output port, two wires into one input, a parameter defined twice, an ill-posed
 * algebraic loop, an unstable mode hidden by a cancellation.
 */
import { checkDiagram, findingSubject, type Diagram, type Finding } from '@loopwright/graph';
import { InputError } from '@loopwright/lti';
import { Lru, cached } from './cache.ts';
import { registerCache } from './caches.ts';
import { fingerprintText } from './fingerprint.ts';
import type { CheckData } from './types.ts';

const checks = registerCache(new Lru<Finding[]>(16));

/** Every finding of the diagram (structural, then analytical), errors first. Cached per diagram and overrides. */
export function findingsOf(d: Diagram, overrides: Record<string, number> = {}, deadline?: number): Finding[] {
  // A check stopped by the deadline throws (BudgetError) and is not cached.
  return cached(checks, `${fingerprintText(d)}|${JSON.stringify(overrides)}`, () => checkDiagram(d, overrides, deadline !== undefined ? { deadline } : {}));
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
    const at = finding.field ?? (finding.blocks?.length ? `blocks.${finding.blocks[0]}` : finding.wires?.length ? `wires.${finding.wires[0]}` : undefined);
    super(`${findingText(finding)}${more}`, at ? { field: at } : {});
  }
}

/** Throws RefusedDiagram when the diagram has an error finding (with these overrides). */
export function assertAnalysable(d: Diagram, overrides: Record<string, number> = {}, deadline?: number): void {
  const errors = findingsOf(d, overrides, deadline).filter((f) => f.severity === 'error');
  if (errors.length) throw new RefusedDiagram(errors[0], errors.length);
}
