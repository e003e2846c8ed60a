/** Parts: every block kind; click to add it in view, or drag it onto the canvas. */
import { useReactFlow } from '@xyflow/react';
import { useDiagramStore } from '../store/diagram-store.ts';
import { catalogue, type BlockKind } from '../store/graph-bridge.ts';
import { GRID, PART_MIME } from '../canvas/Canvas.tsx';

const GROUPS: { category: 'signal' | 'linear' | 'nonlinear'; title: string }[] = [
  { category: 'signal', title: 'Signals' },
  { category: 'linear', title: 'Linear' },
  { category: 'nonlinear', title: 'Nonlinear' },
];

export function PartsPanel() {
  const flow = useReactFlow();
  const add = (kind: BlockKind) => {
    const el = document.querySelector('.canvas');
    const r = el?.getBoundingClientRect();
    const n = useDiagramStore.getState().diagram.blocks.length;
    // Near the centre of what is in view, stepped so that successive parts do not stack.
    const screen = r ? { x: r.left + r.width * 0.3 + (n % 5) * 40, y: r.top + r.height * 0.3 + (n % 4) * 30 } : { x: 300, y: 200 };
    const p = flow.screenToFlowPosition(screen);
    useDiagramStore.getState().addBlock(kind, { x: Math.round(p.x / GRID) * GRID, y: Math.round(p.y / GRID) * GRID });
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
                  e.dataTransfer.effectAllowed = 'copy';
                }}
              >
                <span className={`part-glyph glyph-${s.kind}`} aria-hidden="true" />
                {s.title}
              </button>
            ))}
        </div>
      ))}
    </aside>
  );
}
