import type { Diagram } from '../document-types.ts';
import { positioningAxis } from './positioning-axis.ts';

/** Each controller's sampling fields: its own sample time (a named parameter) and one sample of computation delay. */
const sampled = (param: string) => ({ sampleTime: param, computeDelay: 1 });
const RATES: Record<string, { sampling: Record<string, string | number>; label: string }> = {
  'current-controller': { sampling: { ...sampled('Ts_cur'), integral: 'tustin' }, label: 'current controller (PI, 16 kHz)' },
  'speed-controller': { sampling: { ...sampled('Ts_spd'), integral: 'tustin' }, label: 'speed controller (PI, 4 kHz)' },
  'position-controller': { sampling: sampled('Ts_pos'), label: 'position controller (P, 1 kHz)' },
};

/**
 * The belt-driven positioning axis of the first demo with its controllers in a drive: the
 * current loop runs at 16 kHz, the speed loop at 4 kHz and the position loop at 1 kHz, each
 * with one sample of computation delay (the output of a sample is applied at the next one).
 * The encoder's filter delay is shorter here (0.1 ms), the sampling now being modelled itself.
 * Our own scenario and numbers, as in the first demo.
 */
export const sampledAxis: Diagram = {
  ...positioningAxis,
  title: 'Positioning axis in a multirate drive',
  description:
    'The belt-driven positioning axis with its controllers sampled in a drive: current loop 16 kHz, speed loop 4 kHz, ' +
    'position loop 1 kHz, each with one sample of computation delay; encoder filter delay 0.1 ms (invented but plausible ' +
    'numbers, as in the first demo). The Frequency view reads each loop at its sampler from the exact pulse transfer function, ' +
    'with the continuous estimate beside it. Results are design aids: validate on the real machine with limits and interlocks ' +
    'in place, and follow the applicable functional-safety standards.',
  parameters: [
    ...positioningAxis.parameters.map((p) => (p.name === 'T_enc' ? { ...p, value: 0.0001 } : p)),
    { name: 'Ts_cur', value: 6.25e-5, unit: 's', min: 2.5e-5, max: 2e-4, scale: 'log', description: 'Current loop sample time (16 kHz)' },
    { name: 'Ts_spd', value: 2.5e-4, unit: 's', min: 1e-4, max: 2e-3, scale: 'log', description: 'Speed loop sample time (4 kHz)' },
    { name: 'Ts_pos', value: 1e-3, unit: 's', min: 2.5e-4, max: 1e-2, scale: 'log', description: 'Position loop sample time (1 kHz)' },
  ],
  blocks: positioningAxis.blocks.map((b) =>
    b.id in RATES ? { ...b, label: RATES[b.id].label, params: { ...b.params, ...RATES[b.id].sampling } } : b,
  ),
  view: { ...positioningAxis.view, activeCut: 'cut-current' },
};
