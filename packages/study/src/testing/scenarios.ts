/**
 * Scenario diagrams of our own for the agreement test and benches (invented but plausible
 * numbers; not part of the public API): a three-loop cascade with dead times, a loop with a
 * measured-disturbance feedforward, and a reverse-acting loop swept over negative gains.
 */
import type { Diagram } from '@loopwright/graph';
import { build } from './builders.ts';

/**
 * A heat-treatment furnace: fuel-flow loop (valve and transmitter, 0.5 s dead time) inside the
 * chamber-temperature loop (8 s dead time in the flue gas path) inside the load-temperature loop (30 s
 * conduction delay). Flow demand limited to 0..25 (the valve's range).
 */
export function furnaceCascade(): Diagram {
  return build(
    [
      ['setpoint', 'source', { shape: 'step', amplitude: 50, start: 0 }],
      ['e-load', 'summing-junction', { signs: '+-' }],
      ['load-ctl', 'pid', { kp: 'Kc_load', ti: 600 }],
      ['e-zone', 'summing-junction', { signs: '+-' }],
      ['zone-ctl', 'pid', { kp: 'Kc_zone', ti: 60, umin: 0, umax: 25 }],
      ['e-flow', 'summing-junction', { signs: '+-' }],
      ['flow-ctl', 'pid', { kp: 0.8, ti: 2 }],
      ['valve', 'transfer-function', { expression: 'exp(-0.5*s)/(1.5*s + 1)' }],
      ['chamber', 'transfer-function', { expression: '3*exp(-8*s)/(120*s + 1)' }],
      ['load', 'transfer-function', { expression: 'exp(-30*s)/(400*s + 1)' }],
      ['load-temperature', 'probe'],
      ['chamber-temperature', 'probe'],
      ['fuel-flow', 'probe'],
    ],
    [
      'setpoint->e-load.in1',
      'e-load->load-ctl',
      'load-ctl->e-zone.in1',
      'e-zone->zone-ctl',
      'zone-ctl->e-flow.in1',
      'e-flow->flow-ctl',
      'flow-ctl->valve',
      'fb-flow:valve->e-flow.in2',
      'valve->chamber',
      'valve->fuel-flow',
      'fb-zone:chamber->e-zone.in2',
      'chamber->load',
      'chamber->chamber-temperature',
      'fb-load:load->e-load.in2',
      'load->load-temperature',
    ],
    [
      { name: 'Kc_load', value: 1.2, unit: '1', min: 0.1, max: 10, scale: 'log' },
      { name: 'Kc_zone', value: 2, unit: '1', min: 0.2, max: 20, scale: 'log' },
    ],
    {
      title: 'Furnace load-temperature cascade',
      cuts: [
        { id: 'cut-flow', wire: 'fb-flow', label: 'fuel-flow loop' },
        { id: 'cut-zone', wire: 'fb-zone', label: 'chamber loop' },
        { id: 'cut-load', wire: 'fb-load', label: 'load loop' },
      ],
      sweeps: [{ id: 'sweep-load', parameter: 'Kc_load', min: 0.1, max: 10, scale: 'log' }],
      simulation: { end: 2500, probes: ['load-temperature', 'chamber-temperature'] },
    },
  );
}

/**
 * A surge tank (10 m²) whose level is held by the outflow pump (lag 2 s), with the measured
 * inflow fed forward to the pump command. Inflow steps by 0.2 m³/s at 50 s.
 */
