/**
 * A fitted model into the document: as a new transfer-function block, or into a block that is
 * there. Either way the block's fit record (where the model came from) is stored in the
 * diagram's `fits`, replacing an older record of that block. Pure: a new diagram is returned.
 */
import type { FitProvenance } from '@loopwright/fit';
import { InputError } from '@loopwright/lti';
import type { BlockKind, Diagram, FitRecord } from '@loopwright/graph';

/** Single-input linear blocks a fitted model may replace (the ports stay "in" and "out", so the wires stay). */
export const REPLACEABLE_BY_FIT: readonly BlockKind[] = [
  'transfer-function',
  'first-order-lag',
  'second-order',
  'lead-lag',
  'integrator',
  'dead-time',
  'gain',
];

/** The fit record a block keeps for a fit's provenance. */
export function fitRecord(block: string, p: FitProvenance): FitRecord {
  return {
    block,
    source: { ...p.source, columns: { ...p.source.columns } },
    model: { ...p.model, timeConstants: [...p.model.timeConstants] },
    expression: p.expression,
    quality: { ...p.quality },
    intervals: {
      gain: p.intervals.gain ? [...p.intervals.gain] : null,
      timeConstants: p.intervals.timeConstants.map((i) => (i ? [...i] : null)),
      deadTime: p.intervals.deadTime ? [...p.intervals.deadTime] : null,
    },
    method: { between: p.method.between, operatingPoint: { ...p.method.operatingPoint } },
    fittedAt: p.fittedAt,
  };
}

const withRecord = (d: Diagram, rec: FitRecord): FitRecord[] => [...(d.fits ?? []).filter((f) => f.block !== rec.block), rec];

function freshId(prefix: string, taken: readonly string[]): string {
  const set = new Set(taken);
  for (let n = 1; ; n++) if (!set.has(`${prefix}${n}`)) return `${prefix}${n}`;
}

const labelOf = (p: FitProvenance) => `fitted ${p.model.kind.toUpperCase()}${p.source.fileName ? ` (${p.source.fileName})` : ''}`;

/** A new transfer-function block holding the fitted model (below the diagram unless a position is given). */
export function withFittedBlock(
  d: Diagram,
  p: FitProvenance,
  opts: { position?: { x: number; y: number }; label?: string } = {},
): { diagram: Diagram; block: string } {
  const id = freshId(
    'tf',
    d.blocks.map((b) => b.id),
  );
  const xs = d.blocks.map((b) => b.position.x);
  const ys = d.blocks.map((b) => b.position.y);
  const position = opts.position ?? (d.blocks.length ? { x: Math.min(...xs), y: Math.max(...ys) + 150 } : { x: 0, y: 0 });
  const diagram: Diagram = {
    ...d,
    blocks: [
      ...d.blocks,
      {
        id,
        kind: 'transfer-function',
        label: opts.label ?? labelOf(p),
        position: { x: Math.round(position.x), y: Math.round(position.y) },
        params: { expression: p.expression },
      },
    ],
    fits: withRecord(d, fitRecord(id, p)),
  };
  return { diagram, block: id };
}

/**
 * The block given takes the fitted model: a transfer-function block gets the expression;
 * another single-input linear block (lag, second-order, lead–lag, integrator, dead time, gain)
 * becomes a transfer-function block with the same id, label, position and wires.
 */
export function withFittedModel(d: Diagram, blockId: string, p: FitProvenance): { diagram: Diagram; notes: string[] } {
  const b = d.blocks.find((x) => x.id === blockId);
  if (!b) throw new InputError(`block ${blockId}: the diagram has no such block`, { field: 'block' });
  if (!REPLACEABLE_BY_FIT.includes(b.kind)) {
    throw new InputError(
      `block ${blockId}: a fitted model replaces a single-input linear block (${REPLACEABLE_BY_FIT.join(', ')}), not a ${b.kind} block; make a new block instead`,
      {
        field: 'block',
      },
    );
  }
  const notes =
    b.kind === 'transfer-function'
      ? []
      : [`block ${blockId} (${b.kind}) became a transfer-function block holding the fitted model; its wires stay`];
  const diagram: Diagram = {
    ...d,
    blocks: d.blocks.map((x) => (x.id === blockId ? { ...x, kind: 'transfer-function', params: { expression: p.expression } } : x)),
    fits: withRecord(d, fitRecord(blockId, p)),
  };
  return { diagram, notes };
}
