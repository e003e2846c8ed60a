import { describe, expect, it } from 'vitest';
import { blockKinds, blockSpec, visibleParams } from './index.ts';

// What a card shows is the catalogue's plain data (the editor only draws it). The expected texts
// are the kinds' own published forms written out by hand (common practice, no source).
describe('BlockSpec.card', () => {
  it('writes each linear kind as its transfer function over its own fields', () => {
    expect(blockSpec('first-order-lag').card({ k: 2, tau: 'T1' }).formula).toBe('2/(T1*s + 1)');
    expect(blockSpec('pid').card({ form: 'ideal', kp: 'Kp', ti: 1.5, td: 0, n: 10, umin: '', umax: '' })).toEqual({
      formula: 'Kp*(1 + 1/(1.5*s))',
      caption: undefined,
    });
    expect(blockSpec('pid').card({ form: 'parallel', kp: 2, ki: 0, kd: 0.5, n: 10, umin: -1, umax: '' })).toEqual({
      formula: '2 + 0.5*s/(1 + 0.5/2*s/10)',
      caption: 'output -1 … ∞',
    });
    expect(blockSpec('lead-lag').card({ k: 1, tLead: 2, tLag: 'Tf' }).formula).toBe('(2*s + 1)/(Tf*s + 1)');
    expect(blockSpec('second-order').card({ k: 1, wn: 3, zeta: 0.5 }).formula).toBe('3^2/(s^2 + 2*0.5*3*s + 3^2)');
    expect(blockSpec('dead-time').card({ delay: 0.25 }).formula).toBe('exp(-0.25*s)');
    expect(blockSpec('gain').card({ k: '2*Kv' }).formula).toBe('2*Kv');
  });
  it('writes small and large numbers in engineering notation', () => {
    expect(blockSpec('first-order-lag').card({ k: 2.5e-5, tau: 120000 }).formula).toBe('25e-6/(120e3*s + 1)');
  });
  it('never throws on half-typed or missing fields', () => {
    for (const kind of blockKinds) {
      expect(() => blockSpec(kind).card({})).not.toThrow();
      expect(() => blockSpec(kind).card(Object.fromEntries(blockSpec(kind).params.map((p) => [p.name, '2*('])))).not.toThrow();
    }
  });
  it('captions the nonlinear and signal kinds', () => {
    expect(blockSpec('saturation').card({ lower: -2, upper: 2 }).caption).toBe('limits -2 … 2');
    expect(blockSpec('source').card({ shape: 'sinusoid', amplitude: 1, omega: 5, start: 0 }).caption).toBe(
      'sinusoid 1, ω 5 rad/s at t = 0 s',
    );
  });
});

describe('ids and visible fields', () => {
  it('gives every kind its own id prefix', () => {
    const prefixes = blockKinds.map((k) => blockSpec(k).idPrefix);
    expect(new Set(prefixes).size).toBe(prefixes.length);
    for (const p of prefixes) expect(p).toMatch(/^[a-z]+$/);
  });
  it("shows the PID's chosen form and a source's shape fields only", () => {
    const names = (kind: 'pid' | 'source', p: Record<string, string>) => visibleParams(kind, p).map((s) => s.name);
    expect(names('pid', { form: 'parallel', antiWindup: 'off' })).toEqual(expect.arrayContaining(['kp', 'ki', 'kd']));
    expect(names('pid', { form: 'parallel', antiWindup: 'off' })).not.toContain('ti');
    expect(names('pid', { form: 'parallel', antiWindup: 'off' })).not.toContain('tt');
    expect(names('pid', { form: 'ideal' })).toEqual(expect.arrayContaining(['ti', 'td', 'tt']));
    expect(names('source', { shape: 'step' })).not.toContain('omega');
    expect(names('source', { shape: 'pulse' })).toEqual(expect.arrayContaining(['width', 'period']));
  });
});
