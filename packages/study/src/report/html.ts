/**
 * The design report as one self-contained HTML file (no scripts, no external resources): a
 * summary that says which reading of each loop to act on, the diagram, findings, parameters,
 * the loops table with both readings and the open-loop RHP pole counts, separation, the outer
 * loops against ideal inner loops, the closed-loop poles marked by origin, the locus with its
 * geometry, every loop's Bode, Nyquist and |S|/|T|, the response in small multiples with its
 * figures, and the safety caution. Built from study results only.
 */
import type { Diagram } from '@loopwright/graph';
import { formatEngineering } from '@loopwright/lti';
import type { CheckData, Cx, LocusData, LoopRow, LoopsData, MarginsData, Part, PoleOrigin, PolesData, ResponseResult } from '../types.ts';
import { findingText } from '../validate.ts';
import { originAt } from '../poles.ts';
import { bodeChart, locusChart, nyquistChart, outerIdealChart, responseChart, sensitivityChart } from './charts.ts';
import { diagramSvg } from './diagram-svg.ts';
import { dampingOf, fmt, fmtS } from './format.ts';
import { esc } from './svg-plot.ts';

export const SAFETY_CAUTION =
  'Results are design aids. Where a loop drives machinery, heat or pressure, validate the design on the real plant with limits and interlocks in place, and defer to the applicable functional-safety standards, local codes and licensed practice.';

export interface ReportInput {
  diagram: Diagram;
  /** The sweep in force: its label and value (null: nothing to sweep). */
  sweep: { label: string; value: number } | null;
  check: Part<CheckData>;
  locus: Part<LocusData> | null;
  poles: Part<PolesData>;
  loops: Part<LoopsData>;
  response: Part<ResponseResult>;
  generatedAt: string;
  fingerprint: string;
}

/** Words for how a pole was found. */
export const ORIGIN_TEXT: Record<PoleOrigin, string> = {
  exact: 'exact',
  approximated: 'approximates a true root (Padé)',
  approximant: 'Padé artefact, not a plant pole',
};

function table(head: string[], rows: string[][], cls = ''): string {
  return `<table${cls ? ` class="${cls}"` : ''}><thead><tr>${head.map((h) => `<th>${esc(h)}</th>`).join('')}</tr></thead><tbody>${rows
    .map((r) => `<tr>${r.map((c) => `<td>${c}</td>`).join('')}</tr>`)
    .join('')}</tbody></table>`;
}

const e = (v: number | null | undefined, digits = 4) => esc(fmt(v, digits));
const gm = (m: MarginsData) => (m.gainMarginDb === null ? '∞' : e(m.gainMarginDb));
const dm = (m: MarginsData) => (m.delayMargin === null ? '∞' : e(m.delayMargin));
const failed = (p: Part<unknown> | null, what: string) =>
  `<p class="bad">${esc(what)} not computed: ${esc(p && !p.ok ? p.error : 'nothing to compute')}</p>`;
const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** One row of the loops table: a reading of a loop. */
function readingRow(name: string, reading: string, opened: string, rhp: number, m: MarginsData, actOn: boolean): string[] {
  return [
    `${esc(name)}${actOn ? ' <b class="act">◀ act on this</b>' : ''}`,
    esc(reading),
    esc(opened || '—'),
    `<span class="${rhp > 0 ? 'warn' : ''}">${rhp}</span>`,
    e(m.gainCrossover),
    `<span class="${m.phaseMarginDeg !== null && m.phaseMarginDeg < 0 ? 'warn' : ''}">${e(m.phaseMarginDeg)}</span>`,
    gm(m),
    dm(m),
    e(m.peakSensitivity),
    e(m.bandwidth),
    m.closedLoopStable ? '<span class="ok">stable</span>' : '<span class="bad">UNSTABLE</span>',
  ];
}

function loopRows(L: LoopsData, r: LoopRow): string[][] {
  const name = r.label + (r.auto ? ' (proposed)' : '');
  const around = (r.alone?.opened ?? []).map((id) => L.names[id] ?? id).join(', ');
  const rows = [
    readingRow(
      name,
      r.alone ? 'every other loop closed' : 'every other loop closed (the one reading)',
      '',
      r.openLoopRhpPoles,
      r.margins,
      r.advice.actOn === 'all-closed',
    ),
  ];
  if (r.alone)
    rows.push(readingRow(name, 'inner-first', around, r.alone.openLoopRhpPoles, r.alone.margins, r.advice.actOn === 'inner-first'));
  return rows;
}

