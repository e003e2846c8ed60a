import { describe, expect, it } from 'vitest';
import { positioningAxis } from '../demos/positioning-axis.ts';
import { checkDiagram } from './diagram.ts';

describe('checkDiagram', () => {
  it('a sound demo: no errors or warnings', () => {
    expect(checkDiagram(positioningAxis).filter((f) => f.severity !== 'info')).toEqual([]);
  });
  it('structural errors come first and suppress the analytical checks', () => {
    const d = structuredClone(positioningAxis);
    d.wires.push({ id: 'w-x', from: { block: 'ghost', port: 'out' }, to: { block: 'current', port: 'in' } });
    const fs = checkDiagram(d, { Kp_pos: 2000 });
    expect(fs[0].severity).toBe('error');
    expect(fs.map((f) => f.code)).toContain('dangling-wire');
    expect(fs.map((f) => f.code)).not.toContain('closed-loop-unstable');
  });
  it('with a sound structure the analytical checks run (an over-high gain is found unstable)', () => {
    // 50 × the design position gain: unstable by the demo's hand-assembled check (demos.test.ts)
    expect(checkDiagram(positioningAxis, { Kp_pos: 2000 }).map((f) => f.code)).toContain('closed-loop-unstable');
  });
  it('sorts errors, then warnings, then notes', () => {
    const d = structuredClone(positioningAxis);
    d.parameters.push({ name: 'Spare', value: 1 });
    d.blocks.find((b) => b.id === 'position-controller')!.params.k = 'Kx';
    const sev = checkDiagram(d).map((f) => f.severity);
    expect(sev).toEqual([...sev].sort((a, b) => ['error', 'warning', 'info'].indexOf(a) - ['error', 'warning', 'info'].indexOf(b)));
    expect(sev).toContain('info');
    expect(sev[0]).toBe('error');
  });
});
