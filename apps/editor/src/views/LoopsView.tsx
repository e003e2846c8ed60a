/**
 * The Loops view: every loop by its one name, read with every other loop closed and (when
 * loops enclose it) inner-first, each reading with its crossover, margins, Ms, the open-loop
 * RHP poles of its L and stability, the reading to act on marked and why; the inner/outer
 * separation ratios with the rule-of-thumb flag; and for every nested pair the outer loop with
 * the real against an ideal inner loop, one configuration for both. Cells carry their raw
 * values (data-value) for tests and copy-paste.
 */
import { useMemo } from 'react';
import { useResultsStore } from '../analysis/results-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import { fmt } from '../analysis/sweep.ts';
import { ChartFrame } from './ChartFrame.tsx';
import type { Palette } from './palette.ts';
import { useStale } from './BusyBar.tsx';
import type { LoopsData, MarginsData, OuterIdealData } from '@loopwright/study';
import { LOOP_COLUMNS } from './loop-columns.ts';
import { SampledLoopsTable } from './SampledLoopPanel.tsx';
import type { ChartOption } from './echarts-setup.ts';

/** Columns before the RHP pole count: crossover, PM and GM (LOOP_COLUMNS order). */
const FIRST_COLUMNS = 3;

/** A missing gain or delay margin means "unlimited"; other missing values are just absent. */
const cellText = (v: number | null, field: string) => (v === null && (field === 'gainMarginDb' || field === 'delayMargin') ? '∞' : fmt(v));

/** One reading of a loop as a table row: its margins, the open-loop RHP poles of that L, the closed loop. */
function ReadingCells({ margins, rhp, pinned }: { margins: MarginsData; rhp: number; pinned?: MarginsData }) {
  const cell = (c: (typeof LOOP_COLUMNS)[number]) => {
    const v = margins[c.field] as number | null;
    const pv = pinned ? (pinned[c.field] as number | null) : undefined;
    const negativePm = c.field === 'phaseMarginDeg' && v !== null && v < 0;
    return (
      <td key={c.field} data-field={c.field} data-value={v === null ? 'null' : String(v)} className={negativePm ? 'lw-warnval' : undefined}>
        {cellText(v, c.field)}
        {pv !== undefined && pv !== v && <span className="lw-pinned-val"> ({fmt(pv)})</span>}
      </td>
    );
  };
  // The margins first, then the RHP pole count that explains a negative PM, then the rest.
  return (
    <>
      {LOOP_COLUMNS.slice(0, FIRST_COLUMNS).map(cell)}
      <td
        data-field="openLoopRhpPoles"
        data-value={String(rhp)}
        className={rhp > 0 ? 'lw-warnval' : undefined}
        title={
          rhp > 0
            ? `L has ${rhp} open-loop pole(s) in the right half-plane: a stable closed loop encircles −1 that many times counter-clockwise`
            : 'L has no open-loop pole in the right half-plane'
        }
      >
        {rhp}
      </td>
      {LOOP_COLUMNS.slice(FIRST_COLUMNS).map(cell)}
      <td
        data-field="closedLoopStable"
        data-value={String(margins.closedLoopStable)}
        className={margins.closedLoopStable ? 'lw-ok' : 'lw-bad'}
      >
        {margins.closedLoopStable ? 'stable' : 'UNSTABLE'}
      </td>
    </>
  );
}

/**
 * Every loop read with every other loop closed and, when loops enclose it, inner-first beside
 * it, each reading with the open-loop RHP poles of its L; the reading to act on marked and the
 * reason said under the table (so a negative PM with a stable closed loop explains itself).
 */
