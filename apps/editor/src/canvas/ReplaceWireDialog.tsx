/**
 * Asked when a wire is drawn onto an input that already has one: an input takes one wire, so
 * the new one would replace the old. Nothing changes until the user says Replace; Cancel,
 * Escape or closing keep the diagram as it was.
 */
import { useModalDialog } from '../panels/use-modal.ts';
import { useDiagramStore } from '../store/diagram-store.ts';
import { useUiStore } from '../store/ui-store.ts';

const name = (d: ReturnType<typeof useDiagramStore.getState>['diagram'], id: string) => {
  const b = d.blocks.find((x) => x.id === id);
  return b?.label ? `${b.label} (${id})` : id;
};

export function ReplaceWireDialog() {
  const pending = useUiStore((s) => s.pendingConnection);
  const diagram = useDiagramStore((s) => s.diagram);
  const ref = useModalDialog(pending !== null);
  const existing = pending ? diagram.wires.find((w) => w.id === pending.existing) : undefined;
  const close = () => useUiStore.getState().setPendingConnection(null);
  const replace = () => {
    const p = useUiStore.getState().pendingConnection;
    close();
    if (p) useDiagramStore.getState().connect(p.from, p.to);
  };
  return (
    <dialog ref={ref} className="lw-confirm" aria-label="Replace wire?" onClose={close}>
      {pending && existing && (
        <>
          <h2>Input already connected</h2>
          <p>
            Input <b className="mono">{pending.to.port}</b> of <b>{name(diagram, pending.to.block)}</b> takes one wire and already has one,
            from <b>{name(diagram, existing.from.block)}</b> <span className="mono">.{existing.from.port}</span> (wire{' '}
            <span className="mono">{existing.id}</span>).
          </p>
          <p>
            Replace it with the new wire from <b>{name(diagram, pending.from.block)}</b> <span className="mono">.{pending.from.port}</span>?
            {diagram.cuts.some((c) => c.wire === existing.id) && ' The cut on the old wire goes with it.'}
          </p>
          <div className="lw-confirm-buttons">
            <button type="button" onClick={close} aria-label="Cancel: keep the existing wire">
              Cancel
            </button>
            <button type="button" className="primary" onClick={replace} aria-label="Replace the existing wire" autoFocus>
              Replace
            </button>
          </div>
        </>
      )}
    </dialog>
  );
}
