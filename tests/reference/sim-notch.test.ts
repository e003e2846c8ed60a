import { compileModel, simulate } from '@loopwright/sim';
import { describe, expect, it } from 'vitest';
import { buildDiagram } from '@loopwright/sim/testing';

// A sinusoid through the second-order notch N(s) = (s² + 2ζz·ωn·s + ωn²)/(s² + 2ζp·ωn·s + ωn²)
// (Franklin, Powell & Emami-Naeini, frequency-response design; Ellis, filters chapter — both from
// memory). In steady state the output is |N(jω)|·sin(ωt + ∠N(jω)) (the frequency-response
// theorem, e.g. Ogata, Sec. 8-1, from memory); at ω = ωn, N(jωn) = ζz/ζp exactly (real), so the
// output settles to 10^(depth/20)·sin(ωn·t). The transient decays as e^(−ζp·ωn·t).
for (const engine of ['exact', 'odex'] as const) {
  describe(`notch filter in simulation (${engine} engine)`, () => {
    const f = 5; // Hz
    const wn = 2 * Math.PI * f;
    const zp = 0.3;
    const run = (omega: number, depth: number) =>
      simulate(
        compileModel(
          buildDiagram(
            [
              ['r', 'source', { shape: 'sinusoid', amplitude: 1, omega, start: 0 }],
              ['n', 'notch', { frequency: f, frequencyUnit: 'Hz', depth, damping: zp }],
              ['y', 'probe'],
            ],
            ['r -> n', 'n -> y'],
          ),
        ),
        { until: 4, rtol: 1e-10, atol: 1e-12, outputStep: 0.001, engine },
      );

    it('a sinusoid at ωn settles to the depth, in phase with the input', () => {
      for (const depth of [-20, -40]) {
        const res = run(wn, depth);
        expect(res.engine).toBe(engine);
        const g = 10 ** (depth / 20);
        let worst = 0;
        let peak = 0;
        res.time.forEach((t, i) => {
          if (t < 2.5) return; // e^(−ζp·ωn·2.5) ≈ 5e-11 of the transient left
          worst = Math.max(worst, Math.abs(res.traces.y[i] - g * Math.sin(wn * t)));
          peak = Math.max(peak, Math.abs(res.traces.y[i]));
        });
        expect(worst).toBeLessThan(engine === 'exact' ? 1e-9 : 1e-7);
        expect(Math.abs(peak - g)).toBeLessThan(1e-4 * g + 1e-7); // sampled every 1 ms: the crest within 1e-4 relative
      }
    });

    it('a sinusoid a decade above passes with |N(jω)| and ∠N(jω) from the analytic form', () => {
      const w = 10 * wn;
      const zz = zp * 10 ** (-20 / 20);
      const a = wn * wn - w * w;
      // N(jω) = (a + j·bz)/(a + j·bp)
      const bz = 2 * zz * wn * w;
      const bp = 2 * zp * wn * w;
      const mag = Math.hypot(a, bz) / Math.hypot(a, bp);
      const phase = Math.atan2(bz, a) - Math.atan2(bp, a);
      const res = run(w, -20);
      res.time.forEach((t, i) => {
        if (t >= 2.5) expect(Math.abs(res.traces.y[i] - mag * Math.sin(w * t + phase))).toBeLessThan(engine === 'exact' ? 1e-9 : 1e-7);
      });
    });
  });
}
