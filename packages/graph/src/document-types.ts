/**
 * The diagram document (`.loop.json`), as plain TypeScript types. This is the contract shared
 * by the graph package, the simulator, the editor and the CLI; schema.ts validates raw JSON
 * into these types. Keep property order stable: serialisation writes keys in this order so
 * that loading then saving an unchanged document gives the same bytes.
 */

import type { BlockKind } from './catalogue/index.ts';

export type { BlockKind };

export const DIAGRAM_FORMAT = 'loopwright.diagram';
export const DIAGRAM_VERSION = 2;

/** A block parameter: a number, or an expression text over the diagram's named parameters (e.g. "Kp", "2*Kv"). */
export type ParamValue = number | string | boolean;

export interface NamedParameter {
  name: string;
  value: number;
  unit?: string;
  /** Slider range for sweeps and the Parameters panel. */
  min?: number;
  max?: number;
  scale?: 'linear' | 'log';
  description?: string;
}

export interface Block {
  id: string;
  kind: BlockKind;
  label?: string;
  position: { x: number; y: number };
  /** Keyed by the parameter names the block kind declares (catalogue). */
  params: Record<string, ParamValue>;
}

/** A port reference. Output ports are named "out"; inputs "in", or "in1", "in2", … on a summing junction. */
export interface PortRef {
  block: string;
  port: string;
}

export interface Wire {
  id: string;
  from: PortRef;
  to: PortRef;
}

/** A cut: the wire opened to read the loop transfer L(s) there (1 + L = 0 convention). */
export interface Cut {
  id: string;
  wire: string;
  label?: string;
}

/** A sweep: the parameter varied while all others stay fixed. */
export interface Sweep {
  id: string;
  parameter: string;
  min: number;
  max: number;
  scale: 'linear' | 'log';
  label?: string;
}

export interface ViewSettings {
  zoom?: number;
  offset?: { x: number; y: number };
  theme?: 'light' | 'dark';
  /** Which cut / sweep / probe the analysis views show. */
  activeCut?: string;
  activeSweep?: string;
  activeProbe?: string;
}

/**
 * How the diagram is simulated (version 2; older files kept the end time in the view). Used
 * by the editor's Response view and by `loopwright simulate` alike; command-line flags
 * override. An absent field means "the engine chooses" (see @loopwright/study).
 */
export interface SimulationSettings {
  /** End time of a run in seconds (absent: from the slowest closed-loop pole). */
  end?: number;
  /** Integrator tolerances (absent: the engine's defaults). */
  rtol?: number;
  atol?: number;
  /** Probes a run shows (the Response chart, the command-line summary); absent: every probe. */
  probes?: string[];
}

export interface Diagram {
  format: typeof DIAGRAM_FORMAT;
  version: typeof DIAGRAM_VERSION;
  title: string;
  description: string;
  parameters: NamedParameter[];
  blocks: Block[];
  wires: Wire[];
  cuts: Cut[];
  sweeps: Sweep[];
  /** Absent in a document built in code means "all defaults"; files written by Loopwright always have it. */
  simulation?: SimulationSettings;
  view: ViewSettings;
}
