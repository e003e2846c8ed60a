/**
 * Fit the diagram in view, but never so small that the formulas cannot be read: below
 * READABLE_ZOOM the view keeps that zoom and shows the diagram's left end (where the
 * reference enters), centred vertically, and the rest is a pan away.
 */
import type { ReactFlowInstance } from '@xyflow/react';

export const READABLE_ZOOM = 0.6;
const PAD = 30;

export function fitReadable(flow: ReactFlowInstance, el: Element | null, maxZoom = 1.2): void {
  const nodes = flow.getNodes();
  if (!el || nodes.length === 0) return;
  const r = el.getBoundingClientRect();
  const b = flow.getNodesBounds(nodes);
  const w = Math.max(1, b.width);
  const h = Math.max(1, b.height);
  const fit = Math.min((r.width - 2 * PAD) / w, (r.height - 2 * PAD) / h, maxZoom);
  if (fit >= READABLE_ZOOM) {
    void flow.setViewport({ zoom: fit, x: (r.width - w * fit) / 2 - b.x * fit, y: (r.height - h * fit) / 2 - b.y * fit });
    return;
  }
  const z = READABLE_ZOOM;
  const y = h * z <= r.height - 2 * PAD ? (r.height - h * z) / 2 - b.y * z : PAD - b.y * z;
  void flow.setViewport({ zoom: z, x: PAD - b.x * z, y });
}
