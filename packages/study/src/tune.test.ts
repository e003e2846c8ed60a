/**
 * Tuning studies on diagrams: the controller of a cut, what it sees, the published rules and
 * the ultimate gain read from the diagram itself, predictions equal to the loops table of the
 * tuned diagram, the document edit, step responses, the cascade workflow and the damping target.
 */
import { describe, expect, it } from 'vitest';
import { characteristicPolynomial, heatingCascade, positioningAxis, supplyLoop, type Diagram } from '@loopwright/graph';
import { cx, loopMargins, parseTransferFunction, polyRoots, tevalComplex, cdiv, cabs, csub } from '@loopwright/lti';
import { controllerTransfer } from '@loopwright/tune';
import { applyControllerPatch, controllerOfCut, controllerPatch, currentSetting, loopBlocks } from './controller-block.ts';
import { configureLoop, readLoop, seenProcess } from './loop-reading.ts';
import { loopStepResponses } from './loop-responses.ts';
import { locusStudy } from './locus.ts';
import { loopsStudy } from './loops.ts';
import { runStudy } from './study.ts';
import { build } from './testing.ts';

/** r → e(+−) → PID → plant → y, unity feedback; cut c1 on the feedback wire; kp, ti as named parameters. */
function pidLoop(plant: string, kp = 1, ti: number | '' = 10, td = 0): Diagram {
  return build(
    [
      ['r', 'source', { shape: 'step', amplitude: 1 }],
      ['e', 'summing-junction', { signs: '+-' }],
      ['c', 'pid', { form: 'ideal', kp: 'Kp', ti: ti === '' ? '' : 'Ti', td, n: 10 }],
      ['g', 'transfer-function', { expression: plant }],
      ['y', 'probe'],
    ],
    ['w1:r->e.in1', 'w2:e->c', 'w3:c->g', 'w4:g->y', 'fb:g->e.in2'],
    [
      { name: 'Kp', value: kp, min: 0.1, max: 10, scale: 'log' },
      ...(ti === '' ? [] : [{ name: 'Ti', value: ti, min: 1, max: 100, scale: 'log' as const }]),
    ],
    { cuts: [{ id: 'c1', wire: 'fb', label: 'loop' }], sweeps: [{ id: 's1', parameter: 'Kp', min: 0.1, max: 10, scale: 'log' }] },
  );
}

describe('the controller of a cut', () => {
  it('is the first PID block after the junction the cut wire enters: the room and supply controllers of the heating cascade', () => {
    expect(controllerOfCut(heatingCascade, 'w-room-feedback', 'cut-room').id).toBe('room-controller');
    expect(controllerOfCut(heatingCascade, 'w-supply-feedback', 'cut-supply').id).toBe('supply-controller');
  });
  it('the loop through a wire holds the blocks of its simple cycles only (not the outer loop back into the inner junction)', () => {
    const inner = loopBlocks(heatingCascade, 'w-supply-feedback');
    expect(inner.has('supply-controller') && inner.has('boiler') && inner.has('pipework')).toBe(true);
    expect(inner.has('room') || inner.has('room-controller')).toBe(false);
  });
  it('a loop without a PID block is refused, naming the cut (the axis position loop has a gain as its controller)', () => {
    expect(() => runStudy(positioningAxis, { kind: 'tune', rule: 'simc', cut: 'cut-position' })).toThrow(
      /cut cut-position: the loop through wire w-position-feedback has no PID controller block/,
    );
  });
});

