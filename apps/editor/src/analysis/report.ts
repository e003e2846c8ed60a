/**
 * The design report: one self-contained HTML file (no scripts, no external resources) with
 * the diagram picture, the parameters, the loops table, the response metrics, every chart as
 * inline SVG, and the safety caution.
 */
import type { Diagram } from '@loopwright/graph';
import type { AnalysisResult } from './results-store.ts';
import type { LoopsData, Part, ResponseResult } from '@loopwright/study';
import { echarts, type ChartOption } from '../views/echarts-setup.ts';
import { locusBox, locusOption } from '../views/locus-option.ts';
import { bodeOption, nyquistOption, sensitivityOption } from '../views/frequency-option.ts';
import { actuatorOption, responseOption } from '../views/response-option.ts';
import { palette } from '../views/palette.ts';
import { LOOP_COLUMNS } from '../views/loop-columns.ts';
import { keyPoints, planeWindow } from './locus-geometry.ts';
import { diagramSvg } from './diagram-svg.ts';
import { fmt } from './sweep.ts';

export const SAFETY_CAUTION =
  'Results are design aids. Where a loop drives machinery, heat or pressure, validate the design on the real plant with limits and interlocks in place, and defer to the applicable functional-safety standards, local codes and licensed practice.';

const esc = (s: string): string => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** An option rendered to SVG text by a throw-away server-side SVG instance. */
export function optionSvg(option: ChartOption, width: number, height: number): string {
  const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width, height });
  try {
    chart.setOption({ ...(option as object), animation: false });
    return chart.renderToSVGString();
  } finally {
    chart.dispose();
  }
}

export interface ReportInput {
  diagram: Diagram;
  sweepLabel: string | null;
  sweepValue: number | null;
  analysis: AnalysisResult | null;
  loops: Part<LoopsData> | null;
  response: ResponseResult | null;
  generatedAt: Date;
}

export function reportCharts(inp: ReportInput): { title: string; svg: string }[] {
  const pal = palette(false);
  const out: { title: string; svg: string }[] = [];
  const a = inp.analysis;
  const locus = a?.locus?.ok ? a.locus.value : null;
  const poles = a?.poles.ok ? a.poles.value.poles : [];
  if (locus || poles.length) {
    const [w, h] = [720, 480];
    const box = locusBox(w, h);
    const win = planeWindow(box, keyPoints(locus, locus ? [] : poles), locus?.branches ?? []);
    out.push({
      title: 'Locus',
      svg: optionSvg(
        locusOption({ locus, current: poles, pinned: null, win, pal, dampingGuides: true, frequencyGuides: false, parameterLabel: inp.sweepLabel ?? '—', hover: null }),
        w,
        h,
      ),
    });
  }
  const f = a?.frequency?.ok ? a.frequency.value : null;
  if (f) {
    out.push({ title: 'Bode', svg: optionSvg(bodeOption(f, null, pal), 720, 460) });
    out.push({ title: 'Nyquist', svg: optionSvg(nyquistOption(f, null, pal, { width: 520, height: 440 }), 520, 440) });
    out.push({ title: '|S| and |T|', svg: optionSvg(sensitivityOption(f, null, pal), 720, 360) });
  }
  const r = inp.response;
  if (r) {
    out.push({ title: 'Response', svg: optionSvg(responseOption(r, r.probes.map((p) => p.id), null, pal), 720, 400) });
    if (r.actuators.length) out.push({ title: 'Actuator', svg: optionSvg(actuatorOption(r, null, pal), 720, 360) });
  }
  return out;
}

function table(head: string[], rows: string[][]): string {
  return `<table><thead><tr>${head.map((h) => `<th>${esc(h)}</th>`).join('')}</tr></thead><tbody>${rows
    .map((r) => `<tr>${r.map((c) => `<td>${esc(c)}</td>`).join('')}</tr>`)
    .join('')}</tbody></table>`;
}

