/**
 * The Tune view: a loop of the diagram (its cut), a rule and its options; the suggestion with
 * its predicted GM, PM, DM and Ms beside today's, the set-point and load step responses of
 * both, and Apply (one undo step). The cascade workflow tunes every loop inner-first; the
 * damping target sets the swept value for a chosen ζ. The commissioning caution stands beside
 * every suggestion.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import { TUNE_CAUTION, TUNE_RULES, engineText, type MarginsData, type TuneData } from '@loopwright/study';
import './commission.css';
import { useDiagramStore } from '../store/diagram-store.ts';
import { currentInputs } from '../analysis/driver.ts';
import { fmt } from '../analysis/sweep.ts';
import { ChartFrame } from '../views/ChartFrame.tsx';
import type { Palette } from '../views/palette.ts';
import { stepOption } from './commission-charts.ts';
import {
  applyCascade,
  applyDamping,
  applyTune,
  runCascade,
  runDamping,
  runTune,
  setTuneOptions,
  setZeta,
  useCommissionStore,
  type RuleId,
} from './commission-store.ts';

const RULE_LABEL: Record<RuleId, string> = {
  simc: 'SIMC',
  lambda: 'lambda (IMC)',
  amigo: 'AMIGO',
  'zn-step': 'Ziegler–Nichols step',
  'zn-ultimate': 'Ziegler–Nichols ultimate gain',
  ms: 'largest ki with Ms ≤ bound',
};

function NumberOption({
  label,
  value,
  onChange,
  title,
}: {
  label: string;
  value: number | null;
  onChange(v: number | null): void;
  title: string;
}) {
  return (
    <label className="lw-field" title={title}>
      <span>{label}</span>
      <input
        className="lw-num"
        aria-label={label}
        key={String(value)}
        defaultValue={value === null ? '' : String(value)}
        placeholder="default"
        onBlur={(e) => {
          const t = e.target.value.trim();
          const v = Number(t);
          if (t === '') onChange(null);
          else if (Number.isFinite(v) && v > 0) onChange(v);
          else e.target.value = value === null ? '' : String(value);
        }}
        onKeyDown={(e) => e.key === 'Enter' && (e.target as HTMLInputElement).blur()}
      />
    </label>
  );
}

const setting = (c: { kp: number; ti: number | null; td: number }) => [fmt(c.kp), c.ti === null ? 'none' : fmt(c.ti), fmt(c.td)];
const figures = (m: MarginsData) => [
  m.gainMargin === null ? '∞' : fmt(m.gainMargin),
  fmt(m.phaseMarginDeg),
  m.delayMargin === null ? '∞' : fmt(m.delayMargin),
  fmt(m.peakSensitivity),
  fmt(m.gainCrossover),
];

function SummaryTable({ t }: { t: TuneData }) {
  const rows: { name: string; c: TuneData['controller']; m: MarginsData | null }[] = [];
  if (t.block) rows.push({ name: 'today', c: t.block.current, m: t.current });
  rows.push({ name: 'suggested', c: t.controller, m: t.predicted });
  return (
    <table className="lw-table" data-testid="tune-table">
      <thead>
        <tr>
          <th />
          <th>kp</th>
          <th>ti [s]</th>
          <th>td [s]</th>
          <th title="gain margin">GM</th>
          <th title="phase margin">PM [°]</th>
          <th title="delay margin">DM [s]</th>
          <th title="peak sensitivity">Ms</th>
          <th>crossover [rad/s]</th>
          <th>closed loop</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((r) => (
          <tr key={r.name} data-row={r.name} className={r.name === 'suggested' ? 'lw-changed' : undefined}>
            <td>{r.name}</td>
            {setting(r.c).map((x, i) => (
              <td key={`c${i}`}>{x}</td>
            ))}
            {r.m ? (
              figures(r.m).map((x, i) => <td key={`m${i}`}>{x}</td>)
            ) : (
              <td colSpan={5} className="lw-muted">
                no loop today
              </td>
            )}
            <td className={r.m?.closedLoopStable === false ? 'lw-bad' : 'lw-ok'}>
              {r.m ? (r.m.closedLoopStable ? 'stable' : 'UNSTABLE') : '—'}
            </td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function CascadePanel() {
  const c = useCommissionStore((s) => s.cascade);
  const error = useCommissionStore((s) => s.cascadeError);
  const box = useRef<HTMLDivElement>(null);
  // A result below the fold is brought into view when it arrives.
  useEffect(() => {
    // Only the view's own scroll box moves (scrollIntoView would scroll the page layout too).
    const el = box.current;
    const view = el?.closest('.lw-view-body');
    if (el && view) view.scrollTop = el.offsetTop - (view as HTMLElement).offsetTop;
  }, [c]);
  if (error) return <div className="lw-error">Cascade: {error}</div>;
  if (!c) return null;
  // Separation rows name loops by cut id; the steps carry each cut's label.
  const loopName = (cut: string) => c.steps.find((s) => s.cut === cut)?.label ?? cut;
  return (
    <div className="lw-cascade" data-testid="cascade-result" ref={box}>
      <div className="lw-view-tools">
        <strong>Cascade, innermost first ({RULE_LABEL[c.rule]})</strong>
        <span className="lw-spacer" />
        <button type="button" data-testid="apply-cascade" disabled={c.apply.length === 0} onClick={() => applyCascade()}>
          Apply all ({c.apply.length})
        </button>
      </div>
      <table className="lw-table">
        <thead>
          <tr>
            <th>loop</th>
            <th>block</th>
            <th>kp</th>
            <th>ti [s]</th>
            <th>td [s]</th>
            <th>GM</th>
            <th>PM [°]</th>
            <th>DM [s]</th>
            <th>Ms</th>
            <th>crossover [rad/s]</th>
          </tr>
        </thead>
        <tbody>
          {c.steps.map((s) => (
            <tr key={s.cut} data-cut={s.cut}>
              <td>{s.label}</td>
              {s.result.ok ? (
                <>
                  <td>{s.result.value.block?.id}</td>
                  {setting(s.result.value.controller).map((x, i) => (
                    <td key={`c${i}`}>{x}</td>
                  ))}
                  {figures(s.result.value.predicted).map((x, i) => (
                    <td key={`m${i}`}>{x}</td>
                  ))}
                </>
              ) : (
                <td colSpan={9} className="lw-bad">
                  not tuned: {s.result.error}
                </td>
              )}
            </tr>
          ))}
        </tbody>
      </table>
      {c.separations.map((s) => (
        <p key={`${s.inner}-${s.outer}`} className={s.flag ? 'lw-note lw-bad' : 'lw-note'}>
          separation of {loopName(s.inner)} inside {loopName(s.outer)}: {s.ratio === null ? '—' : `${fmt(s.ratio, 3)}×`}{' '}
          {s.flag ? '(below 3: the loops interact)' : ''}
        </p>
      ))}
      {c.notes.map((n, i) => (
        <p key={i} className="lw-note">
          {n}
        </p>
      ))}
    </div>
  );
}

function DampingPanel() {
  const zeta = useCommissionStore((s) => s.zeta);
  const damping = useCommissionStore((s) => s.damping);
  const error = useCommissionStore((s) => s.dampingError);
  const sweep = currentInputs().sweep.choice;
  if (!sweep) return null;
  return (
    <div className="lw-view-tools" data-testid="damping">
      <span>Gain for damping</span>
      <label className="lw-field">
        <span>ζ</span>
        <input
          className="lw-num"
          aria-label="Target damping"
          key={String(zeta)}
          defaultValue={String(zeta)}
          onBlur={(e) => {
            const v = Number(e.target.value);
            if (Number.isFinite(v) && v >= 0 && v < 1) setZeta(v);
            else e.target.value = String(zeta);
          }}
          onKeyDown={(e) => e.key === 'Enter' && (e.target as HTMLInputElement).blur()}
        />
      </label>
      <span className="lw-muted">on the locus of {sweep.label}</span>
      <button type="button" onClick={() => void runDamping(sweep.target)}>
        Find
      </button>
      {damping && (
        <>
          <span data-testid="damping-value">
            {damping.value === null
              ? damping.notes.join('; ')
              : `${sweep.label} = ${fmt(damping.value)} (now ${fmt(damping.current)}), poles ${fmt(damping.pole!.re)} ± ${fmt(damping.pole!.im)}j`}
          </span>
          {damping.value !== null && (
            <button type="button" onClick={() => applyDamping(sweep.target)}>
              Set {fmt(damping.value)}
            </button>
          )}
          {damping.value !== null && damping.notes.length > 0 && <span className="lw-muted lw-small">{damping.notes.join('; ')}</span>}
        </>
      )}
      {error && <span className="lw-bad">{error}</span>}
    </div>
  );
}

export function TuneView({ pal }: { pal: Palette }) {
  const diagram = useDiagramStore((s) => s.diagram);
  const o = useCommissionStore((s) => s.options);
  const t = useCommissionStore((s) => s.tune);
  const error = useCommissionStore((s) => s.tuneError);
  const tuning = useCommissionStore((s) => s.tuning);
  const [cascadeBusy, setCascadeBusy] = useState(false);
  const engine = useMemo(() => engineText(diagram), [diagram]);
  // A new suggestion whenever the loop, the rule or the diagram changes (shortly after the last change).
  useEffect(() => {
    const id = setTimeout(() => void runTune(), 200);
    return () => clearTimeout(id);
  }, [o, engine]);
  const cut = o.cut ?? diagram.view.activeCut ?? diagram.cuts[0]?.id ?? '';
  const sp = useMemo(() => (t?.responses ? stepOption(t.responses, 'setpoint', pal, 'set-point response') : null), [t, pal]);
  const ld = useMemo(() => (t?.responses ? stepOption(t.responses, 'load', pal, 'load response') : null), [t, pal]);
  const unstable = t ? !t.predicted.closedLoopStable : false;
  return (
    <div className="lw-view lw-commission" data-testid="tune-view">
      <div className="lw-view-tools">
        <label className="lw-field">
          <span>loop</span>
          <select aria-label="Loop to tune" value={cut} onChange={(e) => setTuneOptions({ cut: e.target.value })}>
            {diagram.cuts.length === 0 && <option value="">the loop found on a feedback wire</option>}
            {diagram.cuts.map((c) => (
              <option key={c.id} value={c.id}>
                {c.label ?? c.id}
              </option>
            ))}
          </select>
        </label>
        <label className="lw-field">
          <span>rule</span>
          <select aria-label="Tuning rule" value={o.rule} onChange={(e) => setTuneOptions({ rule: e.target.value as RuleId })}>
            {TUNE_RULES.map((r) => (
              <option key={r} value={r}>
                {RULE_LABEL[r]}
              </option>
            ))}
          </select>
        </label>
        <label className="lw-field">
          <span>controller</span>
          <select
            aria-label="Controller"
            value={o.controller}
            onChange={(e) => setTuneOptions({ controller: e.target.value as 'p' | 'pi' | 'pid' })}
          >
            <option value="pi">PI</option>
            <option value="pid">PID</option>
            {(o.rule === 'zn-step' || o.rule === 'zn-ultimate') && <option value="p">P</option>}
          </select>
        </label>
        {o.rule === 'simc' && (
          <NumberOption
            label="τc [s]"
            value={o.tauC}
            onChange={(v) => setTuneOptions({ tauC: v })}
            title="SIMC closed-loop time constant (default: the dead time θ)"
          />
        )}
        {o.rule === 'lambda' && (
          <NumberOption
            label="λ [s]"
            value={o.lambda}
            onChange={(v) => setTuneOptions({ lambda: v })}
            title="Closed-loop time constant λ (default: the largest lag, 3θ for an integrating process)"
          />
        )}
        {o.rule === 'ms' && (
          <NumberOption
            label="Ms ≤"
            value={o.msMax}
            onChange={(v) => setTuneOptions({ msMax: v })}
            title="Bound on the peak sensitivity (default 1.4)"
          />
        )}
        <label
          className="lw-field"
          title="inner-first: the loops around this one opened, as a cascade is commissioned; closed: every other loop closed"
        >
          <span>read</span>
          <select
            aria-label="Reading"
            value={o.reading}
            onChange={(e) => setTuneOptions({ reading: e.target.value as 'inner-first' | 'closed' })}
          >
            <option value="inner-first">inner-first</option>
            <option value="closed">others closed</option>
          </select>
        </label>
        {tuning && <span className="lw-tag">tuning…</span>}
        <span className="lw-spacer" />
        <button
          type="button"
          data-testid="apply-tune"
          disabled={!t?.apply || unstable || tuning}
          title={
            unstable ? 'The suggested setting gives an unstable loop' : 'Write the suggestion into the controller block (one undo step)'
          }
          onClick={() => applyTune()}
        >
          Apply{t?.apply ? ` to ${t.apply.block}` : ''}
        </button>
        <button
          type="button"
          data-testid="tune-cascade"
          disabled={cascadeBusy}
          title="Tune every loop inner-first, innermost first, each with the tuned inner loops closed; then check the separation"
          onClick={async () => {
            setCascadeBusy(true);
            try {
              await runCascade();
            } finally {
              setCascadeBusy(false);
            }
          }}
        >
          Tune the cascade
        </button>
      </div>
      <p className="lw-caution" role="note">
        {TUNE_CAUTION}
      </p>
      {error && (
        <div className="lw-error" role="alert" data-testid="tune-error">
          {error}
        </div>
      )}
      {t && (
        <>
          <p className="lw-note" data-testid="tune-loop">
            {t.cut ? `${t.cut.label}: ` : ''}
            {t.block ? `controller ${t.block.label}` : ''}
            {t.model
              ? ` · model ${t.model.kind.toUpperCase()} K = ${fmt(t.model.gain)}, τ = ${t.model.timeConstants.map((x) => fmt(x)).join(', ') || '—'} s, θ = ${fmt(t.model.deadTime)} s (${t.modelFrom})`
              : ''}
            {t.ultimate ? ` · Ku = ${fmt(t.ultimate.ku)}, Pu = ${fmt(t.ultimate.pu)} s (${t.ultimate.from})` : ''}
          </p>
          <SummaryTable t={t} />
          {t.notes.map((n, i) => (
            <p key={i} className={/UNSTABLE/.test(n) ? 'lw-note lw-bad' : 'lw-note'}>
              {n}
            </p>
          ))}
          {sp && ld && (
            <div className="lw-grid-2">
              <ChartFrame name="tune-setpoint" title="Set-point step" background={pal.background} option={sp} />
              <ChartFrame name="tune-load" title="Load step at the process input" background={pal.background} option={ld} />
            </div>
          )}
        </>
      )}
      <CascadePanel />
      <DampingPanel />
    </div>
  );
}
