/**
 * The Loops view: every cut with its crossover, margins, Ms and stability; the inner/outer
 * separation ratios with the rule-of-thumb flag; the outer loop with the real inner loop
 * against an ideal one. Cells carry their raw values (data-value) for tests and copy-paste.
 */
import { useMemo } from 'react';
import { useResultsStore } from '../analysis/results-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import { fmt } from '../analysis/sweep.ts';
import { ChartFrame } from './ChartFrame.tsx';
import type { Palette } from './palette.ts';
import type { LoopsData, OuterIdealData } from '@loopwright/study';
import { LOOP_COLUMNS } from './loop-columns.ts';
import { SampledLoopsTable } from './SampledLoopPanel.tsx';
import type { ChartOption } from './echarts-setup.ts';

/** A missing gain or delay margin means "unlimited"; other missing values are just absent. */
const cellText = (v: number | null, field: string) => (v === null && (field === 'gainMarginDb' || field === 'delayMargin') ? '∞' : fmt(v));

export function LoopsTable({ loops, pinned, names }: { loops: LoopsData; pinned: LoopsData | null; names?: Record<string, string> }) {
  const label = (cut: string) => names?.[cut] ?? loops.rows.find((r) => r.cutId === cut)?.label ?? cut;
  return (
    <>
      <table className="lw-table" data-testid="loops-table">
        <thead>
          <tr>
            <th>loop (cut)</th>
            {LOOP_COLUMNS.map((c) => (
              <th key={c.field} title={c.title}>
                {c.label}
              </th>
            ))}
            <th>closed loop</th>
          </tr>
        </thead>
        <tbody>
          {loops.rows.map((r) => {
            const p = pinned?.rows.find((x) => x.cutId === r.cutId);
            const inner = r.alone;
            return [
              <tr key={r.cutId} data-cut={r.cutId} data-wire={r.wire}>
                <td className="lw-nowrap" title={`wire ${r.wire}; loop through ${r.blocks.join(', ')}`}>
                  {r.label}
                  {r.auto && <span className="lw-muted"> (proposed)</span>}
                </td>
                {LOOP_COLUMNS.map((c) => {
                  const v = r.margins[c.field] as number | null;
                  const pv = p ? (p.margins[c.field] as number | null) : undefined;
                  return (
                    <td key={c.field} data-field={c.field} data-value={v === null ? 'null' : String(v)}>
                      {cellText(v, c.field)}
                      {pv !== undefined && pv !== v && <span className="lw-pinned-val"> ({fmt(pv)})</span>}
                    </td>
                  );
                })}
                <td data-field="closedLoopStable" data-value={String(r.margins.closedLoopStable)} className={r.margins.closedLoopStable ? 'lw-ok' : 'lw-bad'}>
                  {r.margins.closedLoopStable ? 'stable' : 'UNSTABLE'}
                </td>
              </tr>,
              inner && (
                <tr key={`${r.cutId}:alone`} data-cut-alone={r.cutId} className="lw-muted">
                  <td className="lw-nowrap" title={`opened: ${inner.opened.join(', ')}`}>
                    ↳ tuned inner-first
                  </td>
                  {LOOP_COLUMNS.map((c) => {
                    const v = inner.margins[c.field] as number | null;
                    return (
                      <td key={c.field} data-field={c.field} data-value={v === null ? 'null' : String(v)}>
                        {cellText(v, c.field)}
                      </td>
                    );
                  })}
                  <td data-field="closedLoopStable" data-value={String(inner.margins.closedLoopStable)} className={inner.margins.closedLoopStable ? 'lw-ok' : 'lw-bad'}>
                    {inner.margins.closedLoopStable ? 'stable' : 'UNSTABLE'}
                  </td>
                </tr>
              ),
            ];
          })}
        </tbody>
      </table>
      {loops.separations.length > 0 && (
        <table className="lw-table" data-testid="separation-table">
          <thead>
            <tr>
              <th>inner loop</th>
              <th>outer loop</th>
              <th>separation ratio</th>
              <th>basis</th>
              <th>rule of thumb 3–10×</th>
            </tr>
          </thead>
          <tbody>
            {loops.separations.map((s) => (
              <tr key={`${s.inner}>${s.outer}`}>
                <td>{label(s.inner)}</td>
                <td>{label(s.outer)}</td>
                <td data-value={String(s.ratio)}>{s.ratio === null ? '—' : `${fmt(s.ratio, 3)}×`}</td>
                <td>{s.basis}</td>
                <td className={s.flag ? 'lw-bad' : 'lw-ok'} title={s.note}>
                  {s.flag ? '⚠ ' : '✓ '}
                  {s.note}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </>
  );
}

function idealOption(o: OuterIdealData, label: (c: string) => string, pal: Palette): ChartOption {
  const zip = (y: number[]) => o.omega.map((w, i) => [w, y[i]]);
  const line = (name: string, data: number[][], color: string, type: string, yAxisIndex: number, xAxisIndex: number) => ({
    type: 'line',
    name,
    showSymbol: false,
    animation: false,
    xAxisIndex,
    yAxisIndex,
    lineStyle: { color, width: 2, type },
    itemStyle: { color },
    data,
  });
  const axisBase = { axisLine: { onZero: false, lineStyle: { color: pal.axis } }, axisLabel: { color: pal.muted, formatter: (v: number) => fmt(v, 3) }, splitLine: { lineStyle: { color: pal.grid } } };
  return {
    animation: false,
    backgroundColor: pal.background,
    title: { text: `Outer loop ${label(o.outer)}: real vs ideal inner loop ${label(o.inner)}`, left: 8, top: 4, textStyle: { color: pal.text, fontSize: 12, fontWeight: 'normal' } },
    legend: { top: 22, right: 10, textStyle: { color: pal.muted } },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v) },
    grid: [
      { left: 62, right: 20, top: 48, height: '32%' },
      { left: 62, right: 20, top: '62%', bottom: 36 },
    ],
    xAxis: [
      { type: 'log', gridIndex: 0, min: o.omega[0], max: o.omega[o.omega.length - 1], ...axisBase },
      { type: 'log', gridIndex: 1, min: o.omega[0], max: o.omega[o.omega.length - 1], name: 'ω [rad/s]', nameLocation: 'middle', nameGap: 22, nameTextStyle: { color: pal.muted }, ...axisBase },
    ],
    yAxis: [
      { type: 'value', gridIndex: 0, scale: true, name: '|L| dB', nameTextStyle: { color: pal.muted }, ...axisBase },
      { type: 'value', gridIndex: 1, scale: true, name: '∠L °', nameTextStyle: { color: pal.muted }, ...axisBase },
    ],
    series: [
      line('real inner loop', zip(o.realMagDb), pal.series[0], 'solid', 0, 0),
      line('ideal inner loop', zip(o.idealMagDb), pal.series[1], 'dashed', 0, 0),
      line('real inner loop ∠', zip(o.realPhaseDeg), pal.series[0], 'solid', 1, 1),
      line('ideal inner loop ∠', zip(o.idealPhaseDeg), pal.series[1], 'dashed', 1, 1),
    ],
  };
}

export function LoopsView({ pal }: { pal: Palette }) {
  const result = useResultsStore((s) => s.loops);
  const sampled = useResultsStore((s) => s.sampledLoops) ?? [];
  const pinned = useAnalysisStore((s) => s.pinned);
  const loops = result?.ok ? result.value : null;
  const label = (c: string) => loops?.rows.find((r) => r.cutId === c)?.label ?? c;
  const o = loops?.outerVsIdeal[0] ?? null;
  const option = useMemo(() => (o && loops ? idealOption(o, label, pal) : null), [o, loops, pal]); // eslint-disable-line react-hooks/exhaustive-deps
  if (!loops) return <div className="lw-empty">{result && !result.ok ? `Loops: ${result.error}` : 'Computing…'}</div>;
  return (
    <div className="lw-view lw-loops">
      <div className="lw-view-tools">
        <span className={loops.stable ? 'lw-ok' : 'lw-bad'}>{loops.stable ? 'whole diagram stable (closed-loop poles)' : 'whole diagram UNSTABLE (closed-loop poles)'}</span>
        {pinned?.loops && <span className="lw-muted">(pinned values in brackets)</span>}
      </div>
      {loops.notes.map((n) => (
        <div key={n} className="lw-note">
          {n}
        </div>
      ))}
      <LoopsTable loops={loops} pinned={pinned?.loops ?? null} />
      {sampled.length > 0 && <SampledLoopsTable rows={sampled} />}
      {loops.outerVsIdeal.map((x) => (
        <table key={`${x.outer}<${x.inner}`} className="lw-table lw-compact" data-testid="outer-ideal-table">
          <thead>
            <tr>
              <th>outer loop {label(x.outer)}</th>
              <th>crossover [rad/s]</th>
              <th>phase margin [°]</th>
              <th>gain margin [dB]</th>
              <th>Ms</th>
            </tr>
          </thead>
          <tbody>
            {(
              [
                ['with the real inner loop ' + label(x.inner), x.realMargins],
                ['with an ideal inner loop', x.idealMargins],
              ] as const
            ).map(([name, m]) => (
              <tr key={name}>
                <td>{name}</td>
                <td>{fmt(m?.gainCrossover)}</td>
                <td>{fmt(m?.phaseMarginDeg)}</td>
                <td>{m?.gainMarginDb === null ? '∞' : fmt(m?.gainMarginDb)}</td>
                <td>{fmt(m?.peakSensitivity)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      ))}
      {option && (
        <div className="lw-grid-1 lw-short">
          <ChartFrame name="outer-ideal" title="Outer loop: real vs ideal inner loop" background={pal.background} option={option} />
        </div>
      )}
    </div>
  );
}
