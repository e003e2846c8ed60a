/**
 * The Locus view: every branch of the whole diagram's locus for the swept quantity, with the
 * current closed-loop poles. Hovering near a branch reads gain, s, ζ and ωn there; clicking
 * sets the sweep to the gain that puts a closed-loop pole at that point of the branch.
 */
import { useEffect, useMemo, useState } from 'react';
import { gainAtPoint, roundSignificant } from '@loopwright/lti';
import { useResultsStore } from '../analysis/results-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import {
  dampingOf,
  nearestOnBranches,
  planeWindow,
  zoomAt,
  zoomWindow,
  type LocusHit,
  type PlaneZoom,
} from '../analysis/locus-geometry.ts';
import { formatComplex, locusFocus, originAt, type Cx, type PoleOrigin } from '@loopwright/study';
import { fmt } from '../analysis/sweep.ts';
import { ZPlane } from './SampledLoopPanel.tsx';
import { locusBox, locusMarks, locusOption } from './locus-option.ts';
import { ChartFrame } from './ChartFrame.tsx';
import { RootsTable } from './RootsTable.tsx';
import { commitSweepValue, useSweepChoice, widenRangeFor } from './SweepBar.tsx';
import type { Palette } from './palette.ts';
import type { LocusData } from '@loopwright/study';

export const fmtS = (re: number, im: number): string => `${fmt(re)} ${im < 0 ? '−' : '+'} j${fmt(Math.abs(im))}`;

/** The gain that puts a pole at a hit: exact −D0/N0 on an exact locus, interpolated on a sampled one. */
export function gainForHit(locus: LocusData, hit: LocusHit): number {
  if (locus.mode === 'exact' && locus.n0 && locus.d0) {
    const k = gainAtPoint(locus.n0, locus.d0, hit.s);
    if (Number.isFinite(k)) return k;
  }
  return hit.k;
}

/** One empty pole list, so that memo dependencies stay equal while no poles are in. */
const NO_POLES: never[] = [];
const NO_ORIGIN: PoleOrigin[] = [];

/**
 * The locus geometry and the closed-loop poles, listed under the chart: asymptotes,
 * breakaways, axis crossings, departure and arrival angles (those at a Padé approximant's
 * poles and zeros said so), and every closed-loop pole with ζ, ωn and how it was found.
 */
