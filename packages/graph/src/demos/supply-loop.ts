import type { Block, Diagram, Wire } from '../document-types.ts';

const at = (col: number, row: number): Block['position'] => ({ x: col * 180, y: row * 120 });
const wire = (id: string, from: string, to: string, port = 'in'): Wire => ({
  id,
  from: { block: from, port: 'out' },
  to: { block: to, port },
});

/**
 * The supply-temperature loop of a heating plant, ready to be commissioned: a PI controller on
 * the mixing valve with cautious start settings, and a plant block that holds a first guess
 * (from the boiler's data sheet) until a bump test is fitted to it — the demo test log
 * supply-valve-bump.csv (@loopwright/fit demos) is such a test of this plant. Temperatures and
 * the valve are deviations from the operating point (supply 50 °C, valve 50 %). A 2 K
 * set-point step at 60 s; at 900 s the return water cools, a load worth −3 % of valve at the
 * plant input. Invented but plausible numbers.
 */
export const supplyLoop: Diagram = {
  format: 'loopwright.diagram',
  version: 3,
  title: 'Heating supply loop (to commission)',
  description:
    'Supply-temperature loop of a heating plant, ready for commissioning: PI on the mixing valve (deviation ±50 %) with cautious ' +
    'start settings; the plant block holds a first guess until a bump test is fitted to it (sample test log: ' +
    'supply-valve-bump.csv). Deviations from supply 50 °C and valve 50 %. A 2 K set-point step at 60 s, a load of −3 % ' +
    'valve at 900 s. A fitted model is only as good as its test: commission new settings in small steps with limits and ' +
    'interlocks in place, and follow local codes and licensed practice.',
  parameters: [
    {
      name: 'Kp',
      value: 1,
      unit: '%/K',
      min: 0.1,
      max: 10,
      scale: 'log',
      description: 'Supply controller gain: % valve per K of supply error',
    },
    { name: 'Ti', value: 150, unit: 's', min: 10, max: 600, scale: 'log', description: 'Supply controller integral time' },
  ],
  blocks: [
    {
      id: 'setpoint',
      kind: 'source',
      label: 'supply setpoint (K)',
      position: at(0, 0),
      params: { shape: 'step', amplitude: 2, start: 60, offset: 0 },
    },
    { id: 'supply-error', kind: 'summing-junction', label: 'supply error', position: at(1, 0), params: { signs: '+-' } },
    {
      id: 'supply-controller',
      kind: 'pid',
      label: 'supply controller (PI)',
      position: at(2, 0),
      params: { form: 'ideal', kp: 'Kp', ti: 'Ti', td: 0, n: 10, umin: -50, umax: 50, antiWindup: 'back-calculation', tt: '' },
    },
    { id: 'load-in', kind: 'summing-junction', label: 'valve + load', position: at(3, 0), params: { signs: '++' } },
    {
      id: 'supply-plant',
      kind: 'transfer-function',
      label: 'supply plant (first guess: fit a bump test)',
      position: at(4, 0),
      params: { expression: '0.6*exp(-15*s)/(120*s + 1)' },
    },
    { id: 'supply-temperature', kind: 'probe', label: 'supply temperature (K)', position: at(5, 0), params: {} },
    {
      id: 'load',
      kind: 'source',
      label: 'return cooling (% valve)',
      position: at(3, -1),
      params: { shape: 'step', amplitude: -3, start: 900, offset: 0 },
    },
    { id: 'valve', kind: 'probe', label: 'valve (%, deviation)', position: at(3, 1), params: {} },
  ],
  wires: [
    wire('w-setpoint', 'setpoint', 'supply-error', 'in1'),
    wire('w-error', 'supply-error', 'supply-controller'),
    wire('w-valve', 'supply-controller', 'load-in', 'in1'),
    wire('w-valve-probe', 'supply-controller', 'valve'),
    wire('w-load', 'load', 'load-in', 'in2'),
    wire('w-plant-in', 'load-in', 'supply-plant'),
    wire('w-supply', 'supply-plant', 'supply-temperature'),
    wire('w-supply-feedback', 'supply-plant', 'supply-error', 'in2'),
  ],
  cuts: [{ id: 'cut-supply', wire: 'w-supply-feedback', label: 'supply loop' }],
  sweeps: [{ id: 'sweep-kp', parameter: 'Kp', min: 0.1, max: 10, scale: 'log', label: 'supply gain' }],
  simulation: { end: 1800, probes: ['supply-temperature'] },
  view: { activeCut: 'cut-supply', activeSweep: 'sweep-kp', activeProbe: 'supply-temperature' },
};
