/**
 * One finding of a diagram check (structural or analytical). `message` does not repeat the
 * subject named by `blocks`/`wires` (the CLI prints "error  block pid1: <message>"); findings
 * about cuts, sweeps, parameters or the view name their subject at the start of the message.
 * `field` is a path into the document such as "blocks.pid1.params.kp" or "cuts.c1.wire".
 */
export interface Finding {
  severity: 'error' | 'warning' | 'info';
  code: string;
  message: string;
  blocks?: string[];
  wires?: string[];
  field?: string;
}

/** The subject of a finding as the CLI and the editor's list name it ("block pid1", "wires w1, w2", or ""). */
export function findingSubject(f: Finding): string {
  if (f.blocks?.length) return `${f.blocks.length === 1 ? 'block' : 'blocks'} ${f.blocks.join(', ')}`;
  if (f.wires?.length) return `${f.wires.length === 1 ? 'wire' : 'wires'} ${f.wires.join(', ')}`;
  return '';
}

const ORDER = { error: 0, warning: 1, info: 2 } as const;
/** Errors first, then warnings, then information; stable within a severity. */
export const sortFindings = (fs: Finding[]): Finding[] =>
  fs
    .map((f, i) => [f, i] as const)
    .sort((a, b) => ORDER[a[0].severity] - ORDER[b[0].severity] || a[1] - b[1])
    .map(([f]) => f);
