/**
 * Plane geometry for the Locus view: an equal-aspect window on the s-plane that frames the
 * interesting points, nice tick steps, pixel ↔ s mapping, the locus point nearest the pointer
 * (projected onto the branch segment), damping ratio and natural frequency.
 */
import type { Cx, LocusBranch } from '@loopwright/study';
// Framing and damping are the study's (shared with the report).
export { activePoints, dampingOf, keyPoints, pointsNear } from '@loopwright/study';

export interface PlotBox {
  /** Grid rectangle inside the chart, px. */
  left: number;
  top: number;
  width: number;
  height: number;
}

export interface PlaneWindow {
  xMin: number;
  xMax: number;
  yMin: number;
  yMax: number;
  step: number;
}

/** A step of 1, 2 or 5 × 10^n near `raw`. */
export function niceStep(raw: number): number {
  if (!(raw > 0) || !Number.isFinite(raw)) return 1;
  const e = Math.floor(Math.log10(raw));
  const f = raw / 10 ** e;
  const m = f < 1.5 ? 1 : f < 3.5 ? 2 : f < 7.5 ? 5 : 10;
  return m * 10 ** e;
}

/**
 * An equal-aspect window (same units per pixel on both axes) that holds the key points with a
 * margin, plus the branch points within a few radii of them (branches running off to infinity
 * along asymptotes are clipped, not followed), symmetric about the real axis.
 */
export function planeWindow(box: PlotBox, key: readonly Cx[], branches: readonly LocusBranch[]): PlaneWindow {
  let xMin = Infinity;
  let xMax = -Infinity;
  let yMax = 0;
  const take = (re: number, im: number) => {
    if (re < xMin) xMin = re;
    if (re > xMax) xMax = re;
    if (Math.abs(im) > yMax) yMax = Math.abs(im);
  };
  for (const p of key) take(p.re, p.im);
  if (!Number.isFinite(xMin)) {
    xMin = -1;
    xMax = 1;
  }
  const cx = (xMin + xMax) / 2;
  const radius = Math.max(xMax - xMin, 2 * yMax, 1e-9) / 2 + Math.max(Math.abs(xMin), Math.abs(xMax), yMax) * 0.25;
  const reach = radius * 3;
  for (const b of branches) {
    for (let i = 0; i < b.re.length; i++) {
      if (Math.hypot(b.re[i] - cx, b.im[i]) <= reach) take(b.re[i], b.im[i]);
    }
  }
  // Always show the imaginary axis, and a margin around everything.
  xMin = Math.min(xMin, 0);
  xMax = Math.max(xMax, 0);
  let span = Math.max(xMax - xMin, 2 * yMax);
  if (!(span > 1e-200)) span = 2;
  const pad = span * 0.12;
  xMin -= pad;
  xMax += pad;
  yMax += pad;
  // Equal aspect: grow the short side so that units/px match.
  const w = Math.max(box.width, 1);
  const h = Math.max(box.height, 1);
  const ux = (xMax - xMin) / w;
  const uy = (2 * yMax) / h;
  if (ux > uy) yMax = (ux * h) / 2;
  else {
    const grow = (uy * w - (xMax - xMin)) / 2;
    xMin -= grow;
    xMax += grow;
  }
  const step = niceStep((xMax - xMin) / Math.max(3, Math.round(w / 90)));
  return { xMin, xMax, yMin: -yMax, yMax, step };
}

export const toPixel = (win: PlaneWindow, box: PlotBox, s: Cx): [number, number] => [
  box.left + ((s.re - win.xMin) / (win.xMax - win.xMin)) * box.width,
  box.top + ((win.yMax - s.im) / (win.yMax - win.yMin)) * box.height,
];

export const fromPixel = (win: PlaneWindow, box: PlotBox, x: number, y: number): Cx => ({
  re: win.xMin + ((x - box.left) / box.width) * (win.xMax - win.xMin),
  im: win.yMax - ((y - box.top) / box.height) * (win.yMax - win.yMin),
});

export interface LocusHit {
  branch: number;
  negative: boolean;
  /** Segment index and fraction along it. */
  index: number;
  t: number;
  s: Cx;
  /** Sweep value interpolated along the branch. */
  k: number;
  distancePx: number;
}

/** The branch point nearest pixel (x, y), projected onto its segment, within maxPx. */
export function nearestOnBranches(
  branches: readonly LocusBranch[],
  win: PlaneWindow,
  box: PlotBox,
  x: number,
  y: number,
  maxPx = 10,
  negative = false,
): LocusHit | null {
  let best: LocusHit | null = null;
  for (let b = 0; b < branches.length; b++) {
    const br = branches[b];
    let [px, py] = toPixel(win, box, { re: br.re[0], im: br.im[0] });
    for (let i = 0; i + 1 < br.re.length; i++) {
      const [qx, qy] = toPixel(win, box, { re: br.re[i + 1], im: br.im[i + 1] });
      const dx = qx - px;
      const dy = qy - py;
      const len2 = dx * dx + dy * dy;
      const t = len2 > 0 ? Math.min(1, Math.max(0, ((x - px) * dx + (y - py) * dy) / len2)) : 0;
      const d = Math.hypot(px + t * dx - x, py + t * dy - y);
      if (d <= maxPx && (!best || d < best.distancePx)) {
        const s = { re: br.re[i] + t * (br.re[i + 1] - br.re[i]), im: br.im[i] + t * (br.im[i + 1] - br.im[i]) };
        best = { branch: b, negative, index: i, t, s, k: br.k[i] + t * (br.k[i + 1] - br.k[i]), distancePx: d };
      }
      px = qx;
      py = qy;
    }
  }
  return best;
}

/** Distance from s to the nearest of the poles, relative to |s| (or absolute near the origin). */
export function relativeDistanceToNearest(s: Cx, poles: readonly Cx[]): number {
  let best = Infinity;
  for (const p of poles) best = Math.min(best, Math.hypot(p.re - s.re, p.im - s.im));
  return best / Math.max(Math.hypot(s.re, s.im), 1e-12);
}

export interface PlaneZoom {
  /** Window size relative to the fitted one (< 1 zooms in). */
  scale: number;
  /** Centre of the window. */
  re: number;
  im: number;
}

/** The fitted window zoomed: same aspect, `scale` times the size, centred on the zoom centre. */
export function zoomWindow(win: PlaneWindow, z: PlaneZoom | null): PlaneWindow {
  if (!z) return win;
  const hw = ((win.xMax - win.xMin) / 2) * z.scale;
  const hh = ((win.yMax - win.yMin) / 2) * z.scale;
  return { xMin: z.re - hw, xMax: z.re + hw, yMin: z.im - hh, yMax: z.im + hh, step: niceStep((win.step * z.scale) / 1) };
}

/** Zooms by `factor` keeping the plane point under the pointer fixed. */
export function zoomAt(
  fitted: PlaneWindow,
  current: PlaneWindow,
  box: PlotBox,
  x: number,
  y: number,
  factor: number,
  z: PlaneZoom | null,
): PlaneZoom {
  const at = fromPixel(current, box, x, y);
  const scale = Math.min(20, Math.max(1e-4, (z?.scale ?? 1) * factor));
  const cur = { re: (current.xMin + current.xMax) / 2, im: (current.yMin + current.yMax) / 2 };
  // The pointed-at point keeps its place: centre moves towards it by (1 − factor).
  const f = scale / (z?.scale ?? 1);
  void fitted;
  return { scale, re: at.re + (cur.re - at.re) * f, im: at.im + (cur.im - at.im) * f };
}
