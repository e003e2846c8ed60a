import { describe, expect, it } from 'vitest';
import { cabs, cx, poly, polyRoots, tfFromCoefficients } from '@loopwright/lti';
import { holdEquivalent } from './hold.ts';
import { equivalentDamping, sampledLocus, unitCircleCrossings, zPlaneGuides, zPlaneLocus } from './zlocus.ts';

const fd = poly.fromDescending;

describe('z-plane locus', () => {
  const G = holdEquivalent(tfFromCoefficients([1], fd([1, 3, 2, 0])), 0.2);
  const loc = zPlaneLocus(G);
  it('every crossing is a root of D + k·N on the unit circle', () => {
    expect(loc.crossings.length).toBeGreaterThan(0);
    for (const c of loc.crossings) {
      expect(Math.abs(cabs(c.z) - 1)).toBeLessThanOrEqual(1e-12);
      const roots = polyRoots(poly.add(G.rational.den, poly.scale(G.rational.num, c.gain)));
      expect(Math.min(...roots.map((r) => Math.hypot(r.re - c.z.re, r.im - c.z.im)))).toBeLessThanOrEqual(1e-7);
      expect(c.omega).toBeCloseTo(c.theta / 0.2, 12);
    }
  });
  it('traced branch points satisfy the characteristic equation and the trace reaches past the critical gain', () => {
    for (const br of loc.branches) {
      for (const p of br) {
        const v = poly.evalComplex(poly.add(G.rational.den, poly.scale(G.rational.num, p.k)), p.s);
        const scale = poly.evalComplex(G.rational.den, cx(cabs(p.s) + 1)).re;
        expect(Math.hypot(v.re, v.im)).toBeLessThanOrEqual(1e-8 * Math.abs(scale));
      }
    }
    expect(loc.kRange[1]).toBeGreaterThan(loc.criticalGain!);
    expect(loc.plane).toBe('z');
  });
  it('stable gain ranges: poles inside the circle within, a pole outside just beyond', () => {
    expect(loc.stableGainRanges[0].from).toBe(0);
    const kc = loc.criticalGain!;
    const inside = (k: number) => polyRoots(poly.add(G.rational.den, poly.scale(G.rational.num, k))).every((r) => cabs(r) < 1);
    expect(inside(0.999 * kc)).toBe(true);
    expect(inside(1.001 * kc)).toBe(false);
  });
  it('the negative-gain locus has no stable range here (the integrator pole leaves through z = 1)', () => {
    const neg = zPlaneLocus(G, { negative: true });
    expect(neg.stableGainRanges).toEqual([]);
    expect(neg.criticalGain).toBeNull();
    expect(neg.crossings.every((c) => c.gain < 0)).toBe(true);
  });
  it('sampledLocus builds the pulse transfer function with the computation delay (one sample lowers the critical gain)', () => {
    const plant = tfFromCoefficients([1], fd([1, 3, 2, 0]));
    const a = sampledLocus({ plant, sampleTime: 0.2 });
    const b = sampledLocus({ plant, sampleTime: 0.2, computeDelay: 1 });
    expect(b.criticalGain!).toBeLessThan(a.criticalGain!);
    expect(b.poles.length).toBe(a.poles.length + 1);
  });
  it('unitCircleCrossings of 1 + k/(z − 0.5): k = −0.5 at z = 1 and k = 1.5 at z = −1 (k = −D/N there)', () => {
    const cs = unitCircleCrossings([1], [-0.5, 1], 1);
    expect(cs).toHaveLength(2);
    const byTheta = Object.fromEntries(cs.map((c) => [c.theta, c.gain]));
    expect(byTheta[0]).toBeCloseTo(-0.5, 14);
    expect(byTheta[Math.PI]).toBeCloseTo(1.5, 14);
  });
});

describe('ζ and ωn guides', () => {
  const T = 0.1;
  const g = zPlaneGuides(T);
  it('the unit circle has |z| = 1', () => {
    for (const z of g.unitCircle) expect(Math.abs(cabs(z) - 1)).toBeLessThanOrEqual(1e-15);
  });
  it('points of a constant-ζ curve map back (s = ln z/T) to that ζ; points of a constant-ωn curve to that ωn', () => {
    for (const c of g.damping) {
      for (const z of c.points) {
        const e = equivalentDamping(z, T);
        if (!e || e.omegaN === 0) continue;
        expect(Math.abs(e.zeta - c.zeta)).toBeLessThanOrEqual(1e-9);
      }
    }
    for (const c of g.naturalFrequency) {
      for (const z of c.points) {
        if (Math.abs(Math.atan2(z.im, z.re)) >= Math.PI - 1e-12) continue; // the branch cut of ln
        expect(Math.abs(equivalentDamping(z, T)!.omegaN - c.omegaN)).toBeLessThanOrEqual(1e-9 * c.omegaN);
      }
    }
  });
  it('equivalentDamping inverts z = e^(sT) for s = −1 ± 2j (ζ = 1/√5, ωn = √5)', () => {
    const z = cx(Math.exp(-0.1) * Math.cos(0.2), Math.exp(-0.1) * Math.sin(0.2));
    const e = equivalentDamping(z, T)!;
    expect(e.zeta).toBeCloseTo(1 / Math.sqrt(5), 14);
    expect(e.omegaN).toBeCloseTo(Math.sqrt(5), 13);
    expect(equivalentDamping(cx(0), T)).toBeNull();
  });
});
