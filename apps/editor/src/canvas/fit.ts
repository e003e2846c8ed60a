/**
 * Fit the whole drawing in view: every block AND every wire (feedback lanes run below the
 * blocks, and cut markers sit on them), centred, with a margin, never zoomed in past
 * `maxZoom`. Nothing is left cut off at an edge; for a close look, zoom in from there.
 */
import type { ReactFlowInstance } from '@xyflow/react';
import { wiresBounds } from './wire-geometry.ts';

/** Screen margin around the drawing (px); also room for cut labels and block ids beyond the paths. */
const PAD = 36;
/** Smallest zoom the canvas allows; a fit may need to go this far for a large diagram. */
export const MIN_ZOOM = 0.05;

export interface Rect {
  x: number;
  y: number;
  width: number;
  height: number;
}

export function union(a: Rect | null, b: Rect | null): Rect | null {
  if (!a) return b;
  if (!b) return a;
  const x = Math.min(a.x, b.x);
  const y = Math.min(a.y, b.y);
  return { x, y, width: Math.max(a.x + a.width, b.x + b.width) - x, height: Math.max(a.y + a.height, b.y + b.height) - y };
}

/** The viewport that shows `content` (flow units) whole and centred in a `view` of w×h px. */
export function viewportFor(content: Rect, view: { width: number; height: number }, maxZoom = 1.2): { x: number; y: number; zoom: number } {
  const w = Math.max(1, content.width);
  const h = Math.max(1, content.height);
  const zoom = Math.max(MIN_ZOOM, Math.min((view.width - 2 * PAD) / w, (view.height - 2 * PAD) / h, maxZoom));
  return { zoom, x: (view.width - w * zoom) / 2 - content.x * zoom, y: (view.height - h * zoom) / 2 - content.y * zoom };
}

export function fitAll(flow: ReactFlowInstance, el: Element | null, maxZoom = 1.2): void {
  const nodes = flow.getNodes();
  if (!el || nodes.length === 0) return;
  const r = el.getBoundingClientRect();
  const content = union(flow.getNodesBounds(nodes), wiresBounds(flow.getEdges().map((e) => e.id)));
  if (!content) return;
  void flow.setViewport(viewportFor(content, r, maxZoom));
}
