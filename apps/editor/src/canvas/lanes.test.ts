import { describe, expect, it } from 'vitest';
import { assignLanes, CLEAR, LANE_GAP, type Box, type FeedbackRun } from './lanes.ts';

// Drawing rules for return paths of nested loops (common practice, no source): inner loop
// nearest the forward path, each enclosing loop one lane further out, no lane through a block.
const row = (xs: number[], y = 0, w = 100, h = 50): Box[] => xs.map((x) => ({ x, y, width: w, height: h }));

describe('assignLanes', () => {
  it('three nested loops closing on one row get three lanes, innermost nearest', () => {
    const blocks = row([0, 200, 400, 600, 800, 1000]);
    const base = 50 + CLEAR;
    const runs: FeedbackRun[] = [
      { id: 'outer', x0: 180, x1: 1118, base, side: 'below' },
      { id: 'inner', x0: 580, x1: 718, base, side: 'below' },
      { id: 'middle', x0: 380, x1: 918, base, side: 'below' },
    ];
    const lanes = assignLanes(runs, blocks);
    expect(lanes.get('inner')).toBe(base);
    expect(lanes.get('middle')).toBe(base + LANE_GAP);
    expect(lanes.get('outer')).toBe(base + 2 * LANE_GAP);
  });

  it('loops side by side (spans apart) share a lane', () => {
    const runs: FeedbackRun[] = [
      { id: 'a', x0: 0, x1: 300, base: 80, side: 'below' },
      { id: 'b', x0: 400, x1: 700, base: 80, side: 'below' },
    ];
    const lanes = assignLanes(runs, []);
    expect(lanes.get('a')).toBe(80);
    expect(lanes.get('b')).toBe(80);
  });

  it('a lane passes below a block hanging under the forward path, then the next loop below that', () => {
    const blocks = [...row([0, 300, 600]), { x: 320, y: 90, width: 100, height: 40 }];
    const runs: FeedbackRun[] = [
      { id: 'long', x0: -20, x1: 718, base: 76, side: 'below' },
      { id: 'short', x0: 280, x1: 718, base: 76, side: 'below' },
    ];
    const lanes = assignLanes(runs, blocks);
    expect(lanes.get('short')).toBe(130 + CLEAR);
    expect(lanes.get('long')).toBe(130 + CLEAR + LANE_GAP);
    // No lane within CLEAR of a block it passes.
    for (const [id, y] of lanes) {
      const r = runs.find((x) => x.id === id)!;
      for (const b of blocks)
        if (b.x < r.x1 && r.x0 < b.x + b.width) expect(y <= b.y - CLEAR + 1 || y >= b.y + b.height + CLEAR - 1).toBe(true);
    }
  });

  it('lanes above (into a top input) move upwards', () => {
    const runs: FeedbackRun[] = [
      { id: 'a', x0: 0, x1: 500, base: -26, side: 'above' },
      { id: 'b', x0: 100, x1: 300, base: -26, side: 'above' },
    ];
    const lanes = assignLanes(runs, []);
    expect(lanes.get('b')).toBe(-26);
    expect(lanes.get('a')).toBe(-26 - LANE_GAP);
  });
});