/** The reading a tuning engineer acts on, as figures. */
function actedOn(r: LoopRow): { m: MarginsData; how: string } {
  return r.advice.actOn === 'inner-first' && r.alone
    ? { m: r.alone.margins, how: 'inner-first' }
    : { m: r.margins, how: 'every other loop closed' };
}

function summary(inp: ReportInput): string {
  const lines: string[] = [];
  const L = inp.loops.ok ? inp.loops.value : null;
  const P = inp.poles.ok ? inp.poles.value : null;
  if (P) {
    const real = P.poles.filter((_, i) => P.origin[i] !== 'approximant');
    const slow = real.reduce<Cx | null>((s, p) => (s === null || p.re > s.re ? p : s), null);
    const z = slow ? dampingOf(slow) : null;
    lines.push(
      `Whole diagram: <b class="${P.stable ? 'ok' : 'bad'}">${P.stable ? 'stable' : 'UNSTABLE'}</b>, judged from its ${plural(P.poles.length, 'closed-loop pole')}` +
        (slow && z ? `; the slowest at s = ${esc(fmtS(slow.re, slow.im))} (ζ ${e(z.zeta, 3)}, ωn ${e(z.omegaN, 3)} rad/s)` : '') +
        (P.origin.some((o) => o === 'approximant')
          ? `; ${P.origin.filter((o) => o === 'approximant').length} more belong to the Padé approximant of a dead time`
          : '') +
        '.',
    );
  }
  if (L) {
    for (const r of L.rows) {
      const a = actedOn(r);
      lines.push(
        `<b>${esc(r.label)}</b> (${esc(a.how)}): PM ${e(a.m.phaseMarginDeg, 3)}°, GM ${a.m.gainMarginDb === null ? '∞' : `${e(a.m.gainMarginDb, 3)} dB`}, crossover ${e(a.m.gainCrossover, 3)} rad/s, Ms ${e(a.m.peakSensitivity, 3)}. ${esc(r.advice.text)}`,
      );
    }
    for (const s of L.separations.filter((x) => x.flag))
      lines.push(
        `<span class="warn">⚠ ${esc(L.names[s.inner] ?? s.inner)} inside ${esc(L.names[s.outer] ?? s.outer)}: ${esc(s.note)}</span>`,
      );
  }
  if (inp.response.ok) {
    const r = inp.response.value;
    for (const m of r.metrics) {
      if (m.timeInSaturation !== null) {
        if (m.timeInSaturation > 0)
          lines.push(`${esc(m.label)}: at a limit for ${e(m.timeInSaturation, 3)} s (peak effort ${e(m.peakEffort, 3)}).`);
        continue;
      }
      if (!r.shownProbes.includes(m.probe)) continue;
      lines.push(
        `${esc(m.label)}: overshoot ${e(m.overshootPct, 3)} %, settling (±2 %) ${e(m.settlingTime, 3)} s, steady-state error ${e(m.steadyStateError, 3)}.`,
      );
    }
    if (r.run.status !== 'ok')
      lines.push(`<span class="bad">The simulation stopped early (${esc(r.run.status)}): ${esc(r.run.message)}</span>`);
  }
  if (inp.check.ok && inp.check.value.counts.error + inp.check.value.counts.warning > 0) {
    const c = inp.check.value.counts;
    lines.push(`<span class="warn">Findings: ${plural(c.error, 'error')}, ${plural(c.warning, 'warning')} (listed below).</span>`);
  }
  return `<h2>Summary</h2><ul class="summary">${lines.map((l) => `<li>${l}</li>`).join('')}</ul>`;
}

function polesSection(P: PolesData): string {
  const rows = P.poles
    .map((p, i) => ({ p, i }))
    .filter(({ p }) => p.im >= 0)
    .map(({ p, i }) => {
      const z = dampingOf(p);
      return [esc(p.im > 0 ? `${fmt(p.re)} ± j${fmt(p.im)}` : fmt(p.re)), e(z.zeta, 3), e(z.omegaN, 4), esc(ORIGIN_TEXT[P.origin[i]])];
    });
  const body = table(['closed-loop pole s', 'ζ', 'ωn [rad/s]', 'how it was found'], rows, 'poles');
  const note =
    P.delayHandling.mode === 'pade'
      ? `<p class="note">${esc(P.delayHandling.note)}. Poles marked “approximates a true root” stay put when the Padé order is raised by two; those marked “Padé artefact” move: they belong to the approximation, not to the plant, and say nothing about the design.</p>`
      : '';
  return `<h2>Closed-loop poles</h2><p>${P.stable ? 'Every closed-loop pole lies in the open left half-plane: the diagram is stable.' : '<b class="bad">A closed-loop pole lies on or right of the imaginary axis: the diagram is UNSTABLE.</b>'}</p>${body}${note}`;
}

