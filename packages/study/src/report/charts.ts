/**
 * The report's charts from study results, as SVG (svg-plot): the locus with its geometry
 * (asymptotes, breakaways, axis crossings, departure and arrival angles, closed-loop poles by
 * origin), Bode, Nyquist and |S|/|T| of a loop, the outer loop with the real against an ideal
 * inner loop, the response in small multiples (one panel per unit) and the actuators.
 */
import type { ClosedLoopData, Cx, FrequencyData, LocusData, OuterIdealData, PoleOrigin, PolesData, ResponseResult } from '../types.ts';
import { responsePanels } from '../run.ts';
import { locusFocus } from '../locus-frame.ts';
import { originAt } from '../poles.ts';
import { fmt } from './format.ts';
import { linearRange, plotBox, plotSvg, type PlotArrow, type PlotPanel, type PlotSeries } from './svg-plot.ts';

export const SERIES = ['#2f6fb0', '#c2572b', '#2e8b57', '#8a4fbf', '#b08a16', '#1c8c9c', '#b0407a', '#5a6b2f'];
const INK = '#1d2329';
const MUTED = '#7d8790';
const LIMIT = '#c77c00';
const POLE = '#d62828';
const SWEEP = 'rgba(230, 140, 40, 0.35)';
const WIDTH = 760;

const xs = (ps: readonly Cx[]) => ps.map((p) => p.re);
const ys = (ps: readonly Cx[]) => ps.map((p) => p.im);

/** A window on the s-plane holding the points, padded, with equal scales on both axes for a plotting box. */
export function planeWindow(
  points: readonly Cx[],
  box: { width: number; height: number },
): { xMin: number; xMax: number; yMin: number; yMax: number } {
  const fin = points.filter((p) => Number.isFinite(p.re) && Number.isFinite(p.im));
  let x0 = Math.min(0, ...fin.map((p) => p.re));
  let x1 = Math.max(0, ...fin.map((p) => p.re));
  const ym = Math.max(...fin.map((p) => Math.abs(p.im)), 0);
  let y0 = -ym;
  let y1 = ym;
  const span = Math.max(x1 - x0, y1 - y0, 1e-9);
  const pad = 0.12 * span;
  x0 -= pad;
  x1 += pad;
  y0 -= pad;
  y1 += pad;
  // Equal units per pixel: widen whichever axis is short.
  const ux = (x1 - x0) / box.width;
  const uy = (y1 - y0) / box.height;
  if (ux > uy) {
    const g = (ux * box.height - (y1 - y0)) / 2;
    y0 -= g;
    y1 += g;
  } else {
    const g = (uy * box.width - (x1 - x0)) / 2;
    x0 -= g;
    x1 += g;
  }
  return { xMin: x0, xMax: x1, yMin: y0, yMax: y1 };
}

/** A ray from (x0, 0) at an angle, long enough to leave the window. */
function ray(x0: number, angleDeg: number, reach: number): { x: number[]; y: number[] } {
  const a = (angleDeg * Math.PI) / 180;
  return { x: [x0, x0 + reach * Math.cos(a)], y: [0, reach * Math.sin(a)] };
}

const approximant = (origin: readonly PoleOrigin[] | undefined, i: number) => origin?.[i] === 'approximant';

/**
 * The locus of the sweep with the closed-loop poles at the value in force. Poles that belong
 * to a Padé approximant are drawn hollow and left out of the framing (they lie far out); the
 * caption counts those outside the window.
 */
