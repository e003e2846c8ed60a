/**
 * A wire: an orthogonal path with an arrowhead at the input, a dot where an output fans out
 * to several inputs, and a cut drawn across it (an opened wire: a gap with two bars and its label).
 */
import { memo } from 'react';
import { BaseEdge, EdgeLabelRenderer, Position, useInternalNode, type Edge, type EdgeProps, type InternalNode } from '@xyflow/react';

export interface WireData extends Record<string, unknown> {
  fanOut: boolean;
  cut?: { id: string; label: string };
  fault: 'error' | 'warning' | 'info' | null;
  faultText?: string;
}
export type WireFlowEdge = Edge<WireData, 'wire'>;

const STUB = 18;
const CLEAR = 26;

function box(n: InternalNode | undefined) {
  if (!n) return null;
  const { y } = n.internals.positionAbsolute;
  return { top: y, bottom: y + (n.measured.height ?? 0) };
}

/**
 * A feedback wire (its input lies left of its output) is routed around the blocks: out to the
 * right, down below (or up above) both blocks, back left, and into the input — the textbook
 * return path, instead of cutting through the cards between.
 */
export function feedbackPath(
  sx: number, sy: number, tx: number, ty: number, targetPosition: Position,
  s: { top: number; bottom: number } | null, t: { top: number; bottom: number } | null,
): [string, number, number] | null {
  if (tx >= sx + 4) return null;
  const above = targetPosition === Position.Top;
  const lane = above
    ? Math.min(s?.top ?? sy, t?.top ?? ty) - CLEAR
    : Math.max(s?.bottom ?? sy, t?.bottom ?? ty) + CLEAR;
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
    feedbackPath(sourceX, sourceY, targetX, targetY, targetPosition, box(sNode), box(tNode)) ??
    forwardPath(sourceX, sourceY, targetX, targetY, targetPosition);
  const cls = ['lw-wire', selected ? 'is-selected' : '', data?.fault ? `fault-${data.fault}` : '', data?.cut ? 'is-cut' : ''].filter(Boolean).join(' ');
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
