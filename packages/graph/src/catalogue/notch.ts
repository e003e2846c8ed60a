import { formatEngineering } from '@loopwright/lti';
import { show } from './card-text.ts';
import { finite, singleInput, singleOutput, stringOf, tfOf } from './common.ts';
import { defineBlock, type CardContent, type ResolvedParams, type StoredParams } from './types.ts';

export const NOTCH_UNITS = ['Hz', 'rad/s'] as const;

/**
 * The second-order notch N(s) = (s² + 2ζz·ωn·s + ωn²)/(s² + 2ζp·ωn·s + ωn²): unity gain far from
 * ωn, gain ζz/ζp at ωn (the depth), zero phase at ωn. Its −3 dB band (when the depth is below
 * −3 dB) is exactly 2ωn·√(ζp² − 2ζz²) wide, ≈ 2ζp·ωn for a deep notch.
 */
export interface NotchFigures {
  /** Notch frequency in rad/s. */
  wn: number;
  /** Damping of the zeros and of the poles; zetaZ/zetaP is the gain at ωn. */
  zetaZ: number;
  zetaP: number;
  /** Width of the band below −3 dB in rad/s (0 when the notch is shallower than −3 dB). */
  width3dB: number;
}

/** ωn in rad/s from the frequency field and its unit. */
const toRadPerSecond = (f: number, unit: string): number => (unit === 'Hz' ? 2 * Math.PI * f : f);

export function notchFigures(p: ResolvedParams): NotchFigures {
  const wn = toRadPerSecond(finite(p, 'frequency'), stringOf(p, 'frequencyUnit'));
  const zetaP = finite(p, 'damping');
  const zetaZ = zetaP * 10 ** (finite(p, 'depth') / 20);
  const d = zetaP * zetaP - 2 * zetaZ * zetaZ;
  return { wn, zetaZ, zetaP, width3dB: d > 0 ? 2 * wn * Math.sqrt(d) : 0 };
}

/** The card: the transfer function with numbers when every field is a number, symbolic otherwise; the figures below. */
function notchCard(p: StoredParams): CardContent {
  const unit = p.frequencyUnit === 'rad/s' ? 'rad/s' : 'Hz';
  const { frequency: f, depth, damping } = p;
  if (typeof f === 'number' && typeof depth === 'number' && typeof damping === 'number' && f > 0 && damping > 0 && depth <= 0) {
    const n = notchFigures({ frequency: f, frequencyUnit: unit, depth, damping });
    const e = formatEngineering;
    const w2 = e(n.wn * n.wn);
    const width = unit === 'Hz' ? n.width3dB / (2 * Math.PI) : n.width3dB;
    return {
      formula: `(s^2 + ${e(2 * n.zetaZ * n.wn)}*s + ${w2})/(s^2 + ${e(2 * n.zetaP * n.wn)}*s + ${w2})`,
      caption: `${e(f)} ${unit}, ${e(depth)} dB` + (width > 0 ? `, -3 dB width ${e(width)} ${unit}` : ''),
    };
  }
  // A field is an expression over named parameters: the form, with the fields as typed below.
  return {
    formula: '(s^2 + 2*zz*wn*s + wn^2)/(s^2 + 2*zp*wn*s + wn^2)',
    caption: `${show(f)} ${unit}, ${show(depth)} dB, ζp ${show(damping)}`,
  };
}

export const notchSpec = defineBlock({
  kind: 'notch',
  title: 'Notch filter',
  description:
    '(s² + 2·ζz·ωn·s + ωn²)/(s² + 2·ζp·ωn·s + ωn²): passes the signal with gain 1 away from the notch frequency ωn and ' +
    'attenuates it to the depth at ωn (ζz = ζp·10^(depth/20)); the pole damping ζp sets the width (the −3 dB band is ' +
    'about 2·ζp·ωn wide for a deep notch). Typically placed after a speed controller against a mechanical resonance: ' +
    'measure the resonance on the machine and check the loop with it shifted, since one that leaves the notch is not attenuated.',
  category: 'linear',
  idPrefix: 'notch',
  params: [
    {
      name: 'frequency',
      label: 'Notch frequency',
      unitFrom: 'frequencyUnit',
      type: 'number',
      default: 50,
      min: 0,
      exclusiveMin: true,
      max: 1e6,
    },
    { name: 'frequencyUnit', label: 'Frequency unit', type: 'choice', default: 'Hz', choices: NOTCH_UNITS },
    {
      name: 'depth',
      label: 'Depth (gain at the notch)',
      unit: 'dB',
      type: 'number',
      default: -20,
      min: -200,
      max: 0,
      description: '0 dB: no notch; −20 dB: a tenth',
    },
    {
      name: 'damping',
      label: 'Width (pole damping ζp)',
      type: 'number',
      default: 0.3,
      min: 0,
      exclusiveMin: true,
      max: 10,
      description: 'Wider with larger ζp: the −3 dB band is about 2·ζp·ωn',
    },
  ],
  card: notchCard,
  icon: [{ d: 'M2 5 H13 C17 5 18 17 20 17 C22 17 23 5 27 5 H38' }],
  inputs: singleInput,
  outputs: singleOutput,
  linear: (p) => {
    const { wn, zetaZ, zetaP } = notchFigures(p);
    return { type: 'transfer', tf: tfOf([wn * wn, 2 * zetaZ * wn, 1], [wn * wn, 2 * zetaP * wn, 1]) };
  },
});
