/** The diagram's findings; clicking one selects the blocks and wires at fault. */
import { useReactFlow } from '@xyflow/react';
import { useDiagramStore } from '../store/diagram-store.ts';
import { useFindings } from '../store/findings.ts';

const ICON = { error: '!', warning: '▲', info: 'i' } as const;

export function FindingsPanel() {
  const findings = useFindings();
  const flow = useReactFlow();
  const counts = { error: 0, warning: 0, info: 0 };
  for (const f of findings) counts[f.severity]++;
  return (
    <section className="panel findings" aria-label="Findings">
      <h2>
        Findings{' '}
        <span className="counts" aria-label="finding counts">
          {counts.error > 0 && (
            <span className="count error">
              {counts.error} error{counts.error > 1 ? 's' : ''}
            </span>
          )}
          {counts.warning > 0 && (
            <span className="count warning">
              {counts.warning} warning{counts.warning > 1 ? 's' : ''}
            </span>
          )}
        </span>
      </h2>
      {findings.length === 0 ? (
        <p className="muted small pad" aria-label="No findings">
          No findings: the diagram is complete and consistent.
        </p>
      ) : (
        <ul className="finding-list" role="list" aria-label="Finding list">
          {findings.map((f, i) => (
            <li key={i}>
              <button
                type="button"
                className={`finding ${f.severity}`}
                aria-label={`${f.severity}: ${f.message}`}
                data-code={f.code}
                onClick={() => {
                  const blocks = f.blocks ?? [];
                  const wires = f.wires ?? [];
                  useDiagramStore.getState().setSelection({ blocks, wires });
                  const ids = new Set([
                    ...blocks,
                    ...useDiagramStore
                      .getState()
                      .diagram.wires.filter((w) => wires.includes(w.id))
                      .flatMap((w) => [w.from.block, w.to.block]),
                  ]);
                  if (ids.size) void flow.fitView({ nodes: [...ids].map((id) => ({ id })), padding: 0.6, maxZoom: 1.25, duration: 200 });
                }}
              >
                <span className={`sev ${f.severity}`} aria-hidden="true">
                  {ICON[f.severity]}
                </span>
                <span>
                  {f.blocks?.length || f.wires?.length ? (
                    <span className="where mono">{[...(f.blocks ?? []), ...(f.wires ?? [])].join(', ')}: </span>
                  ) : null}
                  {f.message}
                </span>
              </button>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
