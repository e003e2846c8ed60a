import type { Block, Diagram, Wire } from '../document-types.ts';

// Layout grid used by the editor: columns 180 px apart, rows 120 px apart.
const at = (col: number, row: number): Block['position'] => ({ x: col * 180, y: row * 120 });
const wire = (id: string, from: string, to: string, port = 'in'): Wire => ({
  id,
  from: { block: from, port: 'out' },
  to: { block: to, port },
});

/**
 * A belt-driven positioning axis with three nested loops: current (PI, inside), speed (PI,
 * limited to the drive's current rating, back-calculation anti-windup) and position (P,
 * outside). The encoder's sample-and-filter delay sits on both measured signals.
 * Numbers are invented but plausible for a small servo axis: winding 1.2 Ω / 3 mH, torque
 * constant 0.3 N·m/A, inertia 1e-3 kg·m² and viscous friction 1e-3 N·m·s/rad at the motor,
 * pulley 15 mm/rad, 48 V bus, encoder delay 0.5 ms. The belt is taken as rigid and back-EMF
 * is left out (the current loop rejects it). Positions in mm, speeds in rad/s at the motor.
 */
export const positioningAxis: Diagram = {
  format: 'loopwright.diagram',
  version: 3,
  title: 'Belt-driven positioning axis',
  description:
    'Cascade of current, speed and position loops on a belt-driven axis (invented but plausible numbers: ' +
    'winding 1.2 Ω / 3 mH, torque constant 0.3 N·m/A, inertia 1e-3 kg·m², friction 1e-3 N·m·s/rad, pulley 15 mm/rad, ' +
    '48 V bus, encoder delay 0.5 ms; rigid belt, back-EMF left out). A 10 mm position step at 10 ms, then a 0.3 N·m ' +
    'load torque at 150 ms. The speed controller is limited to ±I_max (the drive current rating). ' +
    'Results are design aids: validate on the real machine with limits and interlocks in place.',
  parameters: [
    {
      name: 'Kp_pos',
      value: 40,
      unit: '1/s',
      min: 5,
      max: 200,
      scale: 'log',
      description: 'Position loop gain: speed demand (mm/s) per mm of position error',
    },
    { name: 'Kp_spd', value: 1, unit: 'A·s/rad', min: 0.1, max: 5, scale: 'log', description: 'Speed controller proportional gain' },
    { name: 'Ti_spd', value: 0.015, unit: 's', min: 0.002, max: 0.2, scale: 'log', description: 'Speed controller integral time' },
    { name: 'Kp_cur', value: 9, unit: 'V/A', min: 1, max: 50, scale: 'log', description: 'Current controller proportional gain' },
    { name: 'Ti_cur', value: 0.002, unit: 's', min: 0.0002, max: 0.02, scale: 'log', description: 'Current controller integral time' },
    {
      name: 'I_max',
      value: 8,
      unit: 'A',
      min: 1,
      max: 20,
      scale: 'linear',
      description: 'Drive current limit (speed controller output limit)',
    },
    { name: 'T_enc', value: 0.0005, unit: 's', min: 0, max: 0.005, scale: 'linear', description: 'Encoder sampling and filter delay' },
    {
      name: 'r_pulley',
      value: 15,
      unit: 'mm/rad',
      min: 5,
      max: 40,
      scale: 'linear',
      description: 'Pulley radius: carriage travel per motor radian',
    },
  ],
  blocks: [
    {
      id: 'position-setpoint',
      kind: 'source',
      label: 'position setpoint (mm)',
      position: at(0, 0),
      params: { shape: 'step', amplitude: 10, start: 0.01, offset: 0 },
    },
    { id: 'position-error', kind: 'summing-junction', label: 'position error', position: at(1, 0), params: { signs: '+-' } },
    { id: 'position-controller', kind: 'gain', label: 'position controller (P)', position: at(2, 0), params: { k: 'Kp_pos' } },
    { id: 'to-motor-speed', kind: 'gain', label: 'mm/s → rad/s', position: at(3, 0), params: { k: '1/r_pulley' } },
    { id: 'speed-error', kind: 'summing-junction', label: 'speed error', position: at(4, 0), params: { signs: '+-' } },
    {
      id: 'speed-controller',
      kind: 'pid',
      label: 'speed controller (PI)',
      position: at(5, 0),
      params: {
        form: 'ideal',
        kp: 'Kp_spd',
        ti: 'Ti_spd',
        td: 0,
        n: 10,
        umin: '-I_max',
        umax: 'I_max',
        antiWindup: 'back-calculation',
        tt: '',
      },
    },
    { id: 'current-error', kind: 'summing-junction', label: 'current error', position: at(6, 0), params: { signs: '+-' } },
    {
      id: 'current-controller',
      kind: 'pid',
      label: 'current controller (PI)',
      position: at(7, 0),
      params: { form: 'ideal', kp: 'Kp_cur', ti: 'Ti_cur', td: 0, n: 10, umin: -48, umax: 48, antiWindup: 'back-calculation', tt: '' },
    },
    { id: 'winding', kind: 'first-order-lag', label: 'motor winding (A per V)', position: at(8, 0), params: { k: '1/1.2', tau: 0.0025 } },
    { id: 'torque-constant', kind: 'gain', label: 'torque constant (N·m/A)', position: at(9, 0), params: { k: 0.3 } },
    { id: 'net-torque', kind: 'summing-junction', label: 'net torque', position: at(10, 0), params: { signs: '+-' } },
    {
      id: 'mechanics',
      kind: 'first-order-lag',
      label: 'inertia + friction (rad/s per N·m)',
      position: at(11, 0),
      params: { k: 1000, tau: 1 },
    },
    { id: 'pulley', kind: 'integrator', label: 'belt and pulley (mm)', position: at(12, 0), params: { k: 'r_pulley' } },
    { id: 'position', kind: 'probe', label: 'position (mm)', position: at(13, 0), params: { unit: 'mm' } },
    {
      id: 'load-torque',
      kind: 'source',
      label: 'load torque (N·m)',
      position: at(9, -1),
      params: { shape: 'step', amplitude: 0.3, start: 0.15, offset: 0 },
    },
    { id: 'motor-voltage', kind: 'probe', label: 'motor voltage (V, actuator)', position: at(8, -1), params: { unit: 'V' } },
    { id: 'current', kind: 'probe', label: 'motor current (A)', position: at(9, 1), params: { unit: 'A' } },
    { id: 'speed', kind: 'probe', label: 'motor speed (rad/s)', position: at(12, 1), params: { unit: 'rad/s' } },
    { id: 'speed-encoder', kind: 'dead-time', label: 'encoder delay (speed)', position: at(11, 2), params: { delay: 'T_enc' } },
    { id: 'position-encoder', kind: 'dead-time', label: 'encoder delay (position)', position: at(12, 3), params: { delay: 'T_enc' } },
  ],
  wires: [
    wire('w-setpoint', 'position-setpoint', 'position-error', 'in1'),
    wire('w-position-error', 'position-error', 'position-controller'),
    wire('w-speed-demand-mm', 'position-controller', 'to-motor-speed'),
    wire('w-speed-demand', 'to-motor-speed', 'speed-error', 'in1'),
    wire('w-speed-error', 'speed-error', 'speed-controller'),
    wire('w-current-demand', 'speed-controller', 'current-error', 'in1'),
    wire('w-current-error', 'current-error', 'current-controller'),
    wire('w-voltage', 'current-controller', 'winding'),
    wire('w-voltage-probe', 'current-controller', 'motor-voltage'),
    wire('w-current', 'winding', 'torque-constant'),
    wire('w-current-feedback', 'winding', 'current-error', 'in2'),
    wire('w-current-probe', 'winding', 'current'),
    wire('w-motor-torque', 'torque-constant', 'net-torque', 'in1'),
    wire('w-load-torque', 'load-torque', 'net-torque', 'in2'),
    wire('w-net-torque', 'net-torque', 'mechanics'),
    wire('w-speed', 'mechanics', 'pulley'),
    wire('w-speed-probe', 'mechanics', 'speed'),
    wire('w-speed-measure', 'mechanics', 'speed-encoder'),
    wire('w-speed-feedback', 'speed-encoder', 'speed-error', 'in2'),
    wire('w-position', 'pulley', 'position'),
    wire('w-position-measure', 'pulley', 'position-encoder'),
    wire('w-position-feedback', 'position-encoder', 'position-error', 'in2'),
  ],
  cuts: [
    { id: 'cut-position', wire: 'w-position-feedback', label: 'position loop' },
    { id: 'cut-speed', wire: 'w-speed-feedback', label: 'speed loop' },
    { id: 'cut-current', wire: 'w-current-feedback', label: 'current loop' },
  ],
  sweeps: [
    { id: 'sweep-kp-pos', parameter: 'Kp_pos', min: 5, max: 200, scale: 'log', label: 'position gain' },
    { id: 'sweep-kp-spd', parameter: 'Kp_spd', min: 0.1, max: 5, scale: 'log', label: 'speed gain' },
  ],
  simulation: { end: 0.3, probes: ['position'] },
  view: { activeCut: 'cut-speed', activeSweep: 'sweep-kp-pos', activeProbe: 'position' },
};
