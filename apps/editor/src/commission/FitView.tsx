/**
 * The Test log view: open a logged plant test (file picker, drop, or the sample), choose its
 * columns, see the three models fitted to it with their intervals and NRMSE, the fitted
 * response over the data and the residuals, and make the chosen fit a block or put it into the
 * selected block. The caution about fitted models stands beside every fit.
 */
import { useMemo, useRef, useState } from 'react';
import { FIT_CAUTION, REPLACEABLE_BY_FIT, demoTestLogs, type FittedModel } from '@loopwright/study';
import './commission.css';
import { useDiagramStore } from '../store/diagram-store.ts';
import { fmt } from '../analysis/sweep.ts';
import { ChartFrame } from '../views/ChartFrame.tsx';
import type { Palette } from '../views/palette.ts';
import { fitOption, residualOption } from './commission-charts.ts';
import {
  chooseModel,
  chosenFit,
  makeBlockFromFit,
  openSampleLog,
  openTestLogFile,
  setBetween,
  setColumn,
  updateBlockFromFit,
  useCommissionStore,
  type ModelKind,
  type Role,
} from './commission-store.ts';

const interval = (i: [number, number] | null) => (i ? `[${fmt(i[0], 3)}, ${fmt(i[1], 3)}]` : 'not determined');

function ParamCell({ value, i, unit = '' }: { value: number | undefined; i: [number, number] | null | undefined; unit?: string }) {
  if (value === undefined) return <td className="lw-muted">—</td>;
  return (
    <td data-value={String(value)} title={`95 % interval ${interval(i ?? null)}`}>
      {fmt(value)}
      {unit}
      <span className="lw-pinned-val lw-interval">{interval(i ?? null)}</span>
    </td>
  );
}

