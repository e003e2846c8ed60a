/**
 * The sampled reading of the loop at the cut (Frequency view), for a loop that holds a sampled
 * controller: margins from the exact pulse transfer function beside the continuous estimate
 * (labelled as one) and the continuous design, the sample-rate warning, what is exact and what
 * approximated, and the z-plane locus of the loop gain with the unit circle and ζ/ωn guides.
 */
import { formatEngineering } from '@loopwright/lti';
import type { SampledCutData } from '@loopwright/study';
import type { Palette } from './palette.ts';

const fmt = (v: number | null | undefined, digits = 4) =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : String(Number(v.toPrecision(digits)));
const gm = (m: { gainMargin: number | null; gainMarginDb: number | null } | null) =>
  m ? (m.gainMargin === null ? '∞' : `${fmt(m.gainMargin)} (${fmt(m.gainMarginDb, 3)} dB)`) : '—';

export function SampledLoopPanel({ data, pal }: { data: SampledCutData; pal: Palette }) {
  const m = data.margins;
  const e = data.estimate?.margins ?? null;
  const c = data.continuous;
  const cols: [string, typeof m | typeof e][] = [
    ['sampled (exact)', m],
    ['continuous estimate', e],
    ['continuous design', c],
  ];
  return (
    <section className="lw-sampled" aria-label="Sampled loop" data-testid="sampled-loop">
      <div className="lw-view-tools">
        <strong>Sampled loop</strong>
        <span className="lw-muted">
          {data.sampler
            ? `read at ${data.sampler}, T = ${formatEngineering(data.sampleTime)} s, computation delay ${fmt(data.computeDelay)} sample${data.computeDelay === 1 ? '' : 's'}`
            : 'no sampler on this loop alone: estimate only'}
        </span>
        {data.closedLoopStable !== null && (
          <span className={data.closedLoopStable ? 'lw-ok' : 'lw-bad'}>
            {data.closedLoopStable ? 'z-plane poles inside the unit circle' : 'sampled closed loop UNSTABLE'}
          </span>
        )}
        <span className="lw-tag">{data.exact ? 'exact' : 'partly approximated'}</span>
      </div>
      <div className="lw-sampled-body">
        <table className="lw-table lw-compact" data-testid="sampled-margins">
          <thead>
            <tr>
              <th />
              {cols.map(([h]) => (
                <th key={h} title={h === 'continuous estimate' ? (data.estimate?.label ?? '') : undefined}>
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            <tr>
              <th>gain margin</th>
              {cols.map(([h, x]) => (
                <td key={h}>{gm(x)}</td>
              ))}
            </tr>
            <tr>
              <th>phase margin</th>
              {cols.map(([h, x]) => (
                <td key={h}>{x ? `${fmt(x.phaseMarginDeg)}°` : '—'}</td>
              ))}
            </tr>
            <tr>
              <th>crossover (rad/s)</th>
              {cols.map(([h, x]) => (
                <td key={h}>{fmt(x?.gainCrossover)}</td>
              ))}
            </tr>
            <tr>
              <th>Ms</th>
              {cols.map(([h, x]) => (
                <td key={h}>{fmt(x?.peakSensitivity)}</td>
              ))}
            </tr>
            <tr>
              <th>delay margin (s)</th>
              {cols.map(([h, x]) => (
                <td key={h}>{fmt(x?.delayMargin)}</td>
              ))}
            </tr>
          </tbody>
        </table>
        {data.locus && <ZPlane data={data} pal={pal} />}
      </div>
      <ul className="lw-notes small">
        {data.warnings.map((w) => (
          <li key={w.code} className="lw-bad">
            {w.message} ({w.guideline})
          </li>
        ))}
        {data.notes.map((n) => (
          <li key={n} className="lw-muted">
            {n}
          </li>
        ))}
        <li className="lw-muted">{data.estimate?.label}</li>
      </ul>
    </section>
  );
}

/** The z-plane locus of 1 + k·G(z) = 0 (k scales the loop gain; k = 1 is the design) as an SVG. */
export function ZPlane({ data, pal }: { data: SampledCutData; pal: Palette }) {
  const L = data.locus!;
  const size = 240;
  const R = 1.25;
  const X = (re: number) => ((re + R) / (2 * R)) * size;
  const Y = (im: number) => ((R - im) / (2 * R)) * size;
  const path = (pts: { re: number; im: number }[]) =>
    pts
      .filter((p) => Math.abs(p.re) < 4 * R && Math.abs(p.im) < 4 * R)
      .map((p, i) => `${i ? 'L' : 'M'}${X(p.re).toFixed(1)},${Y(p.im).toFixed(1)}`)
      .join(' ');
  const guide = pal.guide;
  const crit = L.criticalGain;
  return (
    <figure className="lw-zplane" data-testid="z-plane-locus">
      <svg width={size} height={size} viewBox={`0 0 ${size} ${size}`} role="img" aria-label="z-plane locus with unit circle">
        <rect width={size} height={size} fill={pal.background} />
        {L.guides.damping.map((g) => (
          <path key={`z${g.zeta}`} d={path(g.points)} stroke={guide} fill="none" strokeWidth={0.6} />
        ))}
        {L.guides.naturalFrequency.map((g) => (
          <path key={`w${g.omegaN}`} d={path(g.points)} stroke={guide} fill="none" strokeWidth={0.6} strokeDasharray="2 2" />
        ))}
        <line x1={0} x2={size} y1={Y(0)} y2={Y(0)} stroke={guide} />
        <line y1={0} y2={size} x1={X(0)} x2={X(0)} stroke={guide} />
        <path d={path(L.guides.unitCircle)} stroke={pal.text} fill="none" strokeWidth={1.2} />
        {L.branches.map((b, i) => (
          <path key={i} d={path(b.re.map((re, j) => ({ re, im: b.im[j] })))} stroke={pal.series[0]} fill="none" strokeWidth={1.4} />
        ))}
        {L.poles.map((p, i) => (
          <text key={`p${i}`} x={X(p.re)} y={Y(p.im) + 4} textAnchor="middle" fontSize={11} fill={pal.pole}>
            ×
          </text>
        ))}
        {L.zeros.map((p, i) => (
          <circle key={`q${i}`} cx={X(p.re)} cy={Y(p.im)} r={3.5} fill="none" stroke={pal.zero} />
        ))}
        {L.design.map((p, i) => (
          <rect key={`d${i}`} x={X(p.re) - 3} y={Y(p.im) - 3} width={6} height={6} fill={pal.current} />
        ))}
        {L.crossings.map((c, i) => (
          <circle key={`c${i}`} cx={X(c.z.re)} cy={Y(c.z.im)} r={3} fill={pal.limit} />
        ))}
      </svg>
      <figcaption className="small">
        z-plane locus of the loop gain ×k (squares: the design, k = 1). Unit-circle crossings:{' '}
        {L.crossings.length ? L.crossings.map((c) => `k = ${fmt(c.gain)} at ωT = ${fmt(c.theta, 3)} rad`).join('; ') : 'none'}
        {crit !== null ? ` — stable up to k = ${fmt(crit)}` : ''}
      </figcaption>
    </figure>
  );
}

/** The Loops view's table of sampled readings: one row per cut whose loop holds a sampled controller. */
export function SampledLoopsTable({ rows }: { rows: SampledCutData[] }) {
  return (
    <table className="lw-table" data-testid="sampled-loops-table">
      <thead>
        <tr>
          <th>loop (cut)</th>
          <th>read at</th>
          <th>T (s)</th>
          <th title="exact pulse transfer function">GM sampled</th>
          <th title="exact pulse transfer function">PM sampled</th>
          <th title="exact pulse transfer function">Ms sampled</th>
          <th title="continuous estimate: hold as e^(−sT/2), computation delay as dead time">PM estimate</th>
          <th>closed loop</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((r) => (
          <tr key={r.cutId} data-sampled-cut={r.cutId} title={[...r.warnings.map((w) => w.message), ...r.notes].join('\n')}>
            <td className="lw-nowrap">{r.label}</td>
            <td>{r.sampler ?? '—'}</td>
            <td>{formatEngineering(r.sampleTime)}</td>
            <td data-field="gainMarginDb">{r.margins?.gainMarginDb === null ? '∞' : `${fmt(r.margins?.gainMarginDb, 3)} dB`}</td>
            <td data-field="phaseMarginDeg">{r.margins ? `${fmt(r.margins.phaseMarginDeg)}°` : '—'}</td>
            <td>{fmt(r.margins?.peakSensitivity)}</td>
            <td>{r.estimate ? `${fmt(r.estimate.margins.phaseMarginDeg)}°` : '—'}</td>
            <td className={r.closedLoopStable === false || r.warnings.length ? 'lw-bad' : 'lw-ok'}>
              {r.closedLoopStable === null ? 'estimate only' : r.closedLoopStable ? 'stable' : 'UNSTABLE'}
              {r.warnings.length ? ' (sample time slow)' : ''}
              {r.exact ? '' : ' *'}
            </td>
          </tr>
        ))}
      </tbody>
      <caption className="small lw-muted" style={{ captionSide: 'bottom', textAlign: 'left' }}>
        Sampled loops read at their sampler from the exact pulse transfer function; * other rates taken as continuous with their hold delay
        (hover a row for the notes).
      </caption>
    </table>
  );
}