export function locusChart(locus: LocusData | null, poles: PolesData | null, label: string, id: string): { svg: string; outside: number } {
  const height = 540;
  const current = poles?.poles ?? [];
  const focus = locusFocus(locus, current, locus?.range ?? null, poles?.origin ?? []);
  const key: Cx[] = focus.points;
  const series: PlotSeries[] = [];
  const arrows: PlotArrow[] = [];
  if (locus) {
    (locus.rangeBranches ?? []).forEach((b, i) =>
      series.push({ name: i === 0 ? 'slider range' : '', x: b.re, y: b.im, color: SWEEP, line: { width: 8 } }),
    );
    locus.branches.forEach((b, i) =>
      series.push({ name: i === 0 ? 'branches' : '', x: b.re, y: b.im, color: SERIES[i % SERIES.length], line: { width: 1.8 } }),
    );
    const extent = Math.max(1, ...key.map((p) => Math.hypot(p.re, p.im)));
    const reach = 10 * extent;
    if (locus.asymptotes) {
      locus.asymptotes.anglesDeg.forEach((a, i) => {
        const r = ray(locus.asymptotes!.centroid, a, reach);
        series.push({
          name: i === 0 ? `asymptotes (centroid ${fmt(locus.asymptotes!.centroid, 3)})` : '',
          x: r.x,
          y: r.y,
          color: MUTED,
          line: { dash: 'dashed', width: 1 },
        });
      });
    }
    const poleList = [...locus.poles, ...locus.fixedPoles];
    series.push({ name: 'open-loop poles', x: xs(poleList), y: ys(poleList), color: INK, line: null, marker: 'cross' });
    if (locus.zeros.length)
      series.push({ name: 'zeros', x: xs(locus.zeros), y: ys(locus.zeros), color: INK, line: null, marker: 'circle' });
    const specials = [
      ...locus.breakaways.map((b) => ({ s: b.s, k: b.gain })),
      ...locus.crossings.map((c) => ({ s: { re: 0, im: c.omega }, k: c.gain })),
    ];
    if (specials.length) {
      series.push({
        name: 'breakaways and axis crossings (gain)',
        x: specials.map((p) => p.s.re),
        y: specials.map((p) => p.s.im),
        color: MUTED,
        line: null,
        marker: 'square',
        markerSize: 7,
        labels: specials.map((p) => `k=${fmt(p.k, 3)}`),
      });
    }
    // Departure and arrival angles at the complex poles and zeros of the plant (not at a Padé approximant's).
    for (const d of locus.departures)
      if (d.at.im > 0 && originAt(d.at, locus.poles, locus.poleOrigin) !== 'approximant')
        arrows.push({ x: d.at.re, y: d.at.im, angleDeg: d.angleDeg, lengthPx: 34, color: '#2e8b57', label: `θd ${fmt(d.angleDeg, 4)}°` });
    for (const a of locus.arrivals)
      if (a.at.im > 0 && originAt(a.at, locus.zeros, locus.zeroOrigin) !== 'approximant')
        arrows.push({
          x: a.at.re,
          y: a.at.im,
          angleDeg: a.angleDeg,
          lengthPx: 34,
          color: '#8a4fbf',
          label: `θa ${fmt(a.angleDeg, 4)}°`,
          into: true,
        });
  }
  const real = current.filter((_, i) => !approximant(poles?.origin, i));
  const pade = current.filter((_, i) => approximant(poles?.origin, i));
  if (real.length)
    series.push({ name: 'closed-loop poles now', x: xs(real), y: ys(real), color: POLE, line: null, marker: 'diamond', markerSize: 10 });
  if (pade.length)
    series.push({
      name: 'poles of the Padé approximant',
      x: xs(pade),
      y: ys(pade),
      color: POLE,
      line: null,
      marker: 'diamond-open',
      markerSize: 10,
    });
  const title = `Locus — ${label}`;
  const win = planeWindow(key, plotBox(WIDTH, height, series, true));
  const inside = (p: Cx) => p.re >= win.xMin && p.re <= win.xMax && p.im >= win.yMin && p.im <= win.yMax;
  const panel: PlotPanel = {
    x: { scale: 'linear', min: win.xMin, max: win.xMax, label: 'Re s [1/s]' },
    y: { scale: 'linear', min: win.yMin, max: win.yMax, label: 'Im s [rad/s]' },
    series,
    height,
    title,
    hRules: [{ at: 0, color: MUTED, dash: 'solid' }],
    vRules: [{ at: 0, color: MUTED, dash: 'solid' }],
    arrows,
  };
  const outside = [...current, ...(locus?.poles ?? []), ...(locus?.zeros ?? [])].filter((p) => !inside(p)).length;
  return { svg: plotSvg([panel], { width: WIDTH, id }), outside };
}

/** Bode magnitude and phase of L at a cut, crossovers and margins marked. */
export function bodeChart(f: FrequencyData, id: string): string {
  const m = f.margins;
  const w = { scale: 'log' as const, min: f.omega[0], max: f.omega[f.omega.length - 1], label: 'ω [rad/s]' };
  const mag: PlotPanel = {
    x: w,
    y: { scale: 'linear', ...linearRange(f.magDb, { include: [0] }), label: '|L| [dB]' },
    series: [{ name: '|L|', x: f.omega, y: f.magDb, color: SERIES[0] }],
    height: 250,
    title: `Bode of L — ${f.label}`,
    hRules: [{ at: 0, color: MUTED, dash: 'solid' }],
    vRules: m.gainCrossover !== null ? [{ at: m.gainCrossover, color: LIMIT, label: `ωc ${fmt(m.gainCrossover, 3)}` }] : [],
  };
  const phaseRules = [];
  const lo = Math.min(...f.phaseDeg);
  const hi = Math.max(...f.phaseDeg);
  for (let k = -1980; k <= 1980; k += 360)
    if (k >= lo - 30 && k <= hi + 30) phaseRules.push({ at: k, color: MUTED, dash: 'solid' as const });
  const phase: PlotPanel = {
    x: w,
    y: { scale: 'linear', ...linearRange(f.phaseDeg), label: '∠L [°]' },
    series: [{ name: '∠L', x: f.omega, y: f.phaseDeg, color: SERIES[1] }],
    height: 230,
    hRules: phaseRules,
    vRules: m.phaseCrossover !== null ? [{ at: m.phaseCrossover, color: LIMIT, label: `ω180 ${fmt(m.phaseCrossover, 3)}` }] : [],
  };
  return plotSvg([mag, phase], { width: WIDTH, id });
}

