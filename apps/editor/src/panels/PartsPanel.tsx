/** Parts: every block kind; click to add it in view, or drag it onto the canvas (onto a wire: into the wire). */
import { useReactFlow } from '@xyflow/react';
import { useDiagramStore } from '../store/diagram-store.ts';
import { catalogue, type BlockKind } from '../store/graph-bridge.ts';
import { GRID, PART_MIME, partKindMime } from '../canvas/Canvas.tsx';

const GROUPS: { category: 'signal' | 'linear' | 'nonlinear'; title: string }[] = [
  { category: 'signal', title: 'Signals' },
  { category: 'linear', title: 'Linear' },
  { category: 'nonlinear', title: 'Nonlinear' },
];

const CELL = { w: 200, h: 110 };

/**
 * Where a clicked part lands: the first grid cell in view, left to right and top to bottom,
 * that no block occupies (so successive parts line up instead of stacking).
 */
export function freeSpot(taken: { x: number; y: number }[], from: { x: number; y: number }, to: { x: number; y: number }) {
  const x0 = Math.round(from.x / GRID) * GRID;
  const y0 = Math.round(from.y / GRID) * GRID;
  const cols = Math.max(1, Math.floor((to.x - x0) / CELL.w));
  for (let i = 0; i < 400; i++) {
    const x = x0 + (i % cols) * CELL.w;
    const y = y0 + Math.floor(i / cols) * CELL.h;
    if (!taken.some((p) => Math.abs(p.x - x) < CELL.w * 0.8 && Math.abs(p.y - y) < CELL.h * 0.8)) return { x, y };
  }
  return { x: x0, y: y0 };
}

export function PartsPanel() {
  const flow = useReactFlow();
  const add = (kind: BlockKind) => {
    const el = document.querySelector('.canvas');
    const r = el?.getBoundingClientRect();
    const topLeft = flow.screenToFlowPosition(r ? { x: r.left + 30, y: r.top + 40 } : { x: 200, y: 100 });
    const bottomRight = flow.screenToFlowPosition(r ? { x: r.right - 30, y: r.bottom - 40 } : { x: 900, y: 500 });
    const spot = freeSpot(
      useDiagramStore.getState().diagram.blocks.map((b) => b.position),
      topLeft,
      bottomRight,
    );
    useDiagramStore.getState().addBlock(kind, spot);
  };
  return (
    <aside className="parts panel" aria-label="Parts">
      <h2>Parts</h2>
      {GROUPS.map((g) => (
        <div key={g.category} className="parts-group" role="group" aria-label={g.title}>
          <h3>{g.title}</h3>
          {catalogue
            .filter((s) => s.category === g.category)
            .map((s) => (
              <button
                type="button"
                key={s.kind}
                className="part"
                draggable
                title={s.description}
                aria-label={`Add ${s.title}`}
                data-kind={s.kind}
                onClick={() => add(s.kind)}
                onDragStart={(e) => {
                  e.dataTransfer.setData(PART_MIME, s.kind);
                  e.dataTransfer.setData(partKindMime(s.kind), s.kind);
                  e.dataTransfer.effectAllowed = 'copy';
                }}
              >
                <span className={`part-glyph glyph-${s.kind} glyph-${s.category}`} aria-hidden="true" />
                {s.title}
              </button>
            ))}
        </div>
      ))}
    </aside>
  );
}
