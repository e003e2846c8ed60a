import type { Block, Diagram, Wire } from '../document-types.ts';

const at = (col: number, row: number): Block['position'] => ({ x: col * 180, y: row * 120 });
const wire = (id: string, from: string, to: string, port = 'in'): Wire => ({
  id,
  from: { block: from, port: 'out' },
  to: { block: to, port },
});

/**
 * A building heating cascade: the boiler's supply (flow) temperature loop inside (PI on the
 * mixing valve), the room-air temperature loop outside (PI setting the supply setpoint).
 * Temperatures are deviations from the operating point (room 20 °C, supply 50 °C); the valve
 * is shown in absolute % (0–100, saturation) by adding and removing its 50 % operating
 * point. Invented but plausible numbers: 0.8 K of supply per % valve with a 90 s lag, 20 s
 * transit delay in the pipework to the supply sensor, radiators 600 s, room 3600 s, 40 %
 * of the room's heat balance from the radiators and 60 % from outdoors.
 */
export const heatingCascade: Diagram = {
  format: 'loopwright.diagram',
  version: 3,
  title: 'Building heating cascade',
  description:
    'Supply-temperature loop (PI on a 0–100 % mixing valve) inside a room-temperature loop (PI). Temperatures are ' +
    'deviations in K from the operating point (room 20 °C, supply 50 °C, valve 50 %). Invented but plausible numbers: ' +
    'boiler 0.8 K/% with a 90 s lag, 20 s pipework delay, radiators 600 s, room 3600 s. A 1 K room setpoint step at ' +
    '10 min, then a 5 K drop in outdoor temperature at 2 h. Results are design aids: validate on the real plant with ' +
    'limits and interlocks in place, and follow local codes and licensed practice.',
  parameters: [
    {
      name: 'Kp_room',
      value: 13.5,
      unit: 'K/K',
      min: 1,
      max: 50,
      scale: 'log',
      description: 'Room controller gain: K of supply setpoint per K of room error',
    },
    { name: 'Ti_room', value: 2880, unit: 's', min: 300, max: 20000, scale: 'log', description: 'Room controller integral time' },
    {
      name: 'Kp_sup',
      value: 2.5,
      unit: '%/K',
      min: 0.3,
      max: 10,
      scale: 'log',
      description: 'Supply controller gain: % valve per K of supply error',
    },
    { name: 'Ti_sup', value: 90, unit: 's', min: 10, max: 600, scale: 'log', description: 'Supply controller integral time' },
    {
      name: 'T_pipe',
      value: 20,
      unit: 's',
      min: 0,
      max: 120,
      scale: 'linear',
      description: 'Transit delay in the pipework from the mixing valve to the supply sensor',
    },
  ],
  blocks: [
    {
      id: 'room-setpoint',
      kind: 'source',
      label: 'room setpoint (K)',
      position: at(0, 0),
      params: { shape: 'step', amplitude: 1, start: 600, offset: 0 },
    },
    { id: 'room-error', kind: 'summing-junction', label: 'room error', position: at(1, 0), params: { signs: '+-' } },
    {
      id: 'room-controller',
      kind: 'pid',
      label: 'room controller (PI)',
      position: at(2, 0),
      params: { form: 'ideal', kp: 'Kp_room', ti: 'Ti_room', td: 0, n: 10, umin: -30, umax: 25, antiWindup: 'back-calculation', tt: '' },
    },
    { id: 'supply-error', kind: 'summing-junction', label: 'supply error', position: at(3, 0), params: { signs: '+-' } },
    {
      id: 'supply-controller',
      kind: 'pid',
      label: 'supply controller (PI)',
      position: at(4, 0),
      params: { form: 'ideal', kp: 'Kp_sup', ti: 'Ti_sup', td: 0, n: 10, umin: -50, umax: 50, antiWindup: 'back-calculation', tt: '' },
    },
    { id: 'valve-bias-add', kind: 'summing-junction', label: '+ operating point', position: at(5, 0), params: { signs: '++' } },
    { id: 'valve', kind: 'saturation', label: 'mixing valve 0–100 %', position: at(6, 0), params: { lower: 0, upper: 100 } },
    { id: 'valve-bias-remove', kind: 'summing-junction', label: '− operating point', position: at(7, 0), params: { signs: '+-' } },
    { id: 'boiler', kind: 'first-order-lag', label: 'boiler and mixing (K per %)', position: at(8, 0), params: { k: 0.8, tau: 90 } },
    { id: 'pipework', kind: 'dead-time', label: 'pipework transit delay', position: at(9, 0), params: { delay: 'T_pipe' } },
    { id: 'radiators', kind: 'first-order-lag', label: 'radiators', position: at(10, 0), params: { k: 1, tau: 600 } },
    { id: 'radiator-share', kind: 'gain', label: 'radiator share of heat balance', position: at(11, 0), params: { k: 0.4 } },
    { id: 'heat-balance', kind: 'summing-junction', label: 'heat balance', position: at(12, 0), params: { signs: '++' } },
    { id: 'room', kind: 'first-order-lag', label: 'room air', position: at(13, 0), params: { k: 1, tau: 3600 } },
    { id: 'room-temperature', kind: 'probe', label: 'room temperature (K)', position: at(14, 0), params: { unit: 'K' } },
    {
      id: 'valve-operating-point',
      kind: 'source',
      label: 'valve operating point (%)',
      position: at(5, -1),
      params: { shape: 'step', amplitude: 50, start: 0, offset: 0 },
    },
    { id: 'valve-position', kind: 'probe', label: 'valve position (%, actuator)', position: at(7, -1), params: { unit: '%' } },
    { id: 'supply-setpoint', kind: 'probe', label: 'supply setpoint (K)', position: at(3, -1), params: { unit: 'K' } },
    { id: 'supply-temperature', kind: 'probe', label: 'supply temperature (K)', position: at(10, 1), params: { unit: 'K' } },
    {
      id: 'outdoor',
      kind: 'source',
      label: 'outdoor temperature (K)',
      position: at(10, -2),
      params: { shape: 'step', amplitude: -5, start: 7200, offset: 0 },
    },
    { id: 'outdoor-share', kind: 'gain', label: 'outdoor share of heat balance', position: at(11, -1), params: { k: 0.6 } },
  ],
  wires: [
    wire('w-room-setpoint', 'room-setpoint', 'room-error', 'in1'),
    wire('w-room-error', 'room-error', 'room-controller'),
    wire('w-supply-setpoint', 'room-controller', 'supply-error', 'in1'),
    wire('w-supply-setpoint-probe', 'room-controller', 'supply-setpoint'),
    wire('w-supply-error', 'supply-error', 'supply-controller'),
    wire('w-valve-demand', 'supply-controller', 'valve-bias-add', 'in1'),
    wire('w-bias-add', 'valve-operating-point', 'valve-bias-add', 'in2'),
    wire('w-valve-command', 'valve-bias-add', 'valve'),
    wire('w-valve', 'valve', 'valve-bias-remove', 'in1'),
    wire('w-valve-probe', 'valve', 'valve-position'),
    wire('w-bias-remove', 'valve-operating-point', 'valve-bias-remove', 'in2'),
    wire('w-valve-deviation', 'valve-bias-remove', 'boiler'),
    wire('w-boiler', 'boiler', 'pipework'),
    wire('w-supply', 'pipework', 'radiators'),
    wire('w-supply-feedback', 'pipework', 'supply-error', 'in2'),
    wire('w-supply-probe', 'pipework', 'supply-temperature'),
    wire('w-radiators', 'radiators', 'radiator-share'),
    wire('w-radiator-heat', 'radiator-share', 'heat-balance', 'in1'),
    wire('w-outdoor', 'outdoor', 'outdoor-share'),
    wire('w-outdoor-heat', 'outdoor-share', 'heat-balance', 'in2'),
    wire('w-heat', 'heat-balance', 'room'),
    wire('w-room', 'room', 'room-temperature'),
    wire('w-room-feedback', 'room', 'room-error', 'in2'),
  ],
  cuts: [
    { id: 'cut-room', wire: 'w-room-feedback', label: 'room loop' },
    { id: 'cut-supply', wire: 'w-supply-feedback', label: 'supply loop' },
  ],
  sweeps: [
    { id: 'sweep-kp-room', parameter: 'Kp_room', min: 1, max: 50, scale: 'log', label: 'room gain' },
    { id: 'sweep-kp-sup', parameter: 'Kp_sup', min: 0.3, max: 10, scale: 'log', label: 'supply gain' },
  ],
  simulation: { end: 14400, probes: ['room-temperature'] },
  view: { activeCut: 'cut-room', activeSweep: 'sweep-kp-room', activeProbe: 'room-temperature' },
};