/** Nyquist of L around the critical point (an integrator's far branch is clipped away). */
export function nyquistChart(f: FrequencyData, id: string): string {
  const height = 440;
  const box = plotBox(WIDTH, height);
  const near: Cx[] = [
    { re: -2, im: -1.5 },
    { re: 1, im: 1.5 },
  ];
  for (let i = 0; i < f.re.length; i++)
    if (Math.hypot(f.re[i] + 0.5, f.im[i]) < 4) near.push({ re: f.re[i], im: f.im[i] }, { re: f.re[i], im: -f.im[i] });
  const win = planeWindow(near, box);
  const circle = Array.from({ length: 97 }, (_, i) => (2 * Math.PI * i) / 96);
  return plotSvg(
    [
      {
        x: { scale: 'linear', min: win.xMin, max: win.xMax, label: 'Re L' },
        y: { scale: 'linear', min: win.yMin, max: win.yMax, label: 'Im L' },
        series: [
          { name: 'unit circle', x: circle.map(Math.cos), y: circle.map(Math.sin), color: '#c9d0d6', line: { dash: 'dotted', width: 1 } },
          { name: 'L(jω), ω > 0', x: f.re, y: f.im, color: SERIES[0] },
          { name: 'ω < 0', x: f.re, y: f.im.map((v) => -v), color: SERIES[0], line: { dash: 'dashed', width: 1 } },
          { name: 'critical point −1', x: [-1], y: [0], color: POLE, line: null, marker: 'cross' },
        ],
        height,
        title: `Nyquist of L — ${f.label} (${f.openLoopRhpPoles} open-loop RHP pole${f.openLoopRhpPoles === 1 ? '' : 's'})`,
        hRules: [{ at: 0, color: MUTED, dash: 'solid' }],
        vRules: [{ at: 0, color: MUTED, dash: 'solid' }],
      },
    ],
    { width: WIDTH, id },
  );
}

/** |S| and |T| of a loop with Ms marked. */
export function sensitivityChart(f: FrequencyData, id: string): string {
  const m = f.margins;
  return plotSvg(
    [
      {
        x: { scale: 'log', min: f.omega[0], max: f.omega[f.omega.length - 1], label: 'ω [rad/s]' },
        y: {
          scale: 'linear',
          ...linearRange(
            [...f.sensDb, ...f.compDb].filter((v) => v > -120),
            { include: [0] },
          ),
          label: '[dB]',
        },
        series: [
          { name: '|S|', x: f.omega, y: f.sensDb, color: SERIES[2] },
          { name: '|T|', x: f.omega, y: f.compDb, color: SERIES[3] },
        ],
        height: 280,
        title: `|S| and |T| — ${f.label}`,
        hRules: [
          { at: 0, color: MUTED, dash: 'solid' },
          ...(m.peakSensitivity !== null
            ? [{ at: 20 * Math.log10(m.peakSensitivity), color: LIMIT, label: `Ms ${fmt(m.peakSensitivity, 3)}` }]
            : []),
        ],
      },
    ],
    { width: WIDTH, id },
  );
}