function LocusList({
  locus,
  label,
  poles,
  origin,
}: {
  locus: LocusData | null;
  label: string;
  poles: Cx[];
  origin: readonly PoleOrigin[];
}) {
  const pade = (o: PoleOrigin) => (o === 'approximant' ? ' (Padé artefact)' : '');
  const rows: [string, string][] = [];
  if (locus?.asymptotes)
    rows.push([
      'asymptotes',
      `centroid ${fmt(locus.asymptotes.centroid)}, angles ${locus.asymptotes.anglesDeg.map((a) => `${fmt(a)}°`).join(', ')}`,
    ]);
  for (const b of locus?.breakaways ?? [])
    rows.push(['breakaway / break-in', `s = ${formatComplex(b.s.re, b.s.im)} at ${label} = ${fmt(b.gain)}`]);
  for (const c of locus?.crossings ?? []) rows.push(['imaginary-axis crossing', `ω = ${fmt(c.omega)} rad/s at ${label} = ${fmt(c.gain)}`]);
  for (const d of locus?.departures ?? [])
    rows.push([
      'departure angle',
      `${fmt(d.angleDeg)}° from ${formatComplex(d.at.re, d.at.im)}${pade(originAt(d.at, locus!.poles, locus!.poleOrigin))}`,
    ]);
  for (const a of locus?.arrivals ?? [])
    rows.push([
      'arrival angle',
      `${fmt(a.angleDeg)}° at ${formatComplex(a.at.re, a.at.im)}${pade(originAt(a.at, locus!.zeros, locus!.zeroOrigin))}`,
    ]);
  const shown = poles.filter((p) => p.im >= 0).length;
  const artefacts = poles.some((p, i) => p.im >= 0 && origin[i] === 'approximant');
  // closed, the tables are not kept up to date on every slider step; a click on the summary
  // fills them at once (the toggle event that confirms it comes a task later)
  const [open, setOpen] = useState(false);
  return (
    <details className="lw-locus-list" data-testid="locus-list" onToggle={(e) => setOpen((e.currentTarget as HTMLDetailsElement).open)}>
      <summary onClick={(e) => setOpen(!(e.currentTarget.parentElement as HTMLDetailsElement).open)}>
        Geometry and closed-loop poles ({rows.length} items, {shown} poles
        {artefacts ? ', some of a Padé approximant' : ''})
      </summary>
      {open && (
        <>
          <table className="lw-table lw-compact" data-testid="locus-geometry">
            <tbody>
              {rows.map(([k, v], i) => (
                <tr key={i} data-kind={k}>
                  <td>{k}</td>
                  <td>{v}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <RootsTable title="closed-loop pole" roots={poles} origin={origin} testId="locus-poles" />
        </>
      )}
    </details>
  );
}

export function LocusView({ pal }: { pal: Palette }) {
  const analysis = useResultsStore((s) => s.analysis);
  const error = useResultsStore((s) => s.errors.analysis);
  const pinned = useAnalysisStore((s) => s.pinned);
  const negative = useAnalysisStore((s) => s.negativeLocus);
  const damping = useAnalysisStore((s) => s.showDampingGuides);
  const freq = useAnalysisStore((s) => s.showFrequencyGuides);
  const setOptions = useAnalysisStore((s) => s.setOptions);
  const { choices, choice, range } = useSweepChoice();
  const [size, setSize] = useState({ width: 480, height: 300 });
  const [hover, setHover] = useState<LocusHit | null>(null);
  const [zoom, setZoom] = useState<PlaneZoom | null>(null);
  // a sampled loop at the cut: its z-plane locus (loop gain) can take the pane's place
  const [zView, setZView] = useState(false);
  const sampledCut = analysis?.sampled?.ok && analysis.sampled.value.locus ? analysis.sampled.value : null;

  const held = analysis?.locus?.ok ? analysis.locus.value : null;
  // Right after the sweep is switched the locus held is still the old quantity's: it is not
  // drawn (nor hovered, nor clicked) under the new one's name until its own locus arrives.
  const stale = held !== null && choice !== null && held.target !== choice.key;
  const locus = stale ? null : held;
  const polesData = analysis?.poles.ok ? analysis.poles.value : null;
  const current = polesData?.poles ?? NO_POLES;
  const origin = polesData?.origin ?? NO_ORIGIN;
  // The name of the quantity the locus held belongs to (its own, not the sweep bar's).
  const locusLabel = locus ? (choices.find((c) => c.key === locus.target)?.label ?? locus.parameter) : (choice?.label ?? '—');
  const box = locusBox(size.width, size.height);
  // The window frames the part of the locus the slider range moves (and the poles, zeros and
  // special points near it), not the moving poles themselves, so it stays put while sliding.
  const fitted = useMemo(() => {
    const all = [...(locus?.branches ?? []), ...(locus?.oppositeBranches ?? [])];
    const focus = locusFocus(locus, current, range, origin);
    return planeWindow(box, focus.points, focus.framesBranches ? all : []);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [locus, locus ? null : current, box.width, box.height, range?.min, range?.max]);
  const win = useMemo(() => zoomWindow(fitted, zoom), [fitted, zoom]);
  // A different locus (another diagram or sweep) starts fitted again.
  const locusIdentity = locus ? `${locus.parameter}|${JSON.stringify(locus.poles)}|${JSON.stringify(locus.zeros)}` : '';
  useEffect(() => {
    setZoom(null);
    setHover(null);
  }, [locusIdentity]);
  const option = useMemo(
    () =>
      locusOption({
        locus,
        pinned: pinned?.poles ?? null,
        win,
        pal,
        dampingGuides: damping,
        frequencyGuides: freq,
        parameterLabel: locusLabel,
      }),
    [locus, pinned, win, pal, damping, freq, locusLabel],
  );
  const marks = useMemo(() => locusMarks(current, hover ? { s: hover.s } : null, origin, pal), [current, hover, origin, pal]);

  const hitAt = (x: number, y: number): LocusHit | null => {
    if (!locus) return null;
    // The slider-range trace is dense: prefer it, so the gain found is exact to the pixel.
    const hitRange = locus.rangeBranches ? nearestOnBranches(locus.rangeBranches, win, box, x, y, 10, false) : null;
    if (hitRange) return hitRange;
    const a = nearestOnBranches(locus.branches, win, box, x, y, 10, false);
    const b = locus.oppositeBranches ? nearestOnBranches(locus.oppositeBranches, win, box, x, y, 10, true) : null;
    return a && b ? (a.distancePx <= b.distancePx ? a : b) : (a ?? b);
  };

  const message = !choice
    ? 'Nothing to sweep yet.'
    : stale
      ? `Computing the locus of ${choice.label}…`
      : analysis?.locus && !analysis.locus.ok
        ? `Locus: ${analysis.locus.error}`
        : analysis && !analysis.poles.ok
          ? `Closed-loop poles: ${(analysis.poles as { error: string }).error}`
          : error
            ? error
            : null;
  const hoverInfo =
    hover && locus
      ? (() => {
          const k = gainForHit(locus, hover);
          const { zeta, omegaN } = dampingOf(hover.s);
          return (
            <div className="lw-readout" data-testid="locus-readout">
              <div>
                {locusLabel} = <b>{fmt(k)}</b>
                {hover.negative ? ` (${locus.direction === 'negative' ? 'positive' : 'negative'} locus)` : ''}
              </div>
              <div>s = {fmtS(hover.s.re, hover.s.im)}</div>
              <div>
                ζ = {fmt(zeta, 3)} · ωn = {fmt(omegaN, 3)} rad/s
              </div>
              <div className="lw-muted">click to put a pole here</div>
            </div>
          );
        })()
      : null;

  return (
    <div className="lw-locus-col">
      <ChartFrame
        name="locus"
        title={`Locus — ${locus ? locusLabel : (choice?.label ?? 'no sweep')}`}
        background={pal.background}
        option={option}
        marks={marks}
        onSize={setSize}
        extra={
          locus ? (
            <span
              className="lw-tag"
              data-testid="locus-mode"
              title={`${locus.mode === 'exact' ? 'characteristic equation affine in the swept value: exact root-locus geometry' : `sampled parameter locus: ${locus.reason ?? ''}`}${locus.delayHandling.mode === 'pade' ? ` — ${locus.delayHandling.note}; poles marked hollow belong to the approximation` : ''}`}
            >
              {locus.mode}
              {locus.delayHandling.mode === 'pade' ? ' · Padé' : ''}
            </span>
          ) : undefined
        }
        overlay={
          <>
            {hoverInfo}
            {message && <div className="lw-chart-message">{message}</div>}
            {zView && sampledCut && (
              <div className="lw-zplane-overlay" data-testid="locus-z-plane">
                <div className="small">
                  z-plane: loop {sampledCut.label} read at {sampledCut.sampler}
                </div>
                <ZPlane data={sampledCut} pal={pal} />
              </div>
            )}
            <div className="lw-chart-toggles">
              <label className="lw-check" title="Show the locus for values of the other sign (dashed)">
                <input type="checkbox" checked={negative} onChange={(e) => setOptions({ negativeLocus: e.target.checked })} />{' '}
                {locus?.direction === 'negative' ? 'k > 0' : 'k < 0'}
              </label>
              {sampledCut && (
                <label className="lw-check" title="z-plane locus of the sampled loop at the cut (unit circle, ζ and ωn curves)">
                  <input type="checkbox" aria-label="z-plane locus" checked={zView} onChange={(e) => setZView(e.target.checked)} /> z
                </label>
              )}
              <label className="lw-check" title="Constant damping-ratio rays">
                <input type="checkbox" checked={damping} onChange={(e) => setOptions({ showDampingGuides: e.target.checked })} /> ζ
              </label>
              <label className="lw-check" title="Constant natural-frequency arcs">
                <input type="checkbox" checked={freq} onChange={(e) => setOptions({ showFrequencyGuides: e.target.checked })} /> ωn
              </label>
              <button
                type="button"
                className="lw-mini"
                aria-label="Fit locus window"
                disabled={!zoom}
                onClick={() => setZoom(null)}
                title="Fit the window to the swept part of the locus (mouse wheel zooms)"
              >
                Fit
              </button>
            </div>
          </>
        }
        onPointerMove={(_c, x, y) => {
          const h = hitAt(x, y);
          setHover((old) => (h === null && old === null ? old : h));
        }}
        onPointerLeave={() => setHover(null)}
        onWheel={(_c, x, y, delta) => {
          setZoom(zoomAt(fitted, win, box, x, y, delta > 0 ? 1 / 1.25 : 1.25, zoom));
          return true;
        }}
        onPointerClick={(_c, x, y) => {
          const h = hitAt(x, y);
          if (!h || !locus || !choice || !range) return;
          const k = gainForHit(locus, h);
          if (!Number.isFinite(k)) return;
          widenRangeFor(choice, range, k);
          commitSweepValue(choice, roundSignificant(k, 4)); // the gain picked on a branch, to 4 significant digits
        }}
      />
      <LocusList locus={locus} label={locusLabel} poles={current} origin={origin} />
    </div>
  );
}
