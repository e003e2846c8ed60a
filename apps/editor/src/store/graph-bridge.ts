/**
 * The editor's single doorway into @loopwright/graph for the catalogue, checks and demos.
 * Everything the editor needs from the document package goes through here, so a missing or
 * changed export shows up in one place.
 */
import * as graph from '@loopwright/graph';
import type { BlockKind, Diagram } from '@loopwright/graph';
import { DIAGRAM_FORMAT, DIAGRAM_VERSION } from '@loopwright/graph';

export type { Diagram, Block, Wire, BlockKind, NamedParameter, Cut, Sweep, ViewSettings, ParamValue } from '@loopwright/graph';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
const g = graph as any;

export function emptyDiagram(): Diagram {
  if (typeof g.emptyDiagram === 'function') return g.emptyDiagram();
  return {
    format: DIAGRAM_FORMAT,
    version: DIAGRAM_VERSION,
    title: 'Untitled diagram',
    description: '',
    parameters: [],
    blocks: [],
    wires: [],
    cuts: [],
    sweeps: [],
    view: {},
  };
}

/** Default parameters of a new block of this kind (from the catalogue's ParamSpecs). */
export function defaultParams(kind: BlockKind): Record<string, number | string> {
  const out: Record<string, number | string> = {};
  if (typeof g.blockSpec === 'function') {
    for (const p of g.blockSpec(kind).params) out[p.name] = p.default;
  }
  return out;
}

/** Parse and validate a `.loop.json` text; throws (InputError) naming what is wrong. */
export function parseDocument(text: string): Diagram {
  if (typeof g.parseDiagram === 'function') return g.parseDiagram(text);
  const d = JSON.parse(text);
  if (d?.format !== DIAGRAM_FORMAT) throw new Error(`not a Loopwright diagram (format is ${JSON.stringify(d?.format)})`);
  return d as Diagram;
}

export function serializeDocument(d: Diagram): string {
  if (typeof g.serializeDiagram === 'function') return g.serializeDiagram(d);
  return JSON.stringify(d, null, 2) + '\n';
}

export interface Demo {
  id: string;
  title: string;
  diagram: Diagram;
}

export function demos(): Demo[] {
  return Array.isArray(g.demoDiagrams) ? g.demoDiagrams : [];
}

export function defaultDemo(): Diagram {
  const d = demos().find((x) => x.id === 'positioning-axis');
  return d ? JSON.parse(JSON.stringify(d.diagram)) : emptyDiagram();
}
