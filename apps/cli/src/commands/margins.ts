import { type LoopMargins, marginFigures } from '@loopwright/lti';
import { expressionMargins } from '@loopwright/study';
import { has, numberFlag, parseArgs, toJson } from '../args.ts';
import { UsageError, type Command } from '../io.ts';
import { fmtNumber, fmtRootsMarked, fmtTransfer, padeLegend } from './diagram-input.ts';
import { loopFromArgs, withCaret } from './loop-input.ts';

const help = `loopwright margins --loop "<expression>" [--param NAME=VALUE ...] [--pade-order N] [--json]

Stability margins of a loop transfer L(s), characteristic equation 1 + L(s) = 0 (L is the
whole loop: controller times plant times sensor, with the feedback sign taken into L).
Dead time exp(-T*s) is kept exact for every frequency-domain figure; the closed-loop poles
(the stability verdict) use a Padé approximant whose order is reported.

  --loop EXPR       the loop, e.g. "Kc*(1 + 1/(Ti*s)) * 2*exp(-s)/(10*s + 1)"
  --param NAME=V    value of a parameter used in EXPR (repeatable)
  --pade-order N    Padé order for the dead time in the closed-loop poles (1..10; default: chosen
                    to follow the delay's phase within 1° up to twice the highest crossover)
  --json            machine-readable output (null where a quantity does not exist)

Reported: every gain crossover (|L| = 1) with its phase margin, every phase crossover
(phase = -180° + k·360°) with the gain factor that reaches -1 there; the gain margin (smallest
factor above 1) and, for a conditionally stable loop, the lower gain margin (largest factor
below 1); the worst phase margin; the delay margin min PM/ω; peak sensitivity Ms = max|1/(1+L)|
and Mt = max|L/(1+L)|; closed-loop bandwidth (-3 dB of T relative to DC); closed-loop poles.
Margins are read together with the closed-loop verdict, never instead of it.

Example: npx loopwright margins --loop "4/(s+1)^3"
`;

/** The JSON shape of the margins command (see --help). */
export function marginsJson(m: LoopMargins, poleOrigin: readonly string[] = m.closedLoopPoles.map(() => 'exact')) {
  return {
    ...marginFigures(m),
    closedLoopPoles: m.closedLoopPoles.map((p) => [p.re, p.im]),
    closedLoopPoleOrigin: poleOrigin,
    padeOrder: m.padeOrder,
    gainCrossoverDetails: m.gainCrossoverDetails,
    phaseCrossoverDetails: m.phaseCrossoverDetails,
  };
}

const opt = (x: number | null, unit = '', digits = 6) => (x === null ? 'none' : `${fmtNumber(x, digits)}${unit}`);

export const marginsCommand: Command = {
  name: 'margins',
  summary: 'gain, phase and delay margins, Ms/Mt, bandwidth and closed-loop verdict of a loop',
  help,
  async run(argv, io, budget = {}) {
    const a = parseArgs(argv, ['loop', 'param', 'pade-order'], ['json']);
    if (a.positional.length) throw new UsageError(`margins: unexpected argument "${a.positional[0]}" (the loop goes in --loop "...")`);
    const padeOrder = numberFlag(a, 'pade-order');
    const loop = loopFromArgs(a, 'margins');
    const { loop: tf, margins: m, poleOrigin } = withCaret(loop, () => expressionMargins(loop, { ...(padeOrder !== undefined ? { padeOrder } : {}), ...budget }));
    if (has(a, 'json')) {
      io.stdout(toJson(marginsJson(m, poleOrigin)));
      return 0;
    }
    const lines = [
      `L(s) = ${fmtTransfer(tf.rational.num, tf.rational.den, tf.delay)}`,
      '',
      `gain margin        ${m.gainMargin === null ? 'infinite (no phase crossover with |L| < 1)' : `${fmtNumber(m.gainMargin)} (${fmtNumber(m.gainMarginDb!, 4)} dB) at ${fmtNumber(m.phaseCrossover!)} rad/s`}`,
    ];
    if (m.lowerGainMargin !== null) {
      lines.push(
        `lower gain margin  ${fmtNumber(m.lowerGainMargin)} (${fmtNumber(m.lowerGainMarginDb!, 4)} dB) at ${fmtNumber(m.lowerPhaseCrossover!)} rad/s`,
      );
    }
    lines.push(
      `phase margin       ${m.phaseMarginDeg === null ? 'none (|L| never crosses 1)' : `${fmtNumber(m.phaseMarginDeg, 5)}° at ${fmtNumber(m.gainCrossover!)} rad/s`}`,
      `delay margin       ${opt(m.delayMargin, ' s')}`,
      `peak sensitivity   Ms = ${opt(m.peakSensitivity)}${m.peakSensitivityFrequency !== null ? ` at ${fmtNumber(m.peakSensitivityFrequency)} rad/s` : ''}`,
      `peak compl. sens.  Mt = ${opt(m.peakComplementary)}${m.peakComplementaryFrequency !== null ? ` at ${fmtNumber(m.peakComplementaryFrequency)} rad/s` : ''}`,
      `bandwidth          ${opt(m.bandwidth, ' rad/s')}`,
      `closed loop        ${m.closedLoopStable ? 'stable' : 'NOT stable'}${m.padeOrder !== null ? ` (dead time as Padé (${m.padeOrder},${m.padeOrder}))` : ''}`,
      `closed-loop poles  ${fmtRootsMarked(m.closedLoopPoles, poleOrigin)}`,
      ...(padeLegend(poleOrigin) ? [`                   ${padeLegend(poleOrigin)}`] : []),
      '',
      `gain crossovers (${m.gainCrossoverDetails.length}):`,
      ...m.gainCrossoverDetails.map(
        (c) => `  ω = ${fmtNumber(c.omega)} rad/s   PM = ${fmtNumber(c.phaseMarginDeg, 5)}°   delay margin ${fmtNumber(c.delayMargin)} s`,
      ),
      `phase crossovers (${m.phaseCrossoverDetails.length}):`,
      ...m.phaseCrossoverDetails
        .slice(0, 12)
        .map((c) => `  ω = ${fmtNumber(c.omega)} rad/s   gain factor to -1: ${fmtNumber(c.gainFactor)}`),
    );
    if (m.phaseCrossoverDetails.length > 12) lines.push(`  … ${m.phaseCrossoverDetails.length - 12} more (--json lists all)`);
    if (!m.closedLoopStable) lines.push('', 'The closed loop is not stable: the margins above do not describe a working loop.');
    io.stdout(lines.join('\n') + '\n');
    return 0;
  },
};