function locusSection(inp: ReportInput): string {
  const parts = ['<h2>Locus</h2>'];
  const locus = inp.locus?.ok ? inp.locus.value : null;
  const P = inp.poles.ok ? inp.poles.value : null;
  if (!inp.sweep) return parts.concat('<p>Nothing to sweep: the diagram has no named parameter or gain block.</p>').join('');
  if (!locus) parts.push(failed(inp.locus, 'The locus'));
  const tag = locus
    ? locus.mode === 'exact'
      ? `exact root-locus geometry of the whole diagram${locus.delayHandling.mode === 'pade' ? ` (${locus.delayHandling.note})` : ''}`
      : `sampled parameter locus (${locus.reason ?? ''})`
    : '';
  parts.push(
    `<p>Swept: <b>${esc(inp.sweep.label)}</b> = ${e(inp.sweep.value, 6)}${tag ? ` — ${esc(tag)}` : ''}; every other value fixed.</p>`,
  );
  if (locus || P) {
    const c = locusChart(locus, P, inp.sweep.label, 'locus');
    parts.push(
      `<figure>${c.svg}${c.outside ? `<figcaption class="note">${plural(c.outside, 'pole or zero', 'poles and zeros')} lie outside this window (listed in the tables).</figcaption>` : ''}</figure>`,
    );
  }
  if (locus && locus.mode === 'exact') {
    const geo: string[][] = [];
    if (locus.asymptotes)
      geo.push([
        'asymptotes',
        esc(`centroid ${fmt(locus.asymptotes.centroid)}, angles ${locus.asymptotes.anglesDeg.map((a) => `${fmt(a)}°`).join(', ')}`),
      ]);
    for (const b of locus.breakaways)
      geo.push(['breakaway / break-in', esc(`s = ${fmtS(b.s.re, b.s.im)} at ${inp.sweep.label} = ${fmt(b.gain)}`)]);
    for (const x of locus.crossings)
      geo.push(['imaginary-axis crossing', esc(`ω = ${fmt(x.omega)} rad/s at ${inp.sweep.label} = ${fmt(x.gain)}`)]);
    const padeMark = (o: PoleOrigin) => (o === 'approximant' ? ' (of the Padé approximant)' : '');
    for (const d of locus.departures) {
      geo.push([
        'departure angle',
        esc(
          `${fmt(d.angleDeg)}° from the pole ${fmtS(d.at.re, d.at.im)}${d.multiplicity > 1 ? ` (×${d.multiplicity})` : ''}${padeMark(originAt(d.at, locus.poles, locus.poleOrigin))}`,
        ),
      ]);
    }
    for (const a of locus.arrivals) {
      geo.push([
        'arrival angle',
        esc(
          `${fmt(a.angleDeg)}° at the zero ${fmtS(a.at.re, a.at.im)}${a.multiplicity > 1 ? ` (×${a.multiplicity})` : ''}${padeMark(originAt(a.at, locus.zeros, locus.zeroOrigin))}`,
        ),
      ]);
    }
    const marked = (ps: Cx[], origin: PoleOrigin[]) =>
      ps
        .map(
          (p, i) =>
            `${fmtS(p.re, p.im)}${origin[i] === 'approximant' ? ' (Padé artefact)' : origin[i] === 'approximated' ? ' (via Padé)' : ''}`,
        )
        .join(', ') || 'none';
    geo.push(['open-loop poles', esc(marked(locus.poles, locus.poleOrigin))], ['zeros', esc(marked(locus.zeros, locus.zeroOrigin))]);
    if (locus.fixedPoles.length) geo.push(['fixed poles (the sweep does not move them)', esc(marked(locus.fixedPoles, locus.fixedOrigin))]);
    parts.push(table(['geometry', 'value'], geo));
  }
  return parts.join('');
}

