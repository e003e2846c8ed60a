/**
 * Where the wires are drawn, in flow coordinates: each WireEdge registers its path here, so
 * the canvas can tell which wire a block is dropped on and how far the drawing extends
 * (feedback lanes run below the blocks, outside the blocks' own bounds).
 */

export interface Point {
  x: number;
  y: number;
}

/** The corner points of an orthogonal path made of M, H and V commands (what WireEdge draws). */
export function pathPoints(d: string): Point[] {
  const pts: Point[] = [];
  let x = 0;
  let y = 0;
  for (const m of d.matchAll(/([MHVL])\s*(-?[\d.]+(?:e-?\d+)?)(?:[ ,]\s*(-?[\d.]+(?:e-?\d+)?))?/gi)) {
    const cmd = m[1].toUpperCase();
    const a = Number(m[2]);
    if (cmd === 'M' || cmd === 'L') {
      x = a;
      y = Number(m[3]);
    } else if (cmd === 'H') x = a;
    else y = a;
    pts.push({ x, y });
  }
  return pts;
}

/** Shortest distance from p to the polyline through `pts`. */
export function distanceToPolyline(pts: Point[], p: Point): number {
  if (pts.length === 0) return Infinity;
  if (pts.length === 1) return Math.hypot(p.x - pts[0].x, p.y - pts[0].y);
  let best = Infinity;
  for (let i = 0; i + 1 < pts.length; i++) {
    const a = pts[i];
    const b = pts[i + 1];
    const dx = b.x - a.x;
    const dy = b.y - a.y;
    const l2 = dx * dx + dy * dy;
    const t = l2 > 0 ? Math.max(0, Math.min(1, ((p.x - a.x) * dx + (p.y - a.y) * dy) / l2)) : 0;
    best = Math.min(best, Math.hypot(a.x + t * dx - p.x, a.y + t * dy - p.y));
  }
  return best;
}

const paths = new Map<string, Point[]>();

export function registerWirePath(id: string, d: string): void {
  paths.set(id, pathPoints(d));
}
export function unregisterWirePath(id: string): void {
  paths.delete(id);
}

/**
 * The wire nearest to p within `reach` (flow units), ignoring wires attached to `except`
 * (a block being dragged cannot be dropped into its own wires); null when none is that near.
 */
export function wireAt(p: Point, reach: number, except?: (id: string) => boolean): string | null {
  let best: string | null = null;
  let bestD = reach;
  for (const [id, pts] of paths) {
    if (except?.(id)) continue;
    const dist = distanceToPolyline(pts, p);
    if (dist <= bestD) {
      best = id;
      bestD = dist;
    }
  }
  return best;
}

/** The rectangle every registered wire lies in (null when there are none). */
export function wiresBounds(ids?: Iterable<string>): { x: number; y: number; width: number; height: number } | null {
  let x0 = Infinity;
  let y0 = Infinity;
  let x1 = -Infinity;
  let y1 = -Infinity;
  const list = ids ? [...ids].map((id) => paths.get(id)).filter((p): p is Point[] => Boolean(p)) : [...paths.values()];
  for (const pts of list)
    for (const q of pts) {
      x0 = Math.min(x0, q.x);
      y0 = Math.min(y0, q.y);
      x1 = Math.max(x1, q.x);
      y1 = Math.max(y1, q.y);
    }
  return Number.isFinite(x0) ? { x: x0, y: y0, width: x1 - x0, height: y1 - y0 } : null;
}
