/**
 * The editor's single doorway into @loopwright/graph for the catalogue, checks and demos.
 * Everything the editor needs from the document package goes through here, so a missing or
 * changed export shows up in one place.
 */
import * as graph from '@loopwright/graph';
import { blockSpec, emptyDiagram as graphEmptyDiagram, parseDiagram, serializeDiagram } from '@loopwright/graph';
import type { BlockKind, Diagram } from '@loopwright/graph';

export type {
  Diagram,
  Block,
  Wire,
  BlockKind,
  NamedParameter,
  Cut,
  Sweep,
  ViewSettings,
  SimulationSettings,
  ParamValue,
  BlockSpec,
  ParamSpec,
  CardContent,
  IconStroke,
} from '@loopwright/graph';
export {
  blockSpec,
  catalogue,
  cardOf,
  unitOf,
  visibleParams,
  isSampledKind,
  samplingFieldVisible,
  sampleTimeSet,
  SAMPLING_FIELDS,
} from '@loopwright/graph';

// Exports that other engineers are still landing are looked up by name, so the editor builds
// (and degrades to "no findings" / "no demos") until they arrive.
const g = graph as unknown as Record<string, unknown>;

export function emptyDiagram(): Diagram {
  return graphEmptyDiagram();
}

/** Default parameters of a new block of this kind (from the catalogue's ParamSpecs). */
export function defaultParams(kind: BlockKind): Record<string, number | string> {
  const out: Record<string, number | string> = {};
  for (const p of blockSpec(kind).params) out[p.name] = p.default;
  return out;
}

/** Parse and validate a `.loop.json` text; throws (InputError / DiagramError) naming what is wrong. */
export function parseDocument(text: string): Diagram {
  return parseDiagram(text);
}

export function serializeDocument(d: Diagram): string {
  return serializeDiagram(d);
}

export interface Demo {
  id: string;
  title: string;
  diagram: Diagram;
}

export function demos(): Demo[] {
  return Array.isArray(g.demoDiagrams) ? (g.demoDiagrams as Demo[]) : [];
}

export function defaultDemo(): Diagram {
  const d = demos().find((x) => x.id === 'positioning-axis');
  return d ? JSON.parse(JSON.stringify(d.diagram)) : emptyDiagram();
}

export type { Finding } from '@loopwright/graph';