describe('loop readings', () => {
  it('inner-first opens the same cuts as the loops table (both demos)', () => {
    for (const d of [heatingCascade, positioningAxis]) {
      const rows = loopsStudy(d).rows;
      for (const row of rows) {
        const conf = configureLoop(d, row.cutId, 'inner-first', {});
        expect(conf.opened.map((o) => o.cut).sort(), row.cutId).toEqual([...(row.alone?.opened ?? [])].sort());
      }
    }
  });
  it('what the controller sees is L/C: the loop with a unit gain in its place equals L(jω)/C(jω) (two methods)', () => {
    const d = heatingCascade;
    for (const cut of ['cut-supply', 'cut-room']) {
      const conf = configureLoop(d, cut, 'inner-first', {});
      const b = controllerOfCut(d, conf.cut.wire, cut);
      const L = readLoop(d, conf, {}).L;
      const seen = seenProcess(d, b, conf, {}, 3, L);
      expect(seen.exact).toBe(true);
      const C = controllerTransfer(currentSetting(d, b).setting, currentSetting(d, b).n);
      for (const w of [1e-4, 1e-3, 0.01, 0.05]) {
        const a = tevalComplex(seen.P, cx(0, w));
        const q = cdiv(tevalComplex(L, cx(0, w)), tevalComplex(C, cx(0, w)));
        expect(cabs(csub(a, q)) / cabs(q), `${cut} ω=${w}`).toBeLessThan(1e-8);
      }
    }
  });
  it('read with its outer loop closed, the inner controller sees a process that depends on itself: divided out, and said so', () => {
    const r = runStudy(heatingCascade, { kind: 'tune', rule: 'zn-ultimate', cut: 'cut-supply', reading: 'closed', responses: false });
    expect(r.processExact).toBe(false);
    expect(r.ultimate!.from).toBe('root locus');
    expect(r.notes.join(' ')).toContain('also sits in a loop that stays closed');
    // The rules that need a model refuse the unstable process and point at the inner-first reading.
    expect(() => runStudy(heatingCascade, { kind: 'tune', rule: 'simc', cut: 'cut-supply', reading: 'closed' })).toThrow(
      /read the loop inner-first/,
    );
  });
});

