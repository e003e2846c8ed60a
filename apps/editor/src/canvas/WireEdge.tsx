/**
 * A wire: an orthogonal path with an arrowhead at the input, a dot where an output fans out
 * to several inputs, and a cut drawn across it (an opened wire: a gap with two bars and its label).
 */
import { memo } from 'react';
import { BaseEdge, EdgeLabelRenderer, getSmoothStepPath, type Edge, type EdgeProps } from '@xyflow/react';

export interface WireData extends Record<string, unknown> {
  fanOut: boolean;
  cut?: { id: string; label: string };
  fault: 'error' | 'warning' | 'info' | null;
  faultText?: string;
}
export type WireFlowEdge = Edge<WireData, 'wire'>;

export const WireEdge = memo(function WireEdge(props: EdgeProps<WireFlowEdge>) {
  const { id, sourceX, sourceY, targetX, targetY, sourcePosition, targetPosition, data, selected, markerEnd } = props;
  const [path, labelX, labelY] = getSmoothStepPath({ sourceX, sourceY, targetX, targetY, sourcePosition, targetPosition, borderRadius: 6, offset: 18 });
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
