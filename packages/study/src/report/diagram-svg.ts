/**
 * A plain SVG picture of a diagram drawn from the document alone (for the design report):
 * blocks as rounded cards with their label and main parameters, summing junctions as circles
 * with their signs, wires as arrows, cuts marked on their wires.
 */
import { cardOf, type Block, type Diagram } from '@loopwright/graph';
import { cutName } from '../names.ts';
import { esc } from './svg-plot.ts';

const W = 132;
const H = 54;
const R = 18;

/** The block's card text from the catalogue: its formula, or its caption (limits, shape). */
function summary(b: Block): string {
  const c = cardOf(b.kind, b.params);
  return c.formula ?? c.caption ?? '';
}

const isRound = (b: Block) => b.kind === 'summing-junction';

function outPoint(b: Block): [number, number] {
  return isRound(b) ? [b.position.x + 2 * R, b.position.y + R] : [b.position.x + W, b.position.y + H / 2];
}

function inPoint(b: Block, port: string): [number, number] {
  if (isRound(b)) {
    const n = Number(port.replace(/^in/, '')) || 1;
    // in1 from the left, in2 from below, in3 from above.
    const cx = b.position.x + R;
    const cy = b.position.y + R;
    return n === 1 ? [cx - R, cy] : n === 2 ? [cx, cy + R] : [cx, cy - R];
  }
  return [b.position.x, b.position.y + H / 2];
}