describe('published rules through a cut', () => {
  const fopdt = pidLoop('2*exp(-1*s)/(10*s + 1)');

  it('SIMC PI on 2e^(−s)/(10s+1), τc = θ: Kc = 2.5, τI = 8; GM 3.106, PM 58.35°, Ms 1.609 (Skogestad 2003, SIMC PI rule) [R36 (a)]', () => {
    const r = runStudy(fopdt, { kind: 'tune', rule: 'simc', cut: 'c1', responses: false });
    expect(r.block!.id).toBe('c');
    expect(r.modelFrom).toBe('model');
    expect(r.model).toEqual({ kind: 'fopdt', gain: expect.closeTo(2, 12), timeConstants: [expect.closeTo(10, 10)], deadTime: 1 });
    expect(r.controller.kp).toBeCloseTo(2.5, 10);
    expect(r.controller.ti).toBeCloseTo(8, 10);
    expect(Math.abs(r.predicted.gainMargin! - 3.106)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(r.predicted.phaseMarginDeg! - 58.35)).toBeLessThanOrEqual(0.01);
    expect(Math.abs(r.predicted.peakSensitivity! - 1.609)).toBeLessThanOrEqual(1e-3);
  });
  it('lambda PI with λ = 2: Kc = 5/3, Ti = 10; ωgc = 1/3, PM = 90° − (1/3 rad), GM = 3π/2 (lambda/IMC, Åström & Hägglund 2006 ch. 6, from memory) [R52]', () => {
    const r = runStudy(fopdt, { kind: 'tune', rule: 'lambda', lambda: 2, cut: 'c1', responses: false });
    expect(r.controller.kp).toBeCloseTo(5 / 3, 10);
    expect(r.controller.ti).toBeCloseTo(10, 10);
    expect(r.predicted.gainCrossover).toBeCloseTo(1 / 3, 6);
    expect(r.predicted.phaseMarginDeg).toBeCloseTo(90 - (180 / Math.PI) * (1 / 3), 4);
    expect(r.predicted.gainMargin).toBeCloseTo((3 * Math.PI) / 2, 4);
  });
  it('Ziegler–Nichols ultimate gain from the diagram’s own crossing: 1/(s(s+2)(s+4)) has Ku = 48, ωu = 2√2; PI Kp = 21.6, Ti = Pu/1.2 (Ziegler & Nichols 1942; Ogata Sec. 8-2, from memory) [R34]', () => {
    const d = pidLoop('1/(s*(s + 2)*(s + 4))', 1, 10);
    const r = runStudy(d, { kind: 'tune', rule: 'zn-ultimate', cut: 'c1', responses: false });
    expect(r.ultimate!.from).toBe('frequency response');
    expect(r.ultimate!.ku).toBeCloseTo(48, 6);
    expect(r.ultimate!.omega).toBeCloseTo(2 * Math.SQRT2, 8);
    expect(r.ultimate!.pu).toBeCloseTo((2 * Math.PI) / (2 * Math.SQRT2), 8);
    expect(r.controller.kp).toBeCloseTo(21.6, 6);
    expect(Math.abs(r.controller.ti! - 1.8512)).toBeLessThanOrEqual(1e-4);
    // The same crossing on the diagram's exact root locus of a P controller's gain (Routh: K = 48 at ω = 2√2) [R34].
    const p = pidLoop('1/(s*(s + 2)*(s + 4))', 1, '');
    const locus = locusStudy(p, { target: { kind: 'parameter', name: 'Kp' }, range: { min: 0.1, max: 100, scale: 'log' } });
    const crossing = locus.crossings.find((c) => c.omega > 0)!;
    expect(crossing.gain).toBeCloseTo(r.ultimate!.ku, 6);
    expect(crossing.omega).toBeCloseTo(r.ultimate!.omega, 6);
  });
  it('Ziegler–Nichols ultimate-gain PID on 1/(s(s+1)(s+5)): Kcr = 30, Pcr = 2.8099; Kp = 18, Ti = 1.4050, Td = 0.35124 (Ogata, Example 8-1) [R35]', () => {
    const r = runStudy(pidLoop('1/(s*(s + 1)*(s + 5))'), {
      kind: 'tune',
      rule: 'zn-ultimate',
      controller: 'pid',
      cut: 'c1',
      responses: false,
    });
    expect(r.ultimate!.ku).toBeCloseTo(30, 6);
    expect(Math.abs(r.ultimate!.pu - 2.8099)).toBeLessThanOrEqual(1e-4);
    expect(r.controller.kp).toBeCloseTo(18, 6);
    expect(Math.abs(r.controller.ti! - 1.405)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(r.controller.td - 0.35124)).toBeLessThanOrEqual(1e-5);
  });
  it('the Ms tuner keeps Ms at its bound on the cut’s exact loop, and the GM/PM bounds of that Ms hold (Skogestad & Postlethwaite Sec. 2.4.3, from memory) [R26]', () => {
    const r = runStudy(fopdt, { kind: 'tune', rule: 'ms', msMax: 1.4, cut: 'c1', responses: false });
    expect(r.predicted.peakSensitivity!).toBeLessThanOrEqual(1.4 + 1e-6);
    expect(r.predicted.peakSensitivity!).toBeGreaterThan(1.39);
    expect(r.predicted.gainMargin!).toBeGreaterThanOrEqual(1.4 / 0.4 - 1e-6);
    expect(r.predicted.phaseMarginDeg!).toBeGreaterThanOrEqual((2 * Math.asin(1 / 2.8) * 180) / Math.PI - 1e-6);
  });
});

