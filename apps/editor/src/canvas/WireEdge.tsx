/**
 * A wire: an orthogonal path with an arrowhead at the input, a dot where an output fans out
 * to several inputs, and a cut drawn across it (an opened wire: a gap with two bars and its label).
 */
import { memo, useEffect } from 'react';
import { BaseEdge, EdgeLabelRenderer, Position, useInternalNode, type Edge, type EdgeProps, type InternalNode } from '@xyflow/react';
import { CLEAR, STUB } from './lanes.ts';
import { registerWirePath, unregisterWirePath } from './wire-geometry.ts';

export interface WireData extends Record<string, unknown> {
  fanOut: boolean;
  cut?: { id: string; label: string };
  fault: 'error' | 'warning' | 'info' | null;
  faultText?: string;
  /** The lane of a feedback wire (lanes.ts), so nested loops return on separate lines. */
  lane?: number;
  /** A block dragged over the canvas would be put into this wire. */
  dropTarget?: boolean;
}
export type WireFlowEdge = Edge<WireData, 'wire'>;

function box(n: InternalNode | undefined) {
  if (!n) return null;
  const { y } = n.internals.positionAbsolute;
  return { top: y, bottom: y + (n.measured.height ?? 0) };
}

/**
 * A feedback wire (its input lies left of its output) is routed around the blocks: out to the
 * right, down below (or up above) both blocks along its lane, back left, and into the input —
 * the textbook return path, instead of cutting through the cards between. Without an assigned
 * lane it runs just clear of its two blocks.
 */
export function feedbackPath(
  sx: number,
  sy: number,
  tx: number,
  ty: number,
  targetPosition: Position,
  s: { top: number; bottom: number } | null,
  t: { top: number; bottom: number } | null,
  assigned?: number,
): [string, number, number] | null {
  if (tx >= sx + 4 && assigned === undefined) return null;
  const above = targetPosition === Position.Top;
  const lane = assigned ?? (above ? Math.min(s?.top ?? sy, t?.top ?? ty) - CLEAR : Math.max(s?.bottom ?? sy, t?.bottom ?? ty) + CLEAR);
  const x1 = sx + STUB;
  if (targetPosition === Position.Bottom || targetPosition === Position.Top) {
    return [`M${sx},${sy} H${x1} V${lane} H${tx} V${ty}`, (x1 + tx) / 2, lane];
  }
  const x2 = tx - STUB;
  return [`M${sx},${sy} H${x1} V${lane} H${x2} V${ty} H${tx}`, (x1 + x2) / 2, lane];
}

/** A forward wire: out, across at the midpoint, in; into a bottom/top input it turns once. */
export function forwardPath(sx: number, sy: number, tx: number, ty: number, targetPosition: Position): [string, number, number] {
  if (Math.abs(ty - sy) < 0.5) return [`M${sx},${sy} H${tx}`, (sx + tx) / 2, sy];
  if (targetPosition === Position.Bottom || targetPosition === Position.Top) return [`M${sx},${sy} H${tx} V${ty}`, (sx + tx) / 2, sy];
  const mid = Math.round((sx + tx) / 2);
  return [`M${sx},${sy} H${mid} V${ty} H${tx}`, mid, (sy + ty) / 2];
}

export const WireEdge = memo(function WireEdge(props: EdgeProps<WireFlowEdge>) {
  const { id, source, target, sourceX, sourceY, targetX, targetY, targetPosition, data, selected, markerEnd } = props;
  const sNode = useInternalNode(source);
  const tNode = useInternalNode(target);
  const [path, labelX, labelY] =
    feedbackPath(sourceX, sourceY, targetX, targetY, targetPosition, box(sNode), box(tNode), data?.lane) ??
    forwardPath(sourceX, sourceY, targetX, targetY, targetPosition);
  useEffect(() => registerWirePath(id, path), [id, path]);
  useEffect(() => () => unregisterWirePath(id), [id]);
  const cls = [
    'lw-wire',
    selected ? 'is-selected' : '',
    data?.fault ? `fault-${data.fault}` : '',
    data?.cut ? 'is-cut' : '',
    data?.dropTarget ? 'is-drop-target' : '',
  ]
    .filter(Boolean)
    .join(' ');
  return (
    <>
      <BaseEdge id={id} path={path} markerEnd={markerEnd} className={cls} interactionWidth={14} />
      {data?.fanOut && <circle className="lw-fanout" cx={sourceX + 9} cy={sourceY} r={3.5} />}
      {data?.cut && (
        <EdgeLabelRenderer>
          <div
            className="lw-cut nodrag nopan"
            style={{ transform: `translate(-50%, -50%) translate(${labelX}px, ${labelY}px)` }}
            aria-label={`cut ${data.cut.label} on wire ${id}`}
            data-testid={`cut-${data.cut.id}`}
          >
            <span className="lw-cut-bars" aria-hidden="true" />
            <span className="lw-cut-label">{data.cut.label}</span>
          </div>
        </EdgeLabelRenderer>
      )}
    </>
  );
});

export const edgeTypes = { wire: WireEdge };
