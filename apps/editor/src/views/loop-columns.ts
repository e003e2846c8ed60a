/** The margin columns of the Loops table (also used by the design report). */
import type { MarginsData } from '@loopwright/study';

export const LOOP_COLUMNS: { field: keyof MarginsData; label: string; title: string }[] = [
  { field: 'gainCrossover', label: 'ωc [rad/s]', title: 'gain crossover frequency' },
  { field: 'phaseMarginDeg', label: 'PM [°]', title: 'phase margin' },
  { field: 'gainMarginDb', label: 'GM [dB]', title: 'gain margin' },
  { field: 'phaseCrossover', label: 'ω180 [rad/s]', title: 'phase crossover frequency (where the gain margin is read)' },
  { field: 'lowerGainMarginDb', label: 'lower GM [dB]', title: 'lower gain margin (conditionally stable loops)' },
  { field: 'delayMargin', label: 'DM [s]', title: 'delay margin' },
  { field: 'peakSensitivity', label: 'Ms', title: 'peak sensitivity max |S|' },
  { field: 'peakComplementary', label: 'Mt', title: 'peak complementary sensitivity max |T|' },
  { field: 'bandwidth', label: 'BW [rad/s]', title: 'closed-loop bandwidth (|T| 3 dB below its DC value)' },
];
