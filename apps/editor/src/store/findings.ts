import { useMemo } from 'react';
import { useDiagramStore } from './diagram-store.ts';
import { findingsOf, type Finding } from './graph-bridge.ts';

/** The diagram's findings, recomputed only when the document changes. */
export function useFindings(): Finding[] {
  const diagram = useDiagramStore((s) => s.diagram);
  return useMemo(() => findingsOf(diagram), [diagram]);
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