describe('predictions and the document edit', () => {
  it('predicted margins are those of the loops table for the tuned diagram (outer loop every other loop closed; inner loop inner-first)', () => {
    for (const [cut, rule] of [
      ['cut-room', 'ms'],
      ['cut-supply', 'simc'],
    ] as const) {
      const r = runStudy(heatingCascade, { kind: 'tune', rule, cut, responses: false });
      const tuned = applyControllerPatch(heatingCascade, r.apply!);
      const row = loopsStudy(tuned).rows.find((x) => x.cutId === cut)!;
      const table = row.alone ? row.alone.margins : row.margins;
      for (const k of ['gainMargin', 'phaseMarginDeg', 'delayMargin', 'peakSensitivity'] as const)
        expect(r.predicted[k], `${cut} ${k}`).toBeCloseTo(table[k]!, 9);
    }
  });
  it('the edit keeps parameter names (their values change, ranges widen) and leaves limits alone', () => {
    const r = runStudy(heatingCascade, { kind: 'tune', rule: 'simc', cut: 'cut-supply', tauC: 5, responses: false });
    expect(r.apply!.block).toBe('supply-controller');
    expect(r.apply!.params).toEqual({});
    expect(r.apply!.parameters.Kp_sup).toBeCloseTo(r.controller.kp, 12);
    expect(r.apply!.parameters.Ti_sup).toBeCloseTo(90, 12);
    const tuned = applyControllerPatch(heatingCascade, r.apply!);
    const b = tuned.blocks.find((x) => x.id === 'supply-controller')!;
    expect(b.params).toEqual(heatingCascade.blocks.find((x) => x.id === 'supply-controller')!.params);
    const kp = tuned.parameters.find((p) => p.name === 'Kp_sup')!;
    expect(kp.value).toBe(r.controller.kp);
    expect(kp.value <= kp.max!).toBe(true);
    expect(currentSetting(tuned, b).setting).toEqual(r.controller);
  });
  it('a literal field or a parallel-form block is written with numbers in the ideal form', () => {
    const d = pidLoop('2*exp(-1*s)/(10*s + 1)');
    const c = d.blocks.find((b) => b.id === 'c')!;
    c.params = { form: 'parallel', kp: 3, ki: 1, kd: 0, n: 8 };
    const patch = controllerPatch(d, 'c', { kind: 'pid', kp: 2, ti: 4, td: 0.5 }, 8);
    expect(patch.params).toEqual({ form: 'ideal', kp: 2, ti: 4, td: 0.5 });
    expect(patch.notes[0]).toContain('parallel form');
    const tuned = applyControllerPatch(d, patch);
    expect(
      currentSetting(
        tuned,
        tuned.blocks.find((b) => b.id === 'c')!,
      ),
    ).toEqual({ setting: { kind: 'pid', kp: 2, ti: 4, td: 0.5 }, n: 8 });
  });
});

describe('step responses before and after', () => {
  it('a P loop on e^(−s)/s with K = 0.5 (dead time exact, simulated): y(2) = 0.5, y(3) = 0.875, y(4) = 49/48 by the method of steps (Bellman & Cooke, from memory) [R44]', () => {
    const P = parseTransferFunction('exp(-1*s)/s');
    const setting = { kind: 'p' as const, kp: 0.5, ti: null, td: 0 };
    const L = parseTransferFunction('0.5*exp(-1*s)/s');
    const r = loopStepResponses(null, { setting, n: 10, P, L });
    const at = (t: number) => r.setpoint.after[r.time.findIndex((x) => Math.abs(x - t) < 1e-9)]!;
    expect(r.time.some((t) => Math.abs(t - 4) < 1e-9)).toBe(true);
    expect(Math.abs(at(2) - 0.5)).toBeLessThanOrEqual(1e-5);
    expect(Math.abs(at(3) - 0.875)).toBeLessThanOrEqual(1e-5);
    expect(Math.abs(at(4) - 49 / 48)).toBeLessThanOrEqual(1e-5);
    expect(r.setpoint.before).toBeNull();
  });
  it('PI loops settle at the set-point and reject a load step (final-value theorem: integral action); before and after both drawn', () => {
    const r = runStudy(heatingCascade, { kind: 'tune', rule: 'simc', cut: 'cut-supply' });
    const s = r.responses!;
    const last = (xs: (number | null)[]) => xs[xs.length - 1]!;
    expect(Math.abs(last(s.setpoint.after) - 1)).toBeLessThan(2e-3);
    expect(Math.abs(last(s.setpoint.before!) - 1)).toBeLessThan(2e-3);
    expect(Math.abs(last(s.load.after))).toBeLessThan(2e-3);
    // The load first pushes the output up by at most the process gain times the step (0.8 K per %).
    expect(Math.max(...(s.load.after as number[]))).toBeLessThan(0.8);
    expect(s.status).toEqual({ before: null, after: null });
  });
  it('without a dead time in P the forms are exact rationals: 1/(s+1) with PI kp = 1, ti = 1 gives y = 1 − e^(−t) (L = 1/s)', () => {
    const P = parseTransferFunction('1/(s + 1)');
    const L = parseTransferFunction('1/s');
    const r = loopStepResponses(null, { setting: { kind: 'pi', kp: 1, ti: 1, td: 0 }, n: 10, P, L });
    r.time.forEach((t, i) => expect(Math.abs(r.setpoint.after[i]! - (1 - Math.exp(-t)))).toBeLessThan(1e-9));
    // Load: P/(1 + L) = s/((s + 1)²): y = t·e^(−t).
    r.time.forEach((t, i) => expect(Math.abs(r.load.after[i]! - t * Math.exp(-t))).toBeLessThan(1e-9));
  });
});

