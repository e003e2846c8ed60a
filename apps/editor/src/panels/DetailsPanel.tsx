/**
 * Details: the selected block's fields (with units, ranges and live errors), what feeds each
 * of its inputs (wiring by keyboard), or the selected wire with its cut.
 */
import { useDiagramStore } from '../store/diagram-store.ts';
import { blockSpec, isSampledKind, visibleParams, type Block, type Diagram } from '../store/graph-bridge.ts';
import { SampledExport } from './SampledExport.tsx';
import { ParamField } from './ParamField.tsx';
import { FitRecordNote } from '../commission/FitRecordNote.tsx';

function outputsOf(d: Diagram, except: string): { value: string; label: string }[] {
  const out: { value: string; label: string }[] = [];
  for (const b of d.blocks) {
    if (b.id === except) continue;
    for (const p of blockSpec(b.kind).outputs) out.push({ value: `${b.id}.${p}`, label: `${b.label ?? b.id} (${b.id}.${p})` });
  }
  return out;
}

function BlockDetails({ diagram, block }: { diagram: Diagram; block: Block }) {
  const st = useDiagramStore.getState();
  const spec = blockSpec(block.kind);
  let inputs: string[];
  try {
    inputs = spec.inputs(block.params);
  } catch {
    inputs = [];
  }
  const sources = outputsOf(diagram, block.id);
  return (
    <div className="details-body" aria-label={`Details of ${block.id}`}>
      <div className="details-head">
        <strong>{spec.title}</strong> <span className="muted mono">{block.id}</span>
      </div>
      <p className="muted small desc" title={spec.description}>
        {spec.description}
      </p>
      <FitRecordNote diagram={diagram} block={block} />
      <div className="field">
        <label htmlFor="block-label">Label</label>
        <input
          id="block-label"
          aria-label="Label"
          defaultValue={block.label ?? ''}
          key={`${block.id}:${block.label ?? ''}`}
          placeholder={spec.title}
          onBlur={(e) => e.target.value !== (block.label ?? '') && st.setBlockLabel(block.id, e.target.value)}
          onKeyDown={(e) => e.key === 'Enter' && (e.target as HTMLInputElement).blur()}
        />
      </div>
      {visibleParams(block.kind, block.params).map((p) => (
        <ParamField
          key={`${block.id}:${p.name}`}
          diagram={diagram}
          block={block}
          spec={p}
          onCommit={(v) => st.updateBlockParams(block.id, { [p.name]: v })}
        />
      ))}
      {isSampledKind(block.kind) && <SampledExport diagram={diagram} block={block} />}
      {inputs.length > 0 && (
        <fieldset className="wiring">
          <legend>Inputs</legend>
          {inputs.map((port) => {
            const w = diagram.wires.find((x) => x.to.block === block.id && x.to.port === port);
            const value = w ? `${w.from.block}.${w.from.port}` : '';
            return (
              <div className="field row" key={port}>
                <label htmlFor={`wire-${port}`}>{port}</label>
                <select
                  id={`wire-${port}`}
                  aria-label={`Input ${port} of ${block.id} comes from`}
                  value={value}
                  onChange={(e) => {
                    const v = e.target.value;
                    if (!v) {
                      if (w) st.removeWires([w.id]);
                      return;
                    }
                    const [b, p] = v.split('.');
                    st.connect({ block: b, port: p }, { block: block.id, port });
                    st.setSelection({ blocks: [block.id], wires: [] });
                  }}
                >
                  <option value="">— not connected —</option>
                  {sources.map((s) => (
                    <option key={s.value} value={s.value}>
                      {s.label}
                    </option>
                  ))}
                </select>
              </div>
            );
          })}
        </fieldset>
      )}
      <button type="button" className="danger" aria-label={`Delete block ${block.id}`} onClick={() => st.deleteSelection()}>
        Delete block
      </button>
    </div>
  );
}

function WireDetails({ diagram, wireId }: { diagram: Diagram; wireId: string }) {
  const st = useDiagramStore.getState();
  const w = diagram.wires.find((x) => x.id === wireId);
  if (!w) return null;
  const cut = diagram.cuts.find((c) => c.wire === w.id);
  return (
    <div className="details-body" aria-label={`Details of wire ${w.id}`}>
      <div className="details-head">
        <strong>Wire</strong> <span className="muted mono">{w.id}</span>
      </div>
      <p className="mono small">
        {w.from.block}.{w.from.port} → {w.to.block}.{w.to.port}
      </p>
      {cut ? (
        <>
          <div className="field">
            <label htmlFor="cut-label">Cut label</label>
            <input
              id="cut-label"
              aria-label="Cut label"
              key={`${cut.id}:${cut.label ?? ''}`}
              defaultValue={cut.label ?? ''}
              placeholder={cut.id}
              onBlur={(e) => e.target.value !== (cut.label ?? '') && st.setCutLabel(cut.id, e.target.value)}
              onKeyDown={(e) => e.key === 'Enter' && (e.target as HTMLInputElement).blur()}
            />
          </div>
          <button type="button" aria-label={`Remove cut ${cut.id}`} onClick={() => st.removeCut(cut.id)}>
            Close the loop here (remove cut)
          </button>
        </>
      ) : (
        <button type="button" aria-label={`Cut wire ${w.id}`} onClick={() => st.addCut(w.id)}>
          Cut this wire (open the loop here)
        </button>
      )}{' '}
      <button type="button" className="danger" aria-label={`Delete wire ${w.id}`} onClick={() => st.deleteSelection()}>
        Delete wire
      </button>
    </div>
  );
}

export function DetailsPanel() {
  const diagram = useDiagramStore((s) => s.diagram);
  const selection = useDiagramStore((s) => s.selection);
  const st = useDiagramStore.getState();
  let body;
  if (selection.blocks.length === 1 && selection.wires.length === 0) {
    const b = diagram.blocks.find((x) => x.id === selection.blocks[0]);
    body = b ? <BlockDetails diagram={diagram} block={b} /> : null;
  } else if (selection.blocks.length === 0 && selection.wires.length === 1) {
    body = <WireDetails diagram={diagram} wireId={selection.wires[0]} />;
  } else if (selection.blocks.length + selection.wires.length > 1) {
    body = (
      <div className="details-body">
        <p>
          {selection.blocks.length} blocks and {selection.wires.length} wires selected.
        </p>
        <button type="button" className="danger" aria-label="Delete selection" onClick={() => st.deleteSelection()}>
          Delete selection
        </button>
      </div>
    );
  } else {
    body = (
      <div className="details-body">
        <div className="field">
          <label htmlFor="diagram-description">Description</label>
          <textarea
            id="diagram-description"
            aria-label="Diagram description"
            rows={3}
            key={diagram.description}
            defaultValue={diagram.description}
            onBlur={(e) => {
              if (e.target.value !== diagram.description) st.setDescription(e.target.value);
            }}
          />
        </div>
        <p className="muted small">
          Select a block or a wire to edit it. Add blocks from Parts; drag from an output (right) to an input (left) to wire them.
        </p>
      </div>
    );
  }
  return (
    <section className="panel details" aria-label="Details">
      <h2>Details</h2>
      {body}
    </section>
  );
}