export function LoopsTable({ loops, pinned }: { loops: LoopsData; pinned: LoopsData | null }) {
  const name = (cut: string) => loops.names[cut] ?? cut;
  return (
    <>
      <table className="lw-table" data-testid="loops-table">
        <thead>
          <tr>
            <th>loop (cut)</th>
            <th>reading</th>
            {LOOP_COLUMNS.slice(0, FIRST_COLUMNS).map((c) => (
              <th key={c.field} title={c.title}>
                {c.label}
              </th>
            ))}
            <th title="open-loop poles of L in the right half-plane (Nyquist: that many counter-clockwise encirclements of −1 for a stable closed loop)">
              RHP poles of L
            </th>
            {LOOP_COLUMNS.slice(FIRST_COLUMNS).map((c) => (
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
            const act = (on: boolean) =>
              on ? (
                <span className="lw-act" title="the reading to act on (see below why)">
                  {' '}
                  ◀ act on this
                </span>
              ) : null;
            return [
              <tr key={r.cutId} data-cut={r.cutId} data-wire={r.wire} data-act={r.advice.actOn === 'all-closed' ? 'true' : 'false'}>
                <td className="lw-nowrap" title={`cut ${r.cutId} on wire ${r.wire}; loop through ${r.blocks.join(', ')}`}>
                  {r.label}
                  {r.auto && <span className="lw-muted"> (proposed)</span>}
                </td>
                <td className="lw-nowrap" title="L at this cut with every other loop closed (how the loop runs)">
                  others closed{act(r.advice.actOn === 'all-closed')}
                </td>
                <ReadingCells margins={r.margins} rhp={r.openLoopRhpPoles} pinned={p?.margins} />
              </tr>,
              inner && (
                <tr key={`${r.cutId}:alone`} data-cut-alone={r.cutId} data-act={r.advice.actOn === 'inner-first' ? 'true' : 'false'}>
                  <td className="lw-nowrap lw-muted">↳ {r.label}</td>
                  <td
                    className="lw-nowrap"
                    title={`inner-first: ${inner.opened.map(name).join(', ')} opened (how a cascade is tuned and commissioned)`}
                  >
                    inner-first{act(r.advice.actOn === 'inner-first')}
                  </td>
                  <ReadingCells margins={inner.margins} rhp={inner.openLoopRhpPoles} pinned={p?.alone?.margins} />
                </tr>
              ),
            ];
          })}
        </tbody>
      </table>
      <ul className="lw-advice" data-testid="loops-advice">
        {loops.rows.map((r) => (
          <li key={r.cutId} data-cut={r.cutId}>
            <b>{r.label}</b>: {r.advice.text}
          </li>
        ))}
      </ul>
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
                <td>{name(s.inner)}</td>
                <td>{name(s.outer)}</td>
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
  const axisBase = {
    axisLine: { onZero: false, lineStyle: { color: pal.axis } },
    axisLabel: { color: pal.muted, formatter: (v: number) => fmt(v, 3) },
    splitLine: { lineStyle: { color: pal.grid } },
  };
  return {
    animation: false,
    backgroundColor: pal.background,
    title: {
      text: `Outer loop ${label(o.outer)}: real vs ideal inner loop ${label(o.inner)}`,
      left: 8,
      top: 4,
      textStyle: { color: pal.text, fontSize: 12, fontWeight: 'normal' },
    },
    legend: { top: 22, right: 10, textStyle: { color: pal.muted } },
    tooltip: { trigger: 'axis', valueFormatter: (v: number) => fmt(v) },
    grid: [
      { left: 62, right: 20, top: 48, height: '32%' },
      { left: 62, right: 20, top: '62%', bottom: 36 },
    ],
    xAxis: [
      { type: 'log', gridIndex: 0, min: o.omega[0], max: o.omega[o.omega.length - 1], ...axisBase },
      {
        type: 'log',
        gridIndex: 1,
        min: o.omega[0],
        max: o.omega[o.omega.length - 1],
        name: 'ω [rad/s]',
        nameLocation: 'middle',
        nameGap: 22,
        nameTextStyle: { color: pal.muted },
        ...axisBase,
      },
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

/** One nested pair: both margin rows and both curves in one configuration, said in words. */
function OuterIdealPair({ o, loops, pal, index }: { o: OuterIdealData; loops: LoopsData; pal: Palette; index: number }) {
  const name = (c: string) => loops.names[c] ?? c;
  const option = useMemo(() => idealOption(o, name, pal), [o, loops, pal]); // eslint-disable-line react-hooks/exhaustive-deps
  const opened = o.opened.map(name).join(', ');
  return (
    <div className="lw-pair" data-testid="outer-ideal" data-outer={o.outer} data-inner={o.inner}>
      <div className="lw-note">
        {name(o.outer)} with the real against an ideal {name(o.inner)} — both rows and both curves with{' '}
        {opened ? `${opened} opened` : 'every other loop as drawn'}.
      </div>
      <table className="lw-table lw-compact" data-testid="outer-ideal-table">
        <thead>
          <tr>
            <th>outer loop {name(o.outer)}</th>
            <th>crossover [rad/s]</th>
            <th>phase margin [°]</th>
            <th>gain margin [dB]</th>
            <th>Ms</th>
          </tr>
        </thead>
        <tbody>
          {(
            [
              [`with the real ${name(o.inner)}`, o.realMargins],
              [`with an ideal ${name(o.inner)}`, o.idealMargins],
            ] as const
          ).map(([label, m]) => (
            <tr key={label}>
              <td>{label}</td>
              <td>{fmt(m.gainCrossover)}</td>
              <td>{fmt(m.phaseMarginDeg)}</td>
              <td>{m.gainMarginDb === null ? '∞' : fmt(m.gainMarginDb)}</td>
              <td>{fmt(m.peakSensitivity)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <div className="lw-grid-1 lw-short">
        <ChartFrame
          name={index === 0 ? 'outer-ideal' : `outer-ideal-${index + 1}`}
          title={`${name(o.outer)}: real vs ideal ${name(o.inner)}`}
          background={pal.background}
          option={option}
        />
      </div>
    </div>
  );
}

export function LoopsView({ pal }: { pal: Palette }) {
  const result = useResultsStore((s) => s.loops);
  const sampled = useResultsStore((s) => s.sampledLoops) ?? [];
  const pinned = useAnalysisStore((s) => s.pinned);
  const loops = result?.ok ? result.value : null;
  const stale = useStale('loops');
  if (!loops) return <div className="lw-empty">{result && !result.ok ? `Loops: ${result.error}` : 'Computing…'}</div>;
  return (
    <div className={`lw-view lw-loops${stale ? ' lw-stale' : ''}`} data-stale={stale}>
      <div className="lw-view-tools">
        <span className={loops.stable ? 'lw-ok' : 'lw-bad'}>
          {loops.stable ? 'whole diagram stable (closed-loop poles)' : 'whole diagram UNSTABLE (closed-loop poles)'}
        </span>
        {pinned?.loops && <span className="lw-muted">(pinned values in brackets)</span>}
      </div>
      {loops.notes.map((n) => (
        <div key={n} className="lw-note">
          {n}
        </div>
      ))}
      <LoopsTable loops={loops} pinned={pinned?.loops ?? null} />
      {sampled.length > 0 && <SampledLoopsTable rows={sampled} />}
      {loops.outerVsIdeal.map((x, i) => (
        <OuterIdealPair key={`${x.outer}<${x.inner}`} o={x} loops={loops} pal={pal} index={i} />
      ))}
    </div>
  );
}