describe('model expressions', () => {
  it('tuning a model gives the rule’s numbers and the loop C·P that `margins --loop` reads back (SIMC IPDT, k′ = 1, θ = 1: Kc = 0.5, τI = 8, GM 2.963, PM 46.86°) [R37]', () => {
    const r = runStudy({ ...heatingCascade }, { kind: 'tune', rule: 'simc', model: 'exp(-1*s)/s', responses: false });
    expect(r.source).toBe('model');
    expect(r.controller.kp).toBeCloseTo(0.5, 12);
    expect(r.controller.ti).toBeCloseTo(8, 12);
    expect(Math.abs(r.predicted.gainMargin! - 2.963)).toBeLessThanOrEqual(1e-3);
    expect(Math.abs(r.predicted.phaseMarginDeg! - 46.86)).toBeLessThanOrEqual(0.01);
    const back = loopMargins({ rational: { num: r.loop.num, den: r.loop.den }, delay: r.loop.delay });
    expect(back.phaseMarginDeg).toBeCloseTo(r.predicted.phaseMarginDeg!, 9);
  });
  it('a process the half rule cannot take (complex poles) is reduced by a least-squares fit of its exact step response, and says so', () => {
    const r = runStudy(heatingCascade, { kind: 'tune', rule: 'simc', model: 'exp(-0.5*s)/(s^2 + s + 1)', responses: false });
    expect(r.modelFrom).toBe('step fit');
    expect(r.model!.kind).toBe('fopdt');
    // A least-squares compromise over the overshoot, near the static gain 1 of 1/(s² + s + 1).
    expect(Math.abs(r.model!.gain - 1)).toBeLessThan(0.05);
    expect(r.model!.deadTime).toBeGreaterThan(0.5);
    expect(r.notes[0]).toMatch(/least-squares fit of its exact step response/);
  });
});