function ModelsTable() {
  const fit = useCommissionStore((s) => s.fit)!;
  const chosen = useCommissionStore((s) => s.chosen);
  return (
    <table className="lw-table" data-testid="fit-table">
      <thead>
        <tr>
          <th>model</th>
          <th title="RMS residual over the output's range">NRMSE</th>
          <th>gain K</th>
          <th>lag τ1 [s]</th>
          <th>lag τ2 [s]</th>
          <th title="Each value with its approximate 95 % interval below it">dead time θ [s]</th>
          <th>notes</th>
        </tr>
      </thead>
      <tbody>
        {fit.fits.map(({ model, result }) => {
          if (!result.ok) {
            return (
              <tr key={model} data-model={model}>
                <td>{model.toUpperCase()}</td>
                <td colSpan={6} className="lw-bad">
                  {result.error}
                </td>
              </tr>
            );
          }
          const f: FittedModel = result.value;
          return (
            <tr key={model} data-model={model} className={model === chosen ? 'lw-changed' : undefined}>
              <td className="lw-nowrap">
                <label className="lw-check">
                  <input
                    type="radio"
                    name="fit-model"
                    aria-label={`Use the ${model.toUpperCase()} fit`}
                    checked={model === chosen}
                    onChange={() => chooseModel(model as ModelKind)}
                  />
                  {model.toUpperCase()}
                </label>
              </td>
              <td data-field="nrmse" data-value={String(f.nrmse)}>
                {fmt(100 * f.nrmse, 3)} %
              </td>
              <ParamCell value={f.model.gain} i={f.intervals.gain} />
              <ParamCell value={f.model.timeConstants[0]} i={f.intervals.timeConstants[0]} />
              <ParamCell value={f.model.timeConstants[1]} i={f.intervals.timeConstants[1]} />
              <ParamCell value={f.model.deadTime} i={f.intervals.deadTime} />
              <td className="lw-small">{f.warnings.length ? f.warnings.join('; ') : <span className="lw-muted">—</span>}</td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}

function BlockActions() {
  const fit = useCommissionStore((s) => s.fit);
  const chosen = useCommissionStore((s) => s.chosen);
  const selection = useDiagramStore((s) => s.selection);
  const diagram = useDiagramStore((s) => s.diagram);
  const f = chosenFit({ fit, chosen });
  const selected = selection.blocks.length === 1 ? diagram.blocks.find((b) => b.id === selection.blocks[0]) : undefined;
  const canUpdate = selected !== undefined && REPLACEABLE_BY_FIT.includes(selected.kind);
  return (
    <div className="lw-view-tools">
      <span className="lw-muted">{f ? <code data-testid="fit-expression">{f.expression}</code> : 'no fit chosen'}</span>
      <span className="lw-spacer" />
      <button
        type="button"
        disabled={!f}
        data-testid="make-block"
        title="A new transfer-function block holding the chosen fit, with where it came from"
        onClick={() => makeBlockFromFit()}
      >
        Make a block
      </button>
      <button
        type="button"
        disabled={!f || !canUpdate}
        data-testid="update-block"
        title={
          canUpdate
            ? `Put the chosen fit into block ${selected!.id} (its wires stay)`
            : 'Select one linear block (transfer function, lag, second-order, lead–lag, integrator, dead time, gain) to update'
        }
        onClick={() => selected && updateBlockFromFit(selected.id)}
      >
        Update block{canUpdate ? ` ${selected!.id}` : ''}
      </button>
    </div>
  );
}

function ColumnPicker() {
  const columns = useCommissionStore((s) => s.columns);
  const between = useCommissionStore((s) => s.between);
  if (!columns) return null;
  const roles: Role[] = ['time', 'input', 'output'];
  return (
    <>
      {roles.map((role) => (
        <label key={role} className="lw-field">
          <span>{role}</span>
          <select aria-label={`${role} column`} value={columns.chosen[role]} onChange={(e) => void setColumn(role, e.target.value)}>
            {columns.columns.map((c) => (
              <option key={c} value={c}>
                {c}
              </option>
            ))}
          </select>
        </label>
      ))}
      <label className="lw-field" title="How the input runs between samples: linear, or held (a digital controller's output)">
        <span>input between samples</span>
        <select aria-label="Input between samples" value={between} onChange={(e) => void setBetween(e.target.value as 'linear' | 'hold')}>
          <option value="linear">linear</option>
          <option value="hold">held</option>
        </select>
      </label>
    </>
  );
}

export function FitView({ pal }: { pal: Palette }) {
  const log = useCommissionStore((s) => s.log);
  const fit = useCommissionStore((s) => s.fit);
  const fitError = useCommissionStore((s) => s.fitError);
  const fitting = useCommissionStore((s) => s.fitting);
  const chosen = useCommissionStore((s) => s.chosen);
  const input = useRef<HTMLInputElement>(null);
  const [over, setOver] = useState(false);
  const f = chosenFit({ fit, chosen });
  const option = useMemo(() => (fit ? fitOption(fit, chosen, pal) : null), [fit, chosen, pal]);
  const residuals = useMemo(() => (fit && f ? residualOption(fit, f, pal) : null), [fit, f, pal]);
  return (
    <div
      className={`lw-view lw-commission${over ? ' lw-drop-over' : ''}`}
      data-testid="fit-view"
      onDragOver={(e) => {
        if (!e.dataTransfer.types.includes('Files')) return;
        e.preventDefault();
        e.stopPropagation();
        setOver(true);
      }}
      onDragLeave={() => setOver(false)}
      onDrop={(e) => {
        const file = e.dataTransfer.files?.[0];
        setOver(false);
        if (!file) return;
        e.preventDefault();
        e.stopPropagation();
        void openTestLogFile(file);
      }}
    >
      <div className="lw-view-tools">
        <button type="button" onClick={() => input.current?.click()} title="Open a logged plant test (CSV: time, input, output)">
          Open test log…
        </button>
        <input
          ref={input}
          type="file"
          hidden
          accept=".csv,.tsv,.txt,text/csv,text/plain"
          aria-label="Test log file"
          data-testid="test-log-input"
          onChange={(e) => {
            const file = e.target.files?.[0];
            e.target.value = '';
            if (file) void openTestLogFile(file);
          }}
        />
        <select aria-label="Sample test log" value="" onChange={(e) => e.target.value && void openSampleLog(e.target.value)}>
          <option value="">Sample test log…</option>
          {demoTestLogs.map((d) => (
            <option key={d.id} value={d.id}>
              {d.title}
            </option>
          ))}
        </select>
        {log && (
          <span className="lw-muted" data-testid="test-log-name">
            {log.fileName}
            {fit ? ` · ${fit.log.samples} samples` : ''}
          </span>
        )}
        <ColumnPicker />
        {fitting && <span className="lw-tag">fitting…</span>}
      </div>
      <p className="lw-caution" role="note">
        {FIT_CAUTION}
      </p>
      {!log && (
        <div className="lw-dropzone">
          Drop a test log here (CSV with time, input and output columns, a header row, comma or semicolon, decimal point or comma), open
          one, or pick the sample. Three models are fitted to the input actually recorded: first order plus dead time, second order plus
          dead time, integrating plus dead time.
        </div>
      )}
      {fitError && (
        <div className="lw-error" role="alert" data-testid="fit-error">
          {fitError}
        </div>
      )}
      {fit && <ModelsTable />}
      {fit && <BlockActions />}
      {option && (
        <div className="lw-grid-2">
          <ChartFrame name="fit" title="Fitted response" background={pal.background} option={option} />
          {residuals && <ChartFrame name="residuals" title="Residuals" background={pal.background} option={residuals} />}
        </div>
      )}
    </div>
  );
}
