import type { BudgetOptions } from '@loopwright/lti';
import type { Diagram } from '../document-types.ts';
import type { ParameterOverrides } from '../resolve.ts';
import { checkAnalytic } from './analytic.ts';
import { type Finding, sortFindings } from './finding.ts';
import { checkStructure } from './structure.ts';

/**
 * Every finding about a diagram: the structural checks (checkStructure), then — only when
 * those found no error, since a broken structure has no meaningful linear model — the
 * analytical ones (checkAnalytic: algebraic loops, cancellations, closed-loop stability).
 * Sorted errors first.
 * Note for the graph-analysis owner (G2): written by G1 to combine both; extend freely.
 */
/** `opts.deadline` bounds the analytical checks (loop enumeration, closed-loop poles): past it a BudgetError. */
export function checkDiagram(d: Diagram, overrides?: ParameterOverrides, opts: BudgetOptions = {}): Finding[] {
  const structural = checkStructure(d, overrides);
  if (structural.some((f) => f.severity === 'error')) return sortFindings(structural);
  return sortFindings([...structural, ...checkAnalytic(d, overrides, opts)]);
}