export function designReportHtml(inp: ReportInput): string {
  const d = inp.diagram;
  const a = inp.analysis;
  const sections: string[] = [];
  sections.push(`<h2>Diagram</h2><div class="diagram">${diagramSvg(d)}</div>`);
  if (d.description) sections.push(`<p>${esc(d.description)}</p>`);

  sections.push('<h2>Parameters</h2>');
  const params = d.parameters.map((p) => [p.name, fmt(p.value, 6), p.unit ?? '', p.description ?? '']);
  sections.push(params.length ? table(['name', 'value', 'unit', 'description'], params) : '<p>No named parameters.</p>');
  if (inp.sweepLabel) sections.push(`<p>Sweep: <b>${esc(inp.sweepLabel)}</b> = ${esc(fmt(inp.sweepValue, 6))}${a?.locus?.ok ? ` (${a.locus.value.mode} locus)` : ''}.</p>`);
  const blocks = d.blocks.map((b) => [b.id, b.label ?? '', b.kind, Object.entries(b.params).map(([k, v]) => `${k}=${String(v)}`).join(', ')]);
  sections.push(table(['block', 'label', 'kind', 'parameters'], blocks));

  sections.push('<h2>Loops</h2>');
  if (inp.loops?.ok) {
    const L = inp.loops.value;
    sections.push(`<p>Whole diagram: <b>${L.stable ? 'stable' : 'UNSTABLE'}</b> (judged from the closed-loop poles).</p>`);
    sections.push(
      table(
        ['loop (cut)', 'wire', ...LOOP_COLUMNS.map((c) => c.label), 'closed loop'],
        L.rows.map((r) => [
          r.label + (r.auto ? ' (proposed)' : ''),
          r.wire,
          ...LOOP_COLUMNS.map((c) => {
            const v = r.margins[c.field] as number | null;
            return v === null && (c.field === 'gainMarginDb' || c.field === 'delayMargin') ? '∞' : fmt(v);
          }),
          r.margins.closedLoopStable ? 'stable' : 'UNSTABLE',
        ]),
      ),
    );
    if (L.separations.length) {
      sections.push(table(['inner', 'outer', 'ratio', 'basis', 'note'], L.separations.map((s) => [s.inner, s.outer, s.ratio === null ? '—' : `${fmt(s.ratio, 3)}×`, s.basis, (s.flag ? '⚠ ' : '') + s.note])));
    }
    for (const o of L.outerVsIdeal) {
      sections.push(
        table(
          [`outer loop ${o.outer}`, 'crossover [rad/s]', 'phase margin [°]', 'gain margin [dB]', 'Ms'],
          [
            [`with the real inner loop ${o.inner}`, fmt(o.realMargins?.gainCrossover), fmt(o.realMargins?.phaseMarginDeg), o.realMargins?.gainMarginDb === null ? '∞' : fmt(o.realMargins?.gainMarginDb), fmt(o.realMargins?.peakSensitivity)],
            ['with an ideal inner loop', fmt(o.idealMargins?.gainCrossover), fmt(o.idealMargins?.phaseMarginDeg), o.idealMargins?.gainMarginDb === null ? '∞' : fmt(o.idealMargins?.gainMarginDb), fmt(o.idealMargins?.peakSensitivity)],
          ],
        ),
      );
    }
    for (const n of L.notes) sections.push(`<p class="note">${esc(n)}</p>`);
  } else {
    sections.push(`<p>${esc(inp.loops && !inp.loops.ok ? inp.loops.error : 'not computed')}</p>`);
  }
  if (a?.poles.ok) {
    const P = a.poles.value;
    // Poles of a Padé approximant are said to be so (DelayHandling note; PoleOrigin per pole).
    const mark = (i: number) => (P.origin[i] === 'approximant' ? ' (Padé)' : P.origin[i] === 'approximated' ? ' (approx.)' : '');
    sections.push(`<p>Closed-loop poles: ${P.poles.map((p, i) => esc(`${fmt(p.re)}${p.im ? ` ${p.im < 0 ? '−' : '+'} j${fmt(Math.abs(p.im))}` : ''}${mark(i)}`)).join(', ')}</p>`);
    if (P.delayHandling.mode === 'pade') sections.push(`<p class="note">${esc(P.delayHandling.note)}: poles marked (approx.) approximate true roots; (Padé) ones belong to the approximation.</p>`);
  }

  const r = inp.response;
  if (r) {
    sections.push('<h2>Response</h2>');
    sections.push(`<p>Simulated to ${esc(fmt(r.until))} s: ${esc(r.run.message)}.</p>`);
    sections.push(
      table(
        ['signal', 'rise time [s]', 'overshoot [%]', 'settling [s]', 'steady state', 'steady-state error', 'IAE', 'time at limit [s]', 'peak effort'],
        r.metrics.map((m) => [m.label, fmt(m.riseTime), fmt(m.overshootPct), fmt(m.settlingTime), fmt(m.steadyState), fmt(m.steadyStateError), fmt(m.iae), fmt(m.timeInSaturation), fmt(m.peakEffort)]),
      ),
    );
  }

  sections.push('<h2>Charts</h2>');
  for (const c of reportCharts(inp)) sections.push(`<figure><figcaption>${esc(c.title)}</figcaption>${c.svg}</figure>`);

  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><title>${esc(d.title)} — Loopwright design report</title>
<style>
body{font:14px/1.45 system-ui,-apple-system,'Segoe UI',sans-serif;color:#1d2329;max-width:980px;margin:24px auto;padding:0 16px}
h1{font-size:22px;margin:0 0 4px}h2{font-size:16px;margin:28px 0 8px;border-bottom:1px solid #d5d9e0;padding-bottom:4px}
table{border-collapse:collapse;margin:8px 0;font-size:12px}th,td{border:1px solid #d5d9e0;padding:3px 7px;text-align:left;vertical-align:top}th{background:#eef0f3}
.caution{border:2px solid #b26a00;background:#fff3dc;padding:10px 14px;border-radius:6px;margin:16px 0}
.diagram svg{max-width:100%;height:auto;border:1px solid #d5d9e0;border-radius:6px}
figure{margin:16px 0}figcaption{font-weight:600;margin-bottom:4px}figure svg{max-width:100%;height:auto}
.note{color:#5d6670}.meta{color:#5d6670}
</style></head><body>
<h1>${esc(d.title)}</h1>
<div class="meta">Loopwright design report · ${esc(inp.generatedAt.toISOString())}</div>
<div class="caution" role="note"><b>Caution.</b> ${esc(SAFETY_CAUTION)}</div>
${sections.join('\n')}
<div class="caution" role="note"><b>Caution.</b> ${esc(SAFETY_CAUTION)}</div>
</body></html>
`;
}