export function diagramSvg(
  d: Diagram,
  colours = { text: '#1d2329', muted: '#5d6670', card: '#ffffff', border: '#8a949e', wire: '#3d4756', cut: '#d1495b' },
): string {
  const byId = new Map(d.blocks.map((b) => [b.id, b]));
  let x0 = Infinity;
  let y0 = Infinity;
  let x1 = -Infinity;
  let y1 = -Infinity;
  for (const b of d.blocks) {
    x0 = Math.min(x0, b.position.x);
    y0 = Math.min(y0, b.position.y);
    x1 = Math.max(x1, b.position.x + (isRound(b) ? 2 * R : W));
    y1 = Math.max(y1, b.position.y + (isRound(b) ? 2 * R : H));
  }
  if (!Number.isFinite(x0)) {
    x0 = 0;
    y0 = 0;
    x1 = 200;
    y1 = 80;
  }
  // Wires going back (feedback) run below the blocks they pass, each on a lane of its own:
  // nested loops' returns never share a line, and their cut marks sit apart.
  const routes = new Map<string, { ax: number; ay: number; bx: number; by: number; low: number | null }>();
  const back: { id: string; lo: number; hi: number; floor: number }[] = [];
  for (const w of d.wires) {
    const a = byId.get(w.from.block);
    const b = byId.get(w.to.block);
    if (!a || !b) continue;
    const [ax, ay] = outPoint(a);
    const [bx, by] = inPoint(b, w.to.port);
    routes.set(w.id, { ax, ay, bx, by, low: null });
    if (bx < ax + 20) {
      const lo = bx - 16;
      const hi = ax + 16;
      const under = d.blocks
        .filter((k) => k.position.x + W >= lo && k.position.x <= hi)
        .map((k) => k.position.y + (isRound(k) ? 2 * R : H));
      back.push({ id: w.id, lo, hi, floor: Math.max(ay, by, ...under) });
    }
  }
  const lanes: { lo: number; hi: number; lane: number }[] = [];
  for (const w of [...back].sort((p, q) => p.hi - p.lo - (q.hi - q.lo))) {
    let lane = 0;
    while (lanes.some((l) => l.lane === lane && l.lo < w.hi && w.lo < l.hi)) lane++;
    lanes.push({ lo: w.lo, hi: w.hi, lane });
    const low = w.floor + 28 + 20 * lane;
    routes.get(w.id)!.low = low;
    y1 = Math.max(y1, low + 6);
  }
  const pad = 40;
  const vb = `${x0 - pad} ${y0 - pad} ${x1 - x0 + 2 * pad} ${y1 - y0 + 2 * pad}`;
  const parts: string[] = [];
  parts.push(
    `<defs><marker id="lw-arrow" viewBox="0 0 10 10" refX="9" refY="5" markerWidth="7" markerHeight="7" orient="auto-start-reverse"><path d="M0,0L10,5L0,10z" fill="${colours.wire}"/></marker></defs>`,
  );
  const cutWires = new Map(d.cuts.map((c) => [c.wire, c]));
  for (const w of d.wires) {
    const r = routes.get(w.id);
    const b = byId.get(w.to.block);
    if (!r || !b) continue;
    const { ax, ay, bx, by, low } = r;
    // Orthogonal route: out to the right, across, into the input; a wire going back runs below on its lane.
    const path =
      low === null
        ? `M${ax},${ay} H${(ax + bx) / 2} V${by} H${bx}`
        : `M${ax},${ay} H${ax + 16} V${low} H${bx - (isRound(b) ? 0 : 16)} V${by}${isRound(b) ? '' : ` H${bx}`}`;
    parts.push(`<path d="${path}" fill="none" stroke="${colours.wire}" stroke-width="1.5" marker-end="url(#lw-arrow)"/>`);
    const cut = cutWires.get(w.id);
    if (cut) {
      const cx = (ax + bx) / 2;
      const cy = low === null ? (ay + by) / 2 : low;
      parts.push(
        `<g><line x1="${cx - 7}" y1="${cy - 9}" x2="${cx + 7}" y2="${cy + 9}" stroke="${colours.cut}" stroke-width="3"/><text x="${cx + 9}" y="${cy - 8}" font-size="10" fill="${colours.cut}">${esc(cutName(cut))}</text></g>`,
      );
    }
  }
  for (const b of d.blocks) {
    const label = esc(b.label ?? b.id);
    if (isRound(b)) {
      const cx = b.position.x + R;
      const cy = b.position.y + R;
      const signs = String(b.params.signs ?? '+-');
      parts.push(`<circle cx="${cx}" cy="${cy}" r="${R}" fill="${colours.card}" stroke="${colours.border}" stroke-width="1.5"/>`);
      parts.push(
        `<text x="${cx - R - 2}" y="${cy - 5}" font-size="11" text-anchor="end" fill="${colours.text}">${esc(signs[0] ?? '+')}</text>`,
      );
      if (signs[1]) parts.push(`<text x="${cx + 5}" y="${cy + R + 11}" font-size="11" fill="${colours.text}">${esc(signs[1])}</text>`);
      if (signs[2]) parts.push(`<text x="${cx + 5}" y="${cy - R - 3}" font-size="11" fill="${colours.text}">${esc(signs[2])}</text>`);
      parts.push(`<text x="${cx}" y="${cy - R - 6}" font-size="9" text-anchor="middle" fill="${colours.muted}">${label}</text>`);
      continue;
    }
    const { x, y } = b.position;
    parts.push(
      `<rect x="${x}" y="${y}" width="${W}" height="${H}" rx="9" fill="${colours.card}" stroke="${colours.border}" stroke-width="1.5"/>`,
    );
    parts.push(
      `<text x="${x + W / 2}" y="${y + 21}" font-size="12" font-weight="600" text-anchor="middle" fill="${colours.text}">${label}</text>`,
    );
    const s = summary(b);
    parts.push(
      `<text x="${x + W / 2}" y="${y + 39}" font-size="10" text-anchor="middle" fill="${colours.muted}">${esc(s.length > 24 ? `${s.slice(0, 23)}…` : s)}</text>`,
    );
  }
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="${vb}" width="${x1 - x0 + 2 * pad}" height="${y1 - y0 + 2 * pad}" font-family="system-ui, sans-serif">${parts.join('')}</svg>`;
}
