// Canvas wiring: feedback lanes are recomputed on every drag frame (block positions change), so
// they must stay far inside a 16 ms frame. The demo, and cascades of n nested loops in a row.
import { demoDiagrams, emptyDiagram, type Block, type Diagram, type Wire } from '@loopwright/graph';
import { feedbackLanes, type Box } from '@loopwright/editor/testing';
import { bench, fitExponent, record, report, section } from './harness.ts';

const size = (b: Block) => (b.kind === 'summing-junction' ? { width: 44, height: 44 } : { width: 150, height: 52 });
const boxesOf = (d: Diagram) => new Map<string, Box>(d.blocks.map((b) => [b.id, { ...b.position, ...size(b) }]));

/** r → e1 → C1 → … → en → Cn → Pn → … → P1 → y, each Pi fed back to ei (loop i inside loop i − 1), in one row. */
function nestedRow(n: number): Diagram {
  const order: Block[] = [{ id: 'r', kind: 'source', position: { x: 0, y: 0 }, params: {} }];
  for (let i = 1; i <= n; i++) {
    order.push({ id: `e${i}`, kind: 'summing-junction', position: { x: 0, y: 0 }, params: { signs: '+-' } });
    order.push({ id: `C${i}`, kind: 'gain', position: { x: 0, y: 0 }, params: { k: 1 } });
  }
  for (let i = n; i >= 1; i--) order.push({ id: `P${i}`, kind: 'first-order-lag', position: { x: 0, y: 0 }, params: { k: 1, tau: 1 } });
  order.push({ id: 'y', kind: 'probe', position: { x: 0, y: 0 }, params: {} });
  order.forEach((b, i) => (b.position = { x: 180 * i, y: 0 }));
  const wires: Wire[] = [];
  for (let i = 0; i + 1 < order.length; i++) {
    const to = order[i + 1];
    wires.push({
      id: `f${i}`,
      from: { block: order[i].id, port: 'out' },
      to: { block: to.id, port: to.kind === 'summing-junction' ? 'in1' : 'in' },
    });
  }
  for (let i = 1; i <= n; i++) wires.push({ id: `fb${i}`, from: { block: `P${i}`, port: 'out' }, to: { block: `e${i}`, port: 'in2' } });
  return { ...emptyDiagram(), blocks: order, wires };
}

export function run(): void {
  section('canvas: feedback lanes per drag frame');
  const demo = demoDiagrams.find((x) => x.id === 'positioning-axis')!.diagram;
  const demoBoxes = boxesOf(demo);
  report(
    bench('positioning axis (20 blocks, 3 loops): lanes', () => feedbackLanes(demo, demoBoxes), { minRuns: 200 }),
    1,
    'demo-lanes',
  );
  const ns = [4, 8, 16, 32];
  const medians: number[] = [];
  for (const n of ns) {
    const d = nestedRow(n);
    const boxes = boxesOf(d);
    const lanes = feedbackLanes(d, boxes);
    if (lanes.size !== n || new Set(lanes.values()).size !== n) throw new Error(`${n} nested loops did not get ${n} lanes`);
    const r = bench(`${n} nested loops (${d.blocks.length} blocks): lanes`, () => feedbackLanes(d, boxes), { minRuns: 50 });
    report(r, n <= 8 ? 1 : undefined, `nested-${n}-lanes`);
    medians.push(r.median);
  }
  console.log(
    `  cost ∝ loops^${record('nested-lanes.exponent', fitExponent(ns, medians), 'exponent').toFixed(2)} (shortest-first placement, each lane checked against blocks and lanes)`,
  );
}
