/** Simulation runs through the study: settings from request, diagram or engine; actuators from the catalogue; figures. */
import { describe, expect, it } from 'vitest';
import { catalogue } from '@loopwright/graph';
import { actuatorsOf, automaticEnd, responsePanels, responseStudy, runSettings, shownProbes } from './run.ts';
import { runStudies, type StudyProgress } from './study.ts';
import { build, unityLoop } from './testing.ts';

describe('runs', () => {
  it('4/(s(s+2)) in unity feedback follows y = 1 − e^(−t)(cos √3t + sin √3t/√3), overshoot 16.30 % (ζ = 0.5) [R20, R17]', () => {
    const r = responseStudy(unityLoop(4), { until: 8, linearOverlay: true });
    const exact = (t: number) => 1 - Math.exp(-t) * (Math.cos(Math.sqrt(3) * t) + Math.sin(Math.sqrt(3) * t) / Math.sqrt(3));
    const { time, traces } = r.run;
    for (let i = 0; i < time.length; i += 25) expect(traces.y[i]).toBeCloseTo(exact(time[i]), 4);
    // No nonlinearity in this diagram: the linear overlay is the same run.
    for (let i = 0; i < time.length; i += 25) expect(r.linear!.traces.y[i]).toBeCloseTo(traces.y[i], 6);
    expect(r.metrics.find((m) => m.probe === 'y')!.overshootPct!).toBeCloseTo(100 * Math.exp((-Math.PI * 0.5) / Math.sqrt(0.75)), 1);
    expect(r.settings).toMatchObject({ until: 8, untilFrom: 'request' });
  });

  it("settings: the request, else the diagram's simulation settings, else the engine (six time constants of the slowest pole, 1-2-5 grid)", () => {
    const d = unityLoop(0.5);
    const auto = automaticEnd(d);
    // Slowest pole −1 + √0.5: 6/0.2929 = 20.5 s, rounded up to 50 (1-2-5 series).
    expect(auto).toBe(50);
    expect(runSettings(d)).toMatchObject({ until: 50, untilFrom: 'automatic', rtol: 1e-6, atol: 1e-9, outputStep: 0.05 });
    d.simulation = { end: 12, rtol: 1e-5 };
    expect(runSettings(d)).toMatchObject({ until: 12, untilFrom: 'diagram', rtol: 1e-5, atol: 1e-9 });
    expect(runSettings(d, { until: 3, atol: 1e-8 })).toMatchObject({ until: 3, untilFrom: 'request', rtol: 1e-5, atol: 1e-8 });
    expect(() => runSettings(d, { until: -1 })).toThrow(/end time/);
  });

  it("a caller's deadline bounds the run: it stops with status budget and the partial traces, never hangs", () => {
    // A step budget far beyond reach, so that the deadline (not the projected step count) stops it.
    const r = responseStudy(unityLoop(4), { until: 1e6, step: 1, maxSteps: 1e9 }, { deadline: performance.now() + 30 });
    expect(r.run.status).toBe('budget');
    expect(r.run.timeReached).toBeLessThan(1e6);
    expect(r.run.time.length).toBeGreaterThan(0);
  });

  it("probes shown: the asked list, else the diagram's, else every probe; an unknown asked probe is refused", () => {
    const d = build(
      [
        ['r', 'source'],
        ['a', 'probe'],
        ['b', 'probe'],
      ],
      ['r->a', 'r->b'],
    );
    expect(shownProbes(d)).toEqual(['a', 'b']);
    d.simulation = { probes: ['b', 'gone'] };
    expect(shownProbes(d)).toEqual(['b']);
    expect(shownProbes(d, 'all')).toEqual(['a', 'b']);
    expect(() => shownProbes(d, ['zz'])).toThrow(/"zz" is not a probe/);
  });

  it('actuators are the blocks whose catalogue spec says they limit their output (a PID only with a limit set)', () => {
    const d = build(
      [
        ['r', 'source'],
        ['sat', 'saturation', { lower: -2, upper: 3 }],
        ['pidL', 'pid', { kp: 1, ti: 1, umin: '', umax: 5 }],
        ['pidN', 'pid', { kp: 1, ti: 1 }],
        ['rl', 'rate-limit', { rising: 1, falling: 2 }],
        ['y', 'probe'],
      ],
      ['r->sat', 'o1:sat->pidL', 'o2:pidL->pidN', 'o3:pidN->rl', 'o4:rl->y'],
    );
    const acts = actuatorsOf(d);
    expect(acts.map((a) => [a.block, a.key, a.lower, a.upper])).toEqual([
      ['sat', 'wire:o1', -2, 3],
      ['pidL', 'wire:o2', null, 5],
      ['rl', 'wire:o4', null, null],
    ]);
    // Every kind the catalogue marks, and only those, can be an actuator.
    const marked = catalogue
      .filter((s) => s.actuator)
      .map((s) => s.kind)
      .sort();
    expect(marked).toEqual(['pid', 'rate-limit', 'saturation']);
    // A run records the actuator signals and reports their figures.
    const r = responseStudy(d, { until: 5 });
    expect(Object.keys(r.run.traces).sort()).toEqual(['wire:o1', 'wire:o2', 'wire:o4', 'y']);
    expect(r.metrics.find((m) => m.probe === 'wire:o4')!.timeInSaturation).toBeGreaterThan(0);
  });
});

describe('response panels and progress', () => {
  it('probes of one unit share a panel, in the order of their first probe; a probe without a unit has its own', () => {
    const probes = [
      { id: 'pos', label: 'position', unit: 'mm' },
      { id: 'spd', label: 'speed', unit: 'rad/s' },
      { id: 'ref', label: 'setpoint', unit: 'mm' },
      { id: 'x', label: 'x', unit: null },
      { id: 'z', label: 'z', unit: null },
    ];
    expect(responsePanels(probes, ['pos', 'spd', 'ref', 'x', 'z'])).toEqual([
      { unit: 'mm', probes: ['pos', 'ref'] },
      { unit: 'rad/s', probes: ['spd'] },
      { unit: null, probes: ['x'] },
      { unit: null, probes: ['z'] },
    ]);
    expect(responsePanels(probes, ['spd', 'gone'])).toEqual([{ unit: 'rad/s', probes: ['spd'] }]);
  });

  it("a run says its probes' units (the probe block's unit field)", () => {
    const d = unityLoop(4);
    d.blocks.find((b) => b.id === 'y')!.params.unit = ' rad ';
    expect(responseStudy(d, { until: 1 }).probes).toEqual([{ id: 'y', label: 'y', unit: 'rad' }]);
  });

  it('progress: each part is announced, a run reports rising fractions to 1 (its overlay included)', () => {
    const seen: StudyProgress[] = [];
    runStudies(unityLoop(4), [{ kind: 'poles' }, { kind: 'run', until: 5, linearOverlay: true }], { onProgress: (p) => seen.push(p) });
    expect(seen[0]).toEqual({ part: 0, parts: 2, kind: 'poles', fraction: null });
    const run = seen.filter((p) => p.part === 1 && p.fraction !== null).map((p) => p.fraction!);
    for (let i = 1; i < run.length; i++) expect(run[i]).toBeGreaterThanOrEqual(run[i - 1]);
    expect(run[run.length - 1]).toBe(1);
    // The run as drawn fills the first half (it ends at 0.5), the linear overlay the second.
    expect(run).toContain(0.5);
    expect(run.some((f) => f > 0.5 && f < 1)).toBe(true);
  });
});
