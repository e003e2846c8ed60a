/**
 * What a picture of a locus must frame (the editor's Locus view and the report share it): the
 * part of the locus the slider range moves, with the poles, zeros and special points near it —
 * not fast inner-loop modes or Padé poles that barely move, which would shrink the
 * interesting part to a dot.
 */
import type { Cx, LocusBranch, LocusData, PoleOrigin, SweepRange } from './types.ts';

/** The points a reader must see: poles, zeros, centroid, special points, current poles. */
export function keyPoints(locus: LocusData | null, current: readonly Cx[]): Cx[] {
  const pts: Cx[] = [...current];
  if (locus) {
    pts.push(...locus.poles, ...locus.zeros);
    for (const b of locus.breakaways) pts.push(b.s);
    for (const c of locus.crossings) pts.push({ re: 0, im: c.omega }, { re: 0, im: -c.omega });
    if (locus.asymptotes) pts.push({ re: locus.asymptotes.centroid, im: 0 });
  }
  return pts.filter((p) => Number.isFinite(p.re) && Number.isFinite(p.im));
}

/**
 * The part of the locus the slider actually moves: branch points whose sweep value lies in
 * the slider range, on branches that move by more than 2 % of their size over that range.
 */
export function activePoints(branches: readonly LocusBranch[], kMin: number, kMax: number): Cx[] {
  const lo = Math.min(kMin, kMax);
  const hi = Math.max(kMin, kMax);
  const out: Cx[] = [];
  for (const b of branches) {
    const pts: Cx[] = [];
    for (let i = 0; i < b.k.length; i++) if (b.k[i] >= lo && b.k[i] <= hi) pts.push({ re: b.re[i], im: b.im[i] });
    if (pts.length < 2) continue;
    let x0 = Infinity;
    let x1 = -Infinity;
    let y0 = Infinity;
    let y1 = -Infinity;
    let size = 0;
    for (const p of pts) {
      x0 = Math.min(x0, p.re);
      x1 = Math.max(x1, p.re);
      y0 = Math.min(y0, p.im);
      y1 = Math.max(y1, p.im);
      size = Math.max(size, Math.hypot(p.re, p.im));
    }
    if (Math.hypot(x1 - x0, y1 - y0) > 0.02 * size) out.push(...pts);
  }
  return out;
}

/** Key points near a set of focus points (within `factor` times their extent). */
export function pointsNear(points: readonly Cx[], focus: readonly Cx[], factor = 1.5): Cx[] {
  if (focus.length === 0) return [...points];
  let r = 0;
  let cx = 0;
  for (const f of focus) cx += f.re / focus.length;
  for (const f of focus) r = Math.max(r, Math.hypot(f.re - cx, f.im));
  r = Math.max(r * factor, 1e-9);
  return points.filter((p) => Math.hypot(p.re - cx, p.im) <= r);
}

/**
 * The points to frame: the moving part of the slider range and the key points near it; when
 * nothing moves (or there is no range), every key point with the current poles. `origin`
 * marks the current poles (Padé marks): branches carrying an approximant's pole are left out. `framesBranches`
 * says whether the whole branches should be framed too (nothing moves).
 */
export function locusFocus(
  locus: LocusData | null,
  current: readonly Cx[],
  range: SweepRange | null,
  origin: readonly PoleOrigin[] = [],
): { points: Cx[]; framesBranches: boolean } {
  const all = [...(locus?.branches ?? []), ...(locus?.oppositeBranches ?? [])];
  // A branch carrying a pole of the Padé approximant now (the current pole nearest the branch)
  // is no part of the plant's picture: however far it moves, it is not framed.
  const artefact = (b: LocusBranch) => {
    if (!origin.some((o) => o === 'approximant')) return false;
    let best = -1;
    let dist = Infinity;
    current.forEach((q, j) => {
      for (let i = 0; i < b.re.length; i++) {
        const d = Math.hypot(b.re[i] - q.re, b.im[i] - q.im);
        if (d < dist) {
          dist = d;
          best = j;
        }
      }
    });
    return best >= 0 && origin[best] === 'approximant';
  };
  const branches = (locus?.rangeBranches ?? all).filter((b) => !artefact(b));
  const active = locus ? activePoints(branches, range ? range.min : -Infinity, range ? range.max : Infinity) : [];
  if (active.length > 0) return { points: [...active, ...pointsNear(keyPoints(locus, []), active)], framesBranches: false };
  return { points: keyPoints(locus, current), framesBranches: true };
}