function loopsSection(inp: ReportInput): string {
  const parts = ['<h2>Loops</h2>'];
  if (!inp.loops.ok) return parts.concat(failed(inp.loops, 'The loops table')).join('');
  const L = inp.loops.value;
  for (const n of L.notes) parts.push(`<p class="note">${esc(n)}</p>`);
  if (L.rows.length === 0) return parts.concat('<p>No loop to open.</p>').join('');
  parts.push(
    '<p>Each loop is read at its cut (1 + L = 0). A loop inside others is read twice: with every other loop closed (how it runs) and inner-first, the loops around it opened (how a cascade is tuned and commissioned). “Open-loop RHP poles” counts the poles of that L in the right half-plane: with P of them a stable closed loop encircles −1 P times counter-clockwise, and a negative phase margin is then no sign of instability.</p>',
  );
  parts.push(
    table(
      [
        'loop',
        'reading',
        'loops opened',
        'open-loop RHP poles of L',
        'crossover [rad/s]',
        'PM [°]',
        'GM [dB]',
        'DM [s]',
        'Ms',
        'bandwidth [rad/s]',
        'closed loop',
      ],
      L.rows.flatMap((r) => loopRows(L, r)),
      'loops',
    ),
  );
  parts.push(
    `<h3>Which reading to act on</h3><ul>${L.rows.map((r) => `<li><b>${esc(r.label)}</b>: ${esc(r.advice.text)}</li>`).join('')}</ul>`,
  );
  if (L.separations.length) {
    parts.push('<h3>Separation of nested loops</h3>');
    parts.push(
      table(
        ['inner loop', 'outer loop', 'ratio', 'basis', 'note'],
        L.separations.map((s) => [
          esc(L.names[s.inner] ?? s.inner),
          esc(L.names[s.outer] ?? s.outer),
          s.ratio === null ? '—' : `${e(s.ratio, 3)}×`,
          esc(s.basis),
          `${s.flag ? '⚠ ' : ''}${esc(s.note)}`,
        ]),
      ),
    );
  }
  L.outerVsIdeal.forEach((o, i) => {
    const outer = L.names[o.outer] ?? o.outer;
    const inner = L.names[o.inner] ?? o.inner;
    const opened = o.opened.map((id) => L.names[id] ?? id).join(', ');
    parts.push(`<h3>${esc(outer)} with the real against an ideal ${esc(inner)}</h3>`);
    parts.push(
      `<p>Both curves and both rows in one configuration: ${opened ? `${esc(opened)} opened` : 'every other loop as in the diagram'}, the inner loops of ${esc(outer)} closed.</p>`,
    );
    const row = (name: string, m: MarginsData) => [esc(name), e(m.gainCrossover), e(m.phaseMarginDeg), gm(m), e(m.peakSensitivity)];
    parts.push(
      table(
        [`${outer}`, 'crossover [rad/s]', 'PM [°]', 'GM [dB]', 'Ms'],
        [row(`with the real ${inner}`, o.realMargins), row(`with an ideal ${inner}`, o.idealMargins)],
      ),
    );
    parts.push(`<figure>${outerIdealChart(o, L.names, `ideal-${i}`)}</figure>`);
  });
  return parts.join('');
}

function frequencySection(L: LoopsData): string {
  const parts = ['<h2>Frequency response of each loop</h2><p>Every other loop closed (the reading the margins table gives first).</p>'];
  L.rows.forEach((r, i) => {
    if (!r.frequency) return;
    parts.push(`<h3>${esc(r.label)}</h3>`);
    parts.push(`<figure>${bodeChart(r.frequency, `bode-${i}`)}</figure>`);
    parts.push(`<figure>${nyquistChart(r.frequency, `nyquist-${i}`)}</figure>`);
    parts.push(`<figure>${sensitivityChart(r.frequency, `sens-${i}`)}</figure>`);
  });
  return parts.join('');
}

function responseSection(inp: ReportInput): string {
  const parts = ['<h2>Response</h2>'];
  if (!inp.response.ok) return parts.concat(failed(inp.response, 'The simulation')).join('');
  const r = inp.response.value;
  const from = {
    request: 'asked for',
    diagram: "from the diagram's simulation settings",
    automatic: 'chosen to see the slowest mode settle',
  }[r.settings.untilFrom];
  parts.push(
    `<p>Simulated to ${e(r.until)} s (${esc(from)}), rtol ${e(r.settings.rtol, 2)}, atol ${e(r.settings.atol, 2)}: ${r.run.status === 'ok' ? esc(r.run.message) : `<b class="bad">stopped early (${esc(r.run.status)})</b>: ${esc(r.run.message)}`}.</p>`,
  );
  const shown = r.shownProbes.length ? r.shownProbes : r.probes.map((p) => p.id);
  parts.push(`<figure>${responseChart(r, shown, 'response')}</figure>`);
  parts.push(
    table(
      [
        'signal',
        'rise time 10–90 % [s]',
        'overshoot [%]',
        'peak time [s]',
        'settling ±2 % [s]',
        'steady state',
        'steady-state error',
        'IAE',
        'time at limit [s]',
        'peak effort',
      ],
      r.metrics.map((m) => [
        esc(m.label),
        e(m.riseTime),
        e(m.overshootPct),
        e(m.peakTime),
        e(m.settlingTime),
        e(m.steadyState),
        e(m.steadyStateError),
        e(m.iae),
        e(m.timeInSaturation),
        e(m.peakEffort),
      ]),
    ),
  );
  return parts.join('');
}

