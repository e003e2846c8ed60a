import type { Finding } from './graph-bridge.ts';
import { useResultsStore } from '../analysis/results-store.ts';

const NONE: Finding[] = [];

/** The diagram's findings: checked once per edit in the engine worker (the previous edit's until the new ones arrive). */
export function useFindings(): Finding[] {
  return useResultsStore((s) => s.check?.findings ?? NONE);
}

const RANK = { error: 3, warning: 2, info: 1 } as const;

/** The worst finding per block and per wire, for marking them on the canvas. */
export function faultsByElement(findings: Finding[]) {
  const blocks = new Map<string, Finding>();
  const wires = new Map<string, Finding>();
  const keep = (m: Map<string, Finding>, id: string, f: Finding) => {
    const cur = m.get(id);
    if (!cur || RANK[f.severity] > RANK[cur.severity]) m.set(id, f);
  };
  for (const f of findings) {
    for (const b of f.blocks ?? []) keep(blocks, b, f);
    for (const w of f.wires ?? []) keep(wires, w, f);
  }
  return { blocks, wires };
}
