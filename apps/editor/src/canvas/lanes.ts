/**
 * Lanes for feedback wires. A feedback wire (its input lies left of its output) returns along
 * a horizontal lane below the blocks (above, into a junction's top input). Nested loops must
 * not share a lane, or their wires and cut markers are drawn on top of each other: the
 * innermost loop (shortest span) gets the lane nearest the blocks and each loop around it the
 * next one out; no lane runs through a block it passes.
 */
import { blockSpec, type Diagram } from '../store/graph-bridge.ts';
import { inputSide } from './ports.ts';

export interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface FeedbackRun {
  id: string;
  /** Horizontal extent of the lane: from the input side to the output's stub. */
  x0: number;
  x1: number;
  /** Where the lane would run with nothing else around: just clear of its two blocks. */
  base: number;
  side: 'below' | 'above';
}

/** Distance from a block's edge to the lane that passes it. */
export const CLEAR = 26;
/** Spacing between neighbouring lanes (a cut marker is 18 px tall). */
export const LANE_GAP = 24;
/** Horizontal stub out of an output before a wire turns. */
export const STUB = 18;

const overlaps = (a0: number, a1: number, b0: number, b1: number) => a0 < b1 && b0 < a1;

/**
 * The lane (y) of each feedback run: runs are placed shortest first; each starts at its base
 * and moves outwards past any block within CLEAR of it and any already placed lane closer than
 * LANE_GAP whose span overlaps its own.
 */
export function assignLanes(runs: FeedbackRun[], obstacles: Box[]): Map<string, number> {
  const order = [...runs].sort((a, b) => a.x1 - a.x0 - (b.x1 - b.x0) || a.id.localeCompare(b.id));
  const placed: { run: FeedbackRun; y: number }[] = [];
  const out = new Map<string, number>();
  for (const r of order) {
    const dir = r.side === 'below' ? 1 : -1;
    let y = r.base;
    // Each pass moves y strictly outwards past one obstacle or lane, so this ends.
    for (let guard = 0; guard < 4 * (obstacles.length + placed.length) + 4; guard++) {
      let moved = false;
      for (const o of obstacles) {
        if (!overlaps(r.x0, r.x1, o.x, o.x + o.width)) continue;
        if (y > o.y - CLEAR + 1 && y < o.y + o.height + CLEAR - 1) {
          const past = dir > 0 ? o.y + o.height + CLEAR : o.y - CLEAR;
          if ((past - y) * dir > 0) {
            y = past;
            moved = true;
          }
        }
      }
      for (const p of placed) {
        if (p.run.side !== r.side || !overlaps(r.x0, r.x1, p.run.x0, p.run.x1)) continue;
        if (Math.abs(y - p.y) < LANE_GAP - 0.5) {
          y = p.y + dir * LANE_GAP;
          moved = true;
        }
      }
      if (!moved) break;
    }
    placed.push({ run: r, y });
    out.set(r.id, y);
  }
  return out;
}

/**
 * The feedback wires of a diagram laid out with these block boxes (position and measured
 * size), and their lanes. A wire is a feedback wire when its input lies left of its output
 * (the test WireEdge applies to the drawn handles).
 */
export function feedbackLanes(d: Diagram, boxes: ReadonlyMap<string, Box>): Map<string, number> {
  const runs: FeedbackRun[] = [];
  const kinds = new Map(d.blocks.map((b) => [b.id, b]));
  for (const w of d.wires) {
    const s = boxes.get(w.from.block);
    const t = boxes.get(w.to.block);
    const tb = kinds.get(w.to.block);
    if (!s || !t || !tb) continue;
    let index = 0;
    try {
      index = Math.max(0, blockSpec(tb.kind).inputs(tb.params).indexOf(w.to.port));
    } catch {
      // unreadable parameters: treat as the first input
    }
    const side = inputSide(tb.kind, index);
    const sx = s.x + s.width;
    const tx = side === 'left' ? t.x : t.x + t.width / 2;
    if (!(tx < sx + 4)) continue;
    const above = side === 'top';
    runs.push({
      id: w.id,
      x0: side === 'left' ? tx - STUB : tx,
      x1: sx + STUB,
      base: above ? Math.min(s.y, t.y) - CLEAR : Math.max(s.y + s.height, t.y + t.height) + CLEAR,
      side: above ? 'above' : 'below',
    });
  }
  return assignLanes(runs, [...boxes.values()]);
}