export function designReportHtml(inp: ReportInput): string {
  const d = inp.diagram;
  const sections: string[] = [summary(inp)];
  sections.push(`<h2>Diagram</h2><div class="diagram">${diagramSvg(d)}</div>`);
  if (d.description) sections.push(`<p>${esc(d.description)}</p>`);
  if (inp.check.ok) {
    const F = inp.check.value.findings;
    if (F.length)
      sections.push(
        `<h2>Findings</h2><ul>${F.map((f) => `<li class="${f.severity === 'error' ? 'bad' : f.severity === 'warning' ? 'warn' : ''}">${esc(f.severity)}: ${esc(findingText(f))}</li>`).join('')}</ul>`,
      );
  }
  sections.push('<h2>Parameters</h2>');
  sections.push(
    d.parameters.length
      ? table(
          ['name', 'value', 'unit', 'description'],
          // As the Parameters panel shows them (engineering notation, e.g. 50e-6), to 6 digits.
          d.parameters.map((p) => [
            esc(p.name),
            esc(formatEngineering(p.value, { digits: 6 })),
            esc(p.unit ?? ''),
            esc(p.description ?? ''),
          ]),
        )
      : '<p>No named parameters.</p>',
  );
  sections.push(
    table(
      ['block', 'label', 'kind', 'parameters'],
      d.blocks.map((b) => [
        esc(b.id),
        esc(b.label ?? ''),
        esc(b.kind),
        esc(
          Object.entries(b.params)
            .map(([k, v]) => `${k}=${String(v)}`)
            .join(', '),
        ),
      ]),
    ),
  );
  sections.push(loopsSection(inp));
  sections.push(inp.poles.ok ? polesSection(inp.poles.value) : `<h2>Closed-loop poles</h2>${failed(inp.poles, 'The closed-loop poles')}`);
  sections.push(locusSection(inp));
  if (inp.loops.ok && inp.loops.value.rows.some((r) => r.frequency)) sections.push(frequencySection(inp.loops.value));
  sections.push(responseSection(inp));
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${esc(d.title)} — Loopwright design report</title>
<style>
body{font:14px/1.45 system-ui,-apple-system,'Segoe UI',sans-serif;color:#1d2329;max-width:1000px;margin:24px auto;padding:0 16px}
h1{font-size:22px;margin:0 0 4px}h2{font-size:17px;margin:30px 0 8px;border-bottom:1px solid #d5d9e0;padding-bottom:4px}h3{font-size:14px;margin:18px 0 6px}
table{border-collapse:collapse;margin:8px 0;font-size:12px}th,td{border:1px solid #d5d9e0;padding:3px 7px;text-align:left;vertical-align:top}th{background:#eef0f3}
.caution{border:2px solid #b26a00;background:#fff3dc;padding:10px 14px;border-radius:6px;margin:16px 0}
.diagram svg{max-width:100%;height:auto;border:1px solid #d5d9e0;border-radius:6px}
figure{margin:14px 0}figcaption{margin-top:4px}figure svg{max-width:100%;height:auto}
.note,.meta{color:#5d6670}.ok{color:#1f7a3f}.bad{color:#b3261e}.warn{color:#9a5b00}.act{color:#1d4f91;font-weight:600}
ul.summary li{margin:4px 0}
</style></head><body>
<h1>${esc(d.title)}</h1>
<div class="meta">Loopwright design report · ${esc(inp.generatedAt)} · diagram fingerprint ${esc(inp.fingerprint)}${inp.sweep ? ` · ${esc(inp.sweep.label)} = ${e(inp.sweep.value, 6)}` : ''}</div>
<div class="caution" role="note"><b>Caution.</b> ${esc(SAFETY_CAUTION)}</div>
${sections.join('\n')}
<div class="caution" role="note"><b>Caution.</b> ${esc(SAFETY_CAUTION)}</div>
</body></html>
`;
}
