/**
 * The design report (issue 11 items 1, 5, 9 and the report command): one self-contained HTML
 * file built from study results only, on a scenario of our own (a three-loop furnace cascade
 * with dead times); its SVG charts (ticks, thinning that keeps peaks); the diagram picture with
 * nested feedback wires on separate lanes.
 */
import { describe, expect, it } from 'vitest';
import { loopsStudy } from '../loops.ts';
import { polesStudy } from '../poles.ts';
import { reportStudy } from './report.ts';
import { SAFETY_CAUTION } from './html.ts';
import { PLOT_MARGIN, plotSvg, ticks } from './svg-plot.ts';
import { diagramSvg } from './diagram-svg.ts';
import { furnaceCascade, unityLoop } from '../testing.ts';

describe('the design report', () => {
  const d = furnaceCascade();
  const r = reportStudy(d, { generatedAt: 'fixed date' });
  const html = r.html;

  it('is one self-contained HTML file with the caution, every part computed and the charts inline', () => {
    expect(r.problems).toEqual([]);
    expect(html.startsWith('<!doctype html>')).toBe(true);
    expect(html).not.toMatch(/<script|(src|href)="https?:/);
    expect(html.split(SAFETY_CAUTION).length - 1).toBe(2);
    for (const h of ['Summary', 'Diagram', 'Loops', 'Closed-loop poles', 'Locus', 'Frequency response of each loop', 'Response'])
      expect(html).toContain(`<h2>${h}</h2>`);
    // The diagram, the locus, two real-vs-ideal pairs, three loops × (Bode, Nyquist, |S||T|), the response.
    expect((html.match(/<svg/g) ?? []).length).toBe(1 + 1 + 2 + 9 + 1);
    // Clip-path ids are unique across the page.
    const ids = [...html.matchAll(/<clipPath id="([^"]+)"/g)].map((m) => m[1]);
    expect(new Set(ids).size).toBe(ids.length);
  });

  it('is reproducible: the same diagram and date give the same bytes', () => {
    expect(reportStudy(d, { generatedAt: 'fixed date' }).html).toBe(html);
  });

  it('names each loop by its one name, gives both readings with the RHP counts, and says which to act on', () => {
    const L = loopsStudy(d);
    for (const row of L.rows) {
      expect(html).toContain(`<b>${row.label}</b>`);
      expect(html).toContain(row.advice.text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;'));
    }
    // Two enclosed loops read inner-first: two "act on this" marks there, one on the outermost.
    expect((html.match(/◀ act on this/g) ?? []).length).toBe(L.rows.length);
    expect(html).toContain('open-loop RHP poles of L');
    // Cut ids never appear as loop names where the cuts have labels.
    expect(html).not.toMatch(/<td>cut-(flow|zone|load)<\/td>/);
  });

  it('marks every closed-loop pole that comes from a Padé approximant', () => {
    const P = polesStudy(d);
    expect(P.delayHandling.mode).toBe('pade');
    const artefacts = P.poles.filter((p, i) => P.origin[i] === 'approximant' && p.im >= 0).length;
    const approximated = P.poles.filter((p, i) => P.origin[i] === 'approximated' && p.im >= 0).length;
    expect(artefacts).toBeGreaterThan(0);
    const section = html.slice(html.indexOf('<h2>Closed-loop poles</h2>'), html.indexOf('<h2>Locus</h2>'));
    expect((section.match(/Padé artefact, not a plant pole/g) ?? []).length).toBe(artefacts);
    expect((section.match(/approximates a true root \(Padé\)/g) ?? []).length).toBe(approximated);
  });

  it('gives parameter values as the Parameters panel shows them: 5e-5 reads 50e-6, never 5.00000e-5 or 0.000', () => {
    const small = reportStudy(unityLoop(5e-5, '1/(s*(s + 2))', { min: 1e-5, max: 1e-3 }), { generatedAt: 'x' }).html;
    const section = small.slice(small.indexOf('<h2>Parameters</h2>'), small.indexOf('<h2>Loops</h2>'));
    expect(section).toContain('<td>K</td><td>50e-6</td>');
  });

  it('a part that cannot be computed is said so; the rest is still reported', () => {
    const bad = unityLoop(2);
    bad.wires.push({ id: 'twice', from: { block: 'r', port: 'out' }, to: { block: 'k', port: 'in' } });
    const b = reportStudy(bad, { generatedAt: 'x' });
    expect(b.problems.length).toBeGreaterThan(0);
    expect(b.html).toMatch(/The loops table not computed: /);
    expect(b.html).toContain('<h2>Findings</h2>');
    expect(b.html).toContain(SAFETY_CAUTION);
  });
});

describe('SVG charts', () => {
  it('ticks: 1-2-5 steps on a linear axis, decades on a log axis', () => {
    expect(ticks({ scale: 'linear', min: 0, max: 1, label: '' })).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1].map((v) => expect.closeTo(v, 12)));
    expect(ticks({ scale: 'linear', min: -3, max: 7, label: '' })).toEqual([-2, 0, 2, 4, 6]);
    expect(ticks({ scale: 'log', min: 0.01, max: 1000, label: '' })).toEqual([0.01, 0.1, 1, 10, 100, 1000]);
    expect(ticks({ scale: 'log', min: 1, max: 50, label: '' })).toEqual([1, 2, 5, 10, 20, 50]);
  });

  it('a long series is thinned per pixel column but keeps its peak', () => {
    const n = 20000;
    const x = Array.from({ length: n }, (_, i) => i / (n - 1));
    const y = x.map((t, i) => (i === 12345 ? 10 : Math.sin(6 * t)));
    const svg = plotSvg(
      [
        {
          x: { scale: 'linear', min: 0, max: 1, label: 't' },
          y: { scale: 'linear', min: -1, max: 10, label: 'y' },
          series: [{ name: 'y', x, y, color: '#000' }],
          height: 300,
        },
      ],
      { width: 600, id: 't' },
    );
    const points = /<polyline points="([^"]+)"/.exec(svg)![1].split(' ');
    expect(points.length).toBeLessThan(n / 4);
    // The top of the box is y = 10 (one legend row leaves the default top margin): the spike reaches it.
    const ys = points.map((p) => Number(p.split(',')[1]));
    expect(Math.min(...ys)).toBeCloseTo(PLOT_MARGIN.top, 0);
  });
});

describe('the diagram picture', () => {
  it('nested feedback wires run on lanes of their own, and their cut marks sit apart', () => {
    const d = furnaceCascade();
    const svg = diagramSvg(d);
    const backLows = d.cuts.map((c) => {
      const w = d.wires.find((x) => x.id === c.wire)!;
      const label = svg.indexOf(`>${c.label}</text>`);
      expect(label, `cut mark ${c.label}`).toBeGreaterThan(0);
      const line = svg.lastIndexOf('<line', label);
      const y = Number(/y1="([-\d.]+)"/.exec(svg.slice(line))![1]);
      return { wire: w.id, y };
    });
    expect(new Set(backLows.map((b) => b.y)).size).toBe(3);
  });
});