export function tankFeedforward(): Diagram {
  return build(
    [
      ['level-setpoint', 'source', { shape: 'step', amplitude: 0 }],
      ['inflow', 'source', { shape: 'step', amplitude: 0.2, start: 50 }],
      ['e-level', 'summing-junction', { signs: '+-' }],
      ['level-ctl', 'pid', { kp: 'Kc', ti: 120 }],
      ['ff', 'gain', { k: 'Kff' }],
      ['pump-cmd', 'summing-junction', { signs: '++' }],
      ['pump', 'first-order-lag', { k: 1, tau: 2 }],
      ['balance', 'summing-junction', { signs: '+-' }],
      ['tank', 'integrator', { k: 0.1 }],
      ['level', 'probe'],
      ['outflow', 'probe'],
    ],
    [
      'level-fb:tank->e-level.in1',
      'level-setpoint->e-level.in2',
      'e-level->level-ctl',
      'level-ctl->pump-cmd.in1',
      'inflow->ff',
      'ff->pump-cmd.in2',
      'pump-cmd->pump',
      'pump->balance.in2',
      'inflow->balance.in1',
      'balance->tank',
      'tank->level',
      'pump->outflow',
    ],
    [
      { name: 'Kc', value: 2, unit: 'm²/s', min: 0.2, max: 20, scale: 'log' },
      { name: 'Kff', value: 1, unit: '1', min: 0, max: 1.5, scale: 'linear' },
    ],
    {
      title: 'Surge tank level with inflow feedforward',
      cuts: [{ id: 'cut-level', wire: 'level-fb', label: 'level loop' }],
      sweeps: [{ id: 'sweep-kc', parameter: 'Kc', min: 0.2, max: 20, scale: 'log' }],
      simulation: { end: 400 },
    },
  );
}

/**
 * A process cooled by chilled water: more valve opening, lower temperature (gain −1.5 K/%,
 * lag 30 s, 4 s dead time), so the PI controller is reverse-acting (Kc < 0) and its sweep runs
 * over negative gains.
 */
export function coolingReverseActing(): Diagram {
  return build(
    [
      ['setpoint', 'source', { shape: 'step', amplitude: -2, start: 5 }],
      ['e', 'summing-junction', { signs: '+-' }],
      ['ctl', 'pid', { kp: 'Kc', ti: 40, umin: -50, umax: 50 }],
      ['process', 'transfer-function', { expression: '-1.5*exp(-4*s)/(30*s + 1)' }],
      ['sensor', 'gain', { k: 1 }],
      ['temperature', 'probe'],
    ],
    ['setpoint->e.in1', 'e->ctl', 'ctl->process', 'process->sensor', 'fb:sensor->e.in2', 'process->temperature'],
    [{ name: 'Kc', value: -2, unit: '%/K', min: -10, max: -0.2, scale: 'linear' }],
    {
      title: 'Reverse-acting cooling loop',
      cuts: [{ id: 'cut-temp', wire: 'fb', label: 'temperature loop' }],
      sweeps: [{ id: 'sweep-kc', parameter: 'Kc', min: -10, max: -0.2, scale: 'linear' }],
      simulation: { end: 300 },
    },
  );
}

/**
 * The two-loop cascade of reference row R27 (Nise, Sec. 5.2, from memory): C1 = 2 (parameter
 * C1), C2 = 5, G2 = 1/(s+1), G1 = 1/s, unity feedbacks on wires `inner` and `outer`, cut at both.
 */
export function r27Cascade(): Diagram {
  return build(
    [
      ['r', 'source'],
      ['e1', 'summing-junction', { signs: '+-' }],
      ['C1', 'gain', { k: 'C1' }],
      ['e2', 'summing-junction', { signs: '+-' }],
      ['C2', 'gain', { k: 5 }],
      ['G2', 'first-order-lag', { k: 1, tau: 1 }],
      ['G1', 'integrator', { k: 1 }],
      ['y', 'probe'],
    ],
    ['r->e1.in1', 'e1->C1', 'C1->e2.in1', 'e2->C2', 'C2->G2', 'inner:G2->e2.in2', 'G2->G1', 'outer:G1->e1.in2', 'G1->y'],
    [{ name: 'C1', value: 2 }],
    {
      cuts: [
        { id: 'ci', wire: 'inner', label: 'inner loop' },
        { id: 'co', wire: 'outer', label: 'outer loop' },
      ],
    },
  );
}
