/**
 * The diagram document (`.loop.json`), as plain TypeScript types. This is the contract shared
 * by the graph package, the simulator, the editor and the CLI; schema.ts validates raw JSON
 * into these types. Keep property order stable: serialisation writes keys in this order so
 * that loading then saving an unchanged document gives the same bytes.
 */

import type { BlockKind } from './catalogue/index.ts';

export type { BlockKind };

export const DIAGRAM_FORMAT = 'loopwright.diagram';
export const DIAGRAM_VERSION = 3;

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

/**
 * Where a block's model came from when it was fitted to a test log (version 3): the test
 * log's file name and SHA-256, the columns and rows used, the model and its expression, the fit
 * quality and approximate intervals, how the input was read between samples and the operating
 * point, and the date of the fit (ISO 8601, UTC). One record per block; fitting the block again
 * replaces it. Plain data: the same shape as @loopwright/fit's FitProvenance plus `block`.
 */
export interface FitRecord {
  /** The block whose model the fit set. */
  block: string;
  source: {
    fileName: string | null;
    sha256: string | null;
    columns: { time: string; input: string; output: string };
    samples: number;
    firstRow: number | null;
    lastRow: number | null;
  };
  model: { kind: 'fopdt' | 'sopdt' | 'ipdt'; gain: number; timeConstants: number[]; deadTime: number };
  expression: string;
  quality: { nrmse: number; rmse: number; confidence: number };
  /** Approximate intervals at `quality.confidence` (null where the data do not determine a parameter). */
  intervals: { gain: [number, number] | null; timeConstants: ([number, number] | null)[]; deadTime: [number, number] | null };
  method: { between: 'linear' | 'hold'; operatingPoint: { input: number; output: number; samples: number } };
  fittedAt: string;
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
  /** Fitted models behind blocks (version 3; absent: none). Written whenever present. */
  fits?: FitRecord[];
  view: ViewSettings;
}