describe('cascade workflow', () => {
  it('tunes the supply loop first, then the room loop with the tuned supply loop closed; separation read on the tuned diagram', () => {
    const r = runStudy(heatingCascade, { kind: 'cascade', rule: 'simc' });
    expect(r.steps.map((s) => s.cut)).toEqual(['cut-supply', 'cut-room']);
    expect(r.steps.every((s) => s.result.ok)).toBe(true);
    const tuned = r.apply.reduce(applyControllerPatch, heatingCascade);
    const table = loopsStudy(tuned);
    expect(r.separations).toEqual(table.separations);
    for (const f of r.final)
      expect(f.margins.phaseMarginDeg).toBeCloseTo(table.rows.find((x) => x.cutId === f.cut)!.margins.phaseMarginDeg!, 9);
    // The room step was read with the tuned supply loop in place.
    const room = r.steps[1].result;
    if (!room.ok) throw new Error(room.error);
    const again = runStudy(applyControllerPatch(heatingCascade, r.apply[0]), {
      kind: 'tune',
      rule: 'simc',
      cut: 'cut-room',
      responses: false,
    });
    expect(room.value.controller.kp).toBeCloseTo(again.controller.kp, 9);
    // A separation below 3 is flagged in the notes.
    for (const s of r.separations) if (s.flag) expect(r.notes.some((n) => n.includes(s.inner))).toBe(true);
  });
  it('a loop that cannot be tuned fails on its own and the others are tuned, innermost first (positioning axis: the current loop has no dead time for SIMC’s τc = θ; the position controller is a gain)', () => {
    const r = runStudy(positioningAxis, { kind: 'cascade', rule: 'simc' });
    expect(r.steps.map((s) => [s.cut, s.depth])).toEqual([
      ['cut-current', 2],
      ['cut-speed', 1],
      ['cut-position', 0],
    ]);
    expect(r.steps.map((s) => s.result.ok)).toEqual([false, true, false]);
    const first = r.steps[0].result;
    expect(first.ok ? '' : first.error).toContain('no dead time');
    const last = r.steps[2].result;
    expect(last.ok ? '' : last.error).toContain(
      'cut cut-position: the loop through wire w-position-feedback has no PID controller block (between its junction and the next one: position-controller, to-motor-speed)',
    );
    expect(r.apply.map((p) => p.block)).toEqual(['speed-controller']);
  });
});

describe('gain for a target damping on the sweep', () => {
  it('with a PI the slow real pole beside its zero stays to the right: the slowest oscillating pair is taken, and the note says so (supply loop demo)', () => {
    const r = runStudy(supplyLoop, { kind: 'damping', target: { kind: 'parameter', name: 'Kp' }, zeta: 0.7 });
    expect(r.dominance).toBe('oscillatory');
    expect(-r.pole!.re / Math.hypot(r.pole!.re, r.pole!.im)).toBeCloseTo(0.7, 8);
    expect(r.notes[0]).toMatch(/slowest oscillating one; real pole at .* lies to its right/);
    // The same pole among the closed-loop poles of the diagram at that value (graph's own polynomial, same Padé order).
    const poles = polyRoots(characteristicPolynomial(supplyLoop, { Kp: r.value! }, { padeOrder: 3 }).poly);
    expect(Math.min(...poles.map((p) => Math.hypot(p.re - r.pole!.re, p.im - r.pole!.im)))).toBeLessThan(
      1e-6 * Math.hypot(r.pole!.re, r.pole!.im),
    );
  });

  it('K/(s(s+2)): s² + 2s + K has ζ = 1/√K, so ζ = 0.7 needs K = 1/0.49 (Ogata Sec. 6-2, damping lines, from memory)', () => {
    const d = build(
      [
        ['r', 'source', {}],
        ['e', 'summing-junction', { signs: '+-' }],
        ['k', 'gain', { k: 'K' }],
        ['g', 'transfer-function', { expression: '1/(s*(s + 2))' }],
        ['y', 'probe'],
      ],
      ['r->e.in1', 'e->k', 'k->g', 'g->y', 'fb:g->e.in2'],
      [{ name: 'K', value: 1, min: 0.1, max: 10 }],
    );
    const r = runStudy(d, { kind: 'damping', target: { kind: 'parameter', name: 'K' }, zeta: 0.7 });
    expect(r.value).toBeCloseTo(1 / 0.49, 10);
    expect(r.pole!.re).toBeCloseTo(-1, 10);
    expect(r.pole!.im).toBeCloseTo(Math.sqrt(1 / 0.49 - 1), 9);
  });
});
