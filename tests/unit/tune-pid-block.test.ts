// The tuner's controller transfer function against the PID block's own linear form (graph
// catalogue), which the diagram uses: a suggestion applied to the block must be the loop the
// tuner predicted. Two independent implementations must agree.
import { describe, expect, it } from 'vitest';
import { blockSpec } from '@loopwright/graph';
import { cx, revalComplex } from '@loopwright/lti';
import { controllerSetting, controllerTransfer } from '@loopwright/tune';

describe('tune controllerTransfer = PID block (ideal form)', () => {
  const cases = [
    controllerSetting('pid', 2.35, 4.2, 0.48544),
    controllerSetting('pi', -1.4, 6.08, 0),
    controllerSetting('p', 5, null, 0),
    controllerSetting('pid', 0.7, null, 1.5),
  ];
  for (const c of cases) {
    it(`${c.kind} kp = ${c.kp}, ti = ${c.ti}, td = ${c.td}, n = 8`, () => {
      const block = blockSpec('pid').linear({
        form: 'ideal',
        kp: c.kp,
        ti: c.ti ?? Infinity,
        td: c.td,
        ki: 1,
        kd: 0,
        n: 8,
        umin: -Infinity,
        umax: Infinity,
        antiWindup: 'off',
        tt: 1,
      });
      expect(block.type).toBe('transfer');
      const tfBlock = (block as { tf: { rational: Parameters<typeof revalComplex>[0] } }).tf.rational;
      const ours = controllerTransfer(c, 8).rational;
      for (const w of [0.01, 0.3, 1, 7, 100]) {
        const a = revalComplex(ours, cx(0, w));
        const b = revalComplex(tfBlock, cx(0, w));
        expect(Math.hypot(a.re - b.re, a.im - b.im)).toBeLessThanOrEqual(1e-12 * Math.hypot(b.re, b.im));
      }
    });
  }
});
