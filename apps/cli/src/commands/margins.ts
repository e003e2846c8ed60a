import { type LoopMargins, type TransferFunction, marginFigures } from '@loopwright/lti';
import { expressionMargins, expressionSampledMargins } from '@loopwright/study';
import { type SampledMargins, sampledMarginFigures } from '@loopwright/sampled';
import { has, numberFlag, one, parseArgs, toJson } from '../args.ts';
import { UsageError, type Command } from '../io.ts';
import { fmtNumber, fmtRootsMarked, fmtTransfer, padeLegend } from './diagram-input.ts';
import { loopFromArgs, withCaret } from './loop-input.ts';

const help = `loopwright margins --loop "<expression>" [--param NAME=VALUE ...] [--pade-order N] [--json]
loopwright margins --loop "<expression>" --sample-time T [--hold zoh] [--compute-delay D] [--json]

Stability margins of a loop transfer L(s), characteristic equation 1 + L(s) = 0 (L is the
whole loop: controller times plant times sensor, with the feedback sign taken into L).
Dead time exp(-T*s) is kept exact for every frequency-domain figure; the closed-loop poles
(the stability verdict) use a Padé approximant whose order is reported.

  --loop EXPR       the loop, e.g. "Kc*(1 + 1/(Ti*s)) * 2*exp(-s)/(10*s + 1)"
  --param NAME=V    value of a parameter used in EXPR (repeatable)
  --pade-order N    Padé order for the dead time in the closed-loop poles (1..10; default: chosen
                    to follow the delay's phase within 1° up to twice the highest crossover)
  --json            machine-readable output (null where a quantity does not exist)
  --sample-time T   the loop is sampled every T seconds: the error is sampled, held by a
                    zero-order hold and drives L(s) (L(s) is the whole continuous loop). The
                    margins then come from the exact pulse transfer function G(z) on the unit
                    circle up to the Nyquist frequency π/T; closed-loop poles are z-plane poles
                    (stable inside the unit circle, with the Jury test). The continuous
                    estimate (hold as e^(-sT/2)) is shown beside it, labelled as an estimate.
  --hold zoh        the hold (only the zero-order hold)
  --compute-delay D computation delay in samples (0 none, 1 one sample, or a fraction; default 0)

Reported: every gain crossover (|L| = 1) with its phase margin, every phase crossover
(phase = -180° + k·360°) with the gain factor that reaches -1 there; the gain margin (smallest
factor above 1) and, for a conditionally stable loop, the lower gain margin (largest factor
below 1); the worst phase margin; the delay margin min PM/ω; peak sensitivity Ms = max|1/(1+L)|
and Mt = max|L/(1+L)|; closed-loop bandwidth (-3 dB of T relative to DC); closed-loop poles.
Margins are read together with the closed-loop verdict, never instead of it.

A sampled loop also gets a warning when T is slow for the crossover (guideline ωc·T ≈ 0.15–0.5,
Åström & Wittenmark, Computer-Controlled Systems, from memory).

Example: npx loopwright margins --loop "4/(s+1)^3"
         npx loopwright margins --loop "4/(s+1)^3" --sample-time 0.05 --compute-delay 1
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

/** The JSON of sampled margins: the fields of the continuous margins plus the sampling fields. */
export function sampledMarginsJson(m: SampledMargins) {
  const pair = (z: { re: number; im: number }) => [z.re, z.im];
  return {
    // The sampled notes replace the continuous ones below.
    ...marginsJson({ ...m, notes: [] }),
    ...sampledMarginFigures(m),
    closedLoopPolesPlane: 'z',
    pulseTransfer: { numeratorAscending: m.pulse.rational.num, denominatorAscending: m.pulse.rational.den },
    jury: { stable: m.jury.stable },
    continuousEstimate: m.continuousEstimate ? { label: m.continuousEstimate.label, ...marginFigures(m.continuousEstimate.margins) } : null,
    continuous: m.continuous ? marginFigures(m.continuous) : null,
    notes: m.notes,
    closedLoopPolesAbs: m.closedLoopPoles.map((z) => Math.hypot(z.re, z.im)),
    closedLoopPoles: m.closedLoopPoles.map(pair),
  };
}

const opt = (x: number | null, unit = '', digits = 6) => (x === null ? 'none' : `${fmtNumber(x, digits)}${unit}`);

export const marginsCommand: Command = {
  name: 'margins',
  summary: 'gain, phase and delay margins, Ms/Mt, bandwidth and closed-loop verdict of a loop',
  help,
  async run(argv, io, budget = {}) {
    const a = parseArgs(argv, ['loop', 'param', 'pade-order', 'sample-time', 'hold', 'compute-delay'], ['json']);
    if (a.positional.length) throw new UsageError(`margins: unexpected argument "${a.positional[0]}" (the loop goes in --loop "...")`);
    const padeOrder = numberFlag(a, 'pade-order');
    const loop = loopFromArgs(a, 'margins');
    const sampleTime = numberFlag(a, 'sample-time');
    if (sampleTime === undefined && (has(a, 'hold') || has(a, 'compute-delay')))
      throw new UsageError('margins: --hold and --compute-delay need --sample-time T', '--sample-time');
    if (sampleTime !== undefined) {
      if (padeOrder !== undefined)
        throw new UsageError('margins: --pade-order does not apply to a sampled loop (its poles are exact z-plane poles)', '--pade-order');
      const computeDelay = numberFlag(a, 'compute-delay');
      const hold = one(a, 'hold');
      const { loop: tf, margins: sm } = withCaret(loop, () =>
        expressionSampledMargins(loop, {
          sampleTime,
          ...(computeDelay !== undefined ? { computeDelay } : {}),
          ...(hold !== undefined ? { hold } : {}),
        }),
      );
      io.stdout(has(a, 'json') ? toJson(sampledMarginsJson(sm)) : sampledText(tf, sm));
      return 0;
    }
    const {
      loop: tf,
      margins: m,
      poleOrigin,
    } = withCaret(loop, () => expressionMargins(loop, { ...(padeOrder !== undefined ? { padeOrder } : {}), ...budget }));
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

function sampledText(tf: TransferFunction, m: SampledMargins): string {
  const est = m.continuousEstimate?.margins ?? null;
  const pm = (x: Omit<LoopMargins, 'notes'> | null) =>
    x === null || x.phaseMarginDeg === null ? 'none' : `${fmtNumber(x.phaseMarginDeg, 5)}° at ${fmtNumber(x.gainCrossover!)} rad/s`;
  const gm = (x: Omit<LoopMargins, 'notes'> | null) =>
    x === null || x.gainMargin === null
      ? 'infinite'
      : `${fmtNumber(x.gainMargin)} (${fmtNumber(x.gainMarginDb!, 4)} dB) at ${fmtNumber(x.phaseCrossover!)} rad/s`;
  const lines = [
    `L(s) = ${fmtTransfer(tf.rational.num, tf.rational.den, tf.delay)}, sampled every T = ${fmtNumber(m.sampleTime)} s behind a zero-order hold, computation delay ${fmtNumber(m.computeDelay)} samples`,
    `G(z) = (${m.pulse.rational.num.map((c) => fmtNumber(c)).join(', ')}) / (${m.pulse.rational.den.map((c) => fmtNumber(c)).join(', ')})   (ascending powers of z)`,
    '',
    `sampled loop (exact pulse transfer function, ω up to π/T = ${fmtNumber(m.nyquistFrequency)} rad/s)`,
    `  gain margin        ${gm(m)}`,
    ...(m.lowerGainMargin !== null
      ? [
          `  lower gain margin  ${fmtNumber(m.lowerGainMargin)} (${fmtNumber(m.lowerGainMarginDb!, 4)} dB) at ${fmtNumber(m.lowerPhaseCrossover!)} rad/s`,
        ]
      : []),
    `  phase margin       ${pm(m)}`,
    `  delay margin       ${opt(m.delayMargin, ' s')}`,
    `  peak sensitivity   Ms = ${opt(m.peakSensitivity)}`,
    `  peak compl. sens.  Mt = ${opt(m.peakComplementary)}`,
    `  bandwidth          ${opt(m.bandwidth, ' rad/s')}`,
    `  closed loop        ${m.closedLoopStable ? 'stable' : 'NOT stable'} (z-plane poles ${m.closedLoopStable ? 'inside' : 'not all inside'} the unit circle; Jury test ${m.jury.stable ? 'passed' : 'failed'})`,
    `  closed-loop poles  ${fmtRootsMarked(m.closedLoopPoles, [])}   (z-plane)`,
    '',
    `${m.continuousEstimate ? m.continuousEstimate.label : 'continuous estimate: none'}`,
    `  gain margin        ${gm(est)}`,
    `  phase margin       ${pm(est)}`,
    `continuous loop without sampling: phase margin ${pm(m.continuous)}, gain margin ${gm(m.continuous)}`,
  ];
  for (const n of m.notes) lines.push('', `${n.level}: ${n.message} (${n.guideline})`);
  if (!m.closedLoopStable) lines.push('', 'The sampled closed loop is not stable: the margins above do not describe a working loop.');
  return lines.join('\n') + '\n';
}
