/**
 * The Locus view: every branch of the whole diagram's locus for the swept quantity, with the
 * current closed-loop poles. Hovering near a branch reads gain, s, ζ and ωn there; clicking
 * sets the sweep to the gain that puts a closed-loop pole at that point of the branch.
 */
import { useEffect, useMemo, useState } from 'react';
import { gainAtPoint, roundSignificant } from '@loopwright/lti';
import { useResultsStore } from '../analysis/results-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import { activePoints, dampingOf, keyPoints, nearestOnBranches, planeWindow, pointsNear, zoomAt, zoomWindow, type LocusHit, type PlaneZoom } from '../analysis/locus-geometry.ts';
import { fmt } from '../analysis/sweep.ts';
import { ZPlane } from './SampledLoopPanel.tsx';
import { locusBox, locusLivePatch, locusOption } from './locus-option.ts';
import { ChartFrame } from './ChartFrame.tsx';
import { commitSweepValue, useSweepChoice, widenRangeFor } from './SweepBar.tsx';
import type { Palette } from './palette.ts';
import type { LocusData } from '@loopwright/study';

export const fmtS = (re: number, im: number): string =>
  `${fmt(re)} ${im < 0 ? '−' : '+'} j${fmt(Math.abs(im))}`;

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

export function LocusView({ pal }: { pal: Palette }) {
  const analysis = useResultsStore((s) => s.analysis);
  const error = useResultsStore((s) => s.errors.analysis);
  const pinned = useAnalysisStore((s) => s.pinned);
  const negative = useAnalysisStore((s) => s.negativeLocus);
  const damping = useAnalysisStore((s) => s.showDampingGuides);
  const freq = useAnalysisStore((s) => s.showFrequencyGuides);
  const setOptions = useAnalysisStore((s) => s.setOptions);
  const { choice, range } = useSweepChoice();
  const [size, setSize] = useState({ width: 480, height: 300 });
  const [hover, setHover] = useState<LocusHit | null>(null);
  const [zoom, setZoom] = useState<PlaneZoom | null>(null);
  // a sampled loop at the cut: its z-plane locus (loop gain) can take the pane's place
  const [zView, setZView] = useState(false);
  const sampledCut = analysis?.sampled?.ok && analysis.sampled.value.locus ? analysis.sampled.value : null;

  const locus = analysis?.locus?.ok ? analysis.locus.value : null;
  const current = analysis?.poles.ok ? analysis.poles.value.poles : NO_POLES;
  const box = locusBox(size.width, size.height);
  // The window frames the part of the locus the slider range moves (and the poles, zeros and
  // special points near it), not the moving poles themselves, so it stays put while sliding.
  const fitted = useMemo(() => {
    const all = [...(locus?.branches ?? []), ...(locus?.oppositeBranches ?? [])];
    const lo = range ? range.min : -Infinity;
    const hi = range ? range.max : Infinity;
    const active = locus ? activePoints(locus.rangeBranches ?? all, lo, hi) : [];
    const key = active.length > 0 ? [...active, ...pointsNear(keyPoints(locus, []), active)] : keyPoints(locus, current);
    return planeWindow(box, key, active.length > 0 ? [] : all);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [locus, locus ? null : current, box.width, box.height, range?.min, range?.max]);
  const win = useMemo(() => zoomWindow(fitted, zoom), [fitted, zoom]);
  // A different locus (another diagram or sweep) starts fitted again.
  const locusIdentity = locus ? `${locus.parameter}|${JSON.stringify(locus.poles)}|${JSON.stringify(locus.zeros)}` : '';
  useEffect(() => setZoom(null), [locusIdentity]);
  const option = useMemo(
    () =>
      locusOption({
        locus,
        current: [],
        pinned: pinned?.poles ?? null,
        win,
        pal,
        dampingGuides: damping,
        frequencyGuides: freq,
        parameterLabel: choice?.label ?? '—',
        hover: null,
      }),
    [locus, pinned, win, pal, damping, freq, choice?.label],
  );
  const patch = useMemo(() => locusLivePatch(current, hover ? { s: hover.s } : null), [current, hover]);

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
    : analysis?.locus && !analysis.locus.ok
      ? `Locus: ${analysis.locus.error}`
      : analysis && !analysis.poles.ok
        ? `Closed-loop poles: ${(analysis.poles as { error: string }).error}`
        : error
          ? error
          : null;
  const hoverInfo = hover && locus ? (() => {
    const k = gainForHit(locus, hover);
    const { zeta, omegaN } = dampingOf(hover.s);
    return (
      <div className="lw-readout" data-testid="locus-readout">
        <div>
          {choice?.label ?? 'k'} = <b>{fmt(k)}</b>
          {hover.negative ? ` (${locus.direction === 'negative' ? 'positive' : 'negative'} locus)` : ''}
        </div>
        <div>s = {fmtS(hover.s.re, hover.s.im)}</div>
        <div>
          ζ = {fmt(zeta, 3)} · ωn = {fmt(omegaN, 3)} rad/s
        </div>
        <div className="lw-muted">click to put a pole here</div>
      </div>
    );
  })() : null;

  return (
    <ChartFrame
      name="locus"
      title={`Locus — ${choice?.label ?? 'no sweep'}`}
      background={pal.background}
      option={option}
      patch={patch}
      onSize={setSize}
      extra={locus ? <span className="lw-tag" title={locus.mode === 'exact' ? 'characteristic equation affine in the swept value: exact root locus' : 'sampled parameter locus'}>{locus.mode}</span> : undefined}
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
            <input type="checkbox" checked={negative} onChange={(e) => setOptions({ negativeLocus: e.target.checked })} /> {locus?.direction === 'negative' ? 'k > 0' : 'k < 0'}
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
          <button type="button" className="lw-mini" aria-label="Fit locus window" disabled={!zoom} onClick={() => setZoom(null)} title="Fit the window to the swept part of the locus (mouse wheel zooms)">
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
  );
}