/** The outer loop with the real inner loop against an ideal one, both read in one configuration. */
export function outerIdealChart(o: OuterIdealData, names: Record<string, string>, id: string): string {
  const w = { scale: 'log' as const, min: o.omega[0], max: o.omega[o.omega.length - 1], label: 'ω [rad/s]' };
  const outer = names[o.outer] ?? o.outer;
  const inner = names[o.inner] ?? o.inner;
  return plotSvg(
    [
      {
        x: w,
        y: { scale: 'linear', ...linearRange([...o.realMagDb, ...o.idealMagDb], { include: [0] }), label: '|L| [dB]' },
        series: [
          { name: `real ${inner}`, x: o.omega, y: o.realMagDb, color: SERIES[0] },
          { name: `ideal ${inner}`, x: o.omega, y: o.idealMagDb, color: SERIES[1], line: { dash: 'dashed' } },
        ],
        height: 250,
        title: `${outer}: real vs ideal ${inner}`,
        hRules: [{ at: 0, color: MUTED, dash: 'solid' }],
      },
      {
        x: w,
        y: { scale: 'linear', ...linearRange([...o.realPhaseDeg, ...o.idealPhaseDeg]), label: '∠L [°]' },
        series: [
          { name: `real ${inner}`, x: o.omega, y: o.realPhaseDeg, color: SERIES[0] },
          { name: `ideal ${inner}`, x: o.omega, y: o.idealPhaseDeg, color: SERIES[1], line: { dash: 'dashed' } },
        ],
        height: 220,
      },
    ],
    { width: WIDTH, id },
  );
}

/** The response as small multiples: one panel per unit (a probe without a unit alone), then the actuators with their limits. */
export function responseChart(r: ResponseResult, shown: readonly string[], id: string): string {
  const t = { scale: 'linear' as const, min: 0, max: r.until, label: 't [s]' };
  const colour = (pid: string) =>
    SERIES[
      Math.max(
        0,
        r.probes.findIndex((p) => p.id === pid),
      ) % SERIES.length
    ];
  const panels: PlotPanel[] = responsePanels(r.probes, shown).map((g) => {
    const series: PlotSeries[] = [];
    const values: number[] = [];
    for (const pid of g.probes) {
      const label = r.probes.find((p) => p.id === pid)?.label ?? pid;
      const y = r.run.traces[pid] ?? [];
      values.push(...y);
      series.push({ name: label, x: r.run.time, y, color: colour(pid) });
      const ly = r.linear?.traces[pid];
      if (ly) {
        values.push(...ly);
        series.push({ name: `${label} (linear)`, x: r.linear!.time, y: ly, color: colour(pid), line: { dash: 'dashed', width: 1.3 } });
      }
    }
    return { x: t, y: { scale: 'linear', ...linearRange(values), label: g.unit ?? 'value' }, series, height: 200 };
  });
  r.actuators.forEach((a, i) => {
    const y = r.run.traces[a.key] ?? [];
    const limits = [a.lower, a.upper].filter((v): v is number => v !== null);
    const series: PlotSeries[] = [{ name: a.label, x: r.run.time, y, color: SERIES[(i + 4) % SERIES.length] }];
    const ly = r.linear?.traces[a.key];
    if (ly)
      series.push({
        name: `${a.label} (linear)`,
        x: r.linear!.time,
        y: ly,
        color: SERIES[(i + 4) % SERIES.length],
        line: { dash: 'dashed', width: 1.3 },
      });
    panels.push({
      x: t,
      y: { scale: 'linear', ...linearRange([...y, ...(ly ?? [])].filter(Number.isFinite), { include: limits }), label: 'actuator' },
      series,
      height: 190,
      hRules: limits.map((v) => ({ at: v, color: LIMIT, label: `limit ${fmt(v, 3)}` })),
    });
  });
  return plotSvg(panels, { width: WIDTH, id, title: 'Response (solid: as drawn, with every nonlinearity · dashed: the linear model)' });
}

/** Step response and Bode of a closed-loop form. */
export function closedLoopChart(c: ClosedLoopData, id: string): string {
  const panels: PlotPanel[] = [];
  if (c.step) {
    panels.push({
      x: { scale: 'linear', min: 0, max: c.step.time[c.step.time.length - 1], label: 't [s]' },
      y: { scale: 'linear', ...linearRange(c.step.value, { include: [0] }), label: 'step response' },
      series: [{ name: `${c.toLabel} for a unit step at ${c.fromLabel}`, x: c.step.time, y: c.step.value, color: SERIES[0] }],
      height: 220,
    });
  }
  if (c.bode) {
    const w = { scale: 'log' as const, min: c.bode.omega[0], max: c.bode.omega[c.bode.omega.length - 1], label: 'ω [rad/s]' };
    panels.push({
      x: w,
      y: { scale: 'linear', ...linearRange(c.bode.magDb), label: '|T| [dB]' },
      series: [{ name: '|T|', x: c.bode.omega, y: c.bode.magDb, color: SERIES[0] }],
      height: 200,
    });
    panels.push({
      x: w,
      y: { scale: 'linear', ...linearRange(c.bode.phaseDeg), label: '∠T [°]' },
      series: [{ name: '∠T', x: c.bode.omega, y: c.bode.phaseDeg, color: SERIES[1] }],
      height: 190,
    });
  }
  return plotSvg(panels, { width: WIDTH, id });
}
