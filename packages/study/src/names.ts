/**
 * One name per loop everywhere — Loops table, canvas cut marker, Frequency view, report and
 * command line: a cut's label, else its id (what the canvas draws on the wire); a loop the
 * engine proposed on a feedback wire (no cut yet) is named after that wire.
 */
import type { Cut, Diagram } from '@loopwright/graph';

/** The name of a cut as every view shows it. */
export const cutName = (c: Pick<Cut, 'id' | 'label'>): string => (c.label && c.label.trim() !== '' ? c.label : c.id);

/** The name of a loop by its cut id ("auto:<wire>" for a proposed one); the id itself when unknown. */
export function loopName(d: Diagram, cutId: string): string {
  if (cutId.startsWith('auto:')) return `loop at ${cutId.slice(5)} (proposed)`;
  const c = d.cuts.find((x) => x.id === cutId);
  return c ? cutName(c) : cutId;
}
