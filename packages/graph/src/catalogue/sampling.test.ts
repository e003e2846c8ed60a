import { describe, expect, it } from 'vitest';
import { InputError } from '@loopwright/lti';
import type { Block, BlockKind } from '../document-types.ts';
import { emptyDiagram, parseDiagram, serializeDiagram } from '../document.ts';
import { linearForm, resolveParams } from '../resolve.ts';
import { positioningAxis } from '../demos/positioning-axis.ts';
import { blockSpec, cardOf } from './index.ts';
import { samplingFieldVisible, samplingOf } from './sampling.ts';

const block = (kind: BlockKind, params: Block['params']): Block => ({ id: 'c1', kind, position: { x: 0, y: 0 }, params });
const D0 = emptyDiagram();

describe('sampling fields of controller blocks', () => {
  it('a block without sampling fields (an older file) is continuous and loads unchanged', () => {
    for (const kind of ['pid', 'lead-lag', 'transfer-function', 'gain'] as const) {
      const p = resolveParams(D0, block(kind, {}));
      expect(p.sampleTime).toBe(0);
      expect(samplingOf(kind, p)).toBeNull();
    }
    // the shipped demo has no sampling fields: parse and write give the same bytes
    const text = serializeDiagram(positioningAxis);
    expect(serializeDiagram(parseDiagram(text))).toBe(text);
  });

  it('reads the sampling of a PID and of a transfer-type block, defaults filled', () => {
    const pid = resolveParams(D0, block('pid', { kp: 2, ti: 0.1, sampleTime: 0.001, computeDelay: 1, integral: 'forward' }));
    expect(samplingOf('pid', pid)).toEqual({ sampleTime: 0.001, computeDelay: 1, integral: 'forward', derivative: 'backward' });
    const ll = resolveParams(D0, block('lead-lag', { sampleTime: '1e-3', method: 'tustin', prewarp: 500 }));
    expect(samplingOf('lead-lag', ll)).toEqual({ sampleTime: 0.001, computeDelay: 0, method: 'tustin', prewarp: 500 });
    const g = resolveParams(D0, block('gain', { k: 3, sampleTime: 0.01, computeDelay: 0.5 }));
    expect(samplingOf('gain', g)).toEqual({ sampleTime: 0.01, computeDelay: 0.5 });
    // a sample time given through a named parameter
    const d = { ...D0, parameters: [{ name: 'Ts', value: 2.5e-4 }] };
    expect(samplingOf('transfer-function', resolveParams(d, block('transfer-function', { sampleTime: 'Ts', method: 'matched' })))).toEqual({
      sampleTime: 2.5e-4,
      computeDelay: 0,
      method: 'matched',
    });
  });

  it('refuses bad sampling fields, naming the block and field', () => {
    expect(() => resolveParams(D0, block('pid', { sampleTime: -1 }))).toThrow(/block c1 field sampleTime: -1 s must be at least 0 s/);
    expect(() => resolveParams(D0, block('gain', { sampleTime: 0.1, computeDelay: 2000 }))).toThrow(
      /field computeDelay: 2000 samples must be at most 1000/,
    );
    expect(() => resolveParams(D0, block('lead-lag', { method: 'euler' }))).toThrow(
      /field method: "euler" is not one of "zoh", "tustin", "matched"/,
    );
    // prewarp at or above π/T: π/0.01 ≈ 314 rad/s
    const p = resolveParams(D0, block('lead-lag', { sampleTime: 0.01, prewarp: 400 }));
    expect(() => samplingOf('lead-lag', p)).toThrow(InputError);
    expect(() => samplingOf('lead-lag', p)).toThrow(/field prewarp: 400 rad\/s is at or above the Nyquist frequency/);
  });

  it('leaves the linear form continuous (the design the sampled block stands for)', () => {
    const a = linearForm(D0, block('lead-lag', { k: 2, tLead: 0.3, tLag: 0.05 }));
    const b = linearForm(D0, block('lead-lag', { k: 2, tLead: 0.3, tLag: 0.05, sampleTime: 0.01, method: 'zoh' }));
    expect(b).toEqual(a);
  });

  it('shows the details of sampling only when a sample time is set, the prewarp only with Tustin', () => {
    expect(samplingFieldVisible('sampleTime', {})).toBe(true);
    expect(samplingFieldVisible('computeDelay', { sampleTime: '' })).toBe(false);
    expect(samplingFieldVisible('computeDelay', { sampleTime: 'Ts' })).toBe(true);
    expect(samplingFieldVisible('prewarp', { sampleTime: 0.01, method: 'zoh' })).toBe(false);
    expect(samplingFieldVisible('prewarp', { sampleTime: 0.01 })).toBe(true);
    expect(blockSpec('gain').params.map((p) => p.name)).not.toContain('method');
  });
});

describe('a sampled controller card', () => {
  // Our own card wording: the continuous card, then the sample time and computation delay.
  it('shows its sample time and computation delay', () => {
    const pid = cardOf('pid', { form: 'ideal', kp: 2, ti: 0.01, td: 0, n: 10, umin: -5, umax: 5, sampleTime: 2.5e-4, computeDelay: 1 });
    expect(pid.formula).toBe(blockSpec('pid').card({ form: 'ideal', kp: 2, ti: 0.01, td: 0, n: 10, umin: -5, umax: 5 }).formula);
    expect(pid.caption).toMatch(/; sampled every 250e-6 s, delay 1 sample$/);
    expect(cardOf('gain', { k: 3, sampleTime: 'Ts_pos' }).caption).toBe('sampled every Ts_pos s');
    expect(cardOf('gain', { k: 3, sampleTime: '' }).caption).toBeUndefined();
  });
});
