import { InputError, radd, rational, rconst, transfer, type Rational } from '@loopwright/lti';
import { finite, numberOf, singleInput, singleOutput, stringOf } from './common.ts';
import { samplingParams } from './sampling.ts';
import { orderedLimits } from './saturation.ts';
import { isBlank, isZero, show, term, times } from './card-text.ts';
import { defineBlock, type CardContent, type ResolvedParams, type StoredParams } from './types.ts';

export const PID_FORMS = ['ideal', 'parallel'] as const;
export const ANTI_WINDUP_MODES = ['off', 'back-calculation', 'conditional'] as const;

/**
 * Tracking time for back-calculation when the field is blank: Tt = √(Ti·Td) with derivative
 * action, Tt = Ti without (Åström & Hägglund, Advanced PID Control, 2006, §3.5 (from memory):
 * Tt between Td and Ti). For the parallel form Ti = kp/ki and Td = kd/kp. 1 s when there is no
 * integral action (then tracking does nothing).
 */
export function defaultTrackingTime(p: ResolvedParams): number {
  let ti: number;
  let td: number;
  if (p.form === 'parallel') {
    const kp = Number(p.kp);
    const ki = Number(p.ki);
    const kd = Number(p.kd);
    ti = kp !== 0 && ki !== 0 ? kp / ki : NaN;
    td = kp !== 0 ? kd / kp : 0;
  } else {
    ti = Number(p.ti);
    td = Number(p.td);
  }
  if (!(ti > 0) || !Number.isFinite(ti)) return 1;
  return td > 0 && Number.isFinite(td) ? Math.sqrt(ti * td) : ti;
}

/** The controller's linear transfer function (limits and anti-windup play no part in it). */
function pidRational(p: ResolvedParams): Rational {
  const form = stringOf(p, 'form');
  const n = finite(p, 'n');
  if (form === 'parallel') {
    const kp = finite(p, 'kp');
    const ki = finite(p, 'ki');
    const kd = finite(p, 'kd');
    let c = radd(rconst(kp), rational([ki], [0, 1]));
    if (kd !== 0) {
      if (kp === 0) {
        throw new InputError('field kp: the parallel form with kd ≠ 0 needs kp ≠ 0 (derivative filter time constant kd/(kp·n))', {
          field: 'kp',
        });
      }
      const tf = kd / kp / n;
      if (!(tf > 0)) throw new InputError(`field kd: kd/kp must be positive for the derivative filter, got ${kd / kp}`, { field: 'kd' });
      c = radd(c, rational([0, kd], [1, tf]));
    }
    return c;
  }
  const kp = finite(p, 'kp');
  const ti = numberOf(p, 'ti'); // Infinity (blank) = no integral action
  const td = finite(p, 'td');
  let c = rconst(kp);
  if (Number.isFinite(ti)) c = radd(c, rational([kp], [0, ti]));
  if (td > 0) c = radd(c, rational([0, kp * td], [1, td / n]));
  return c;
}

/** The card: the controller's formula in its chosen form, and its output limits when set. */
function pidCard(p: StoredParams): CardContent {
  const kp = term(p.kp) ?? '0';
  const n = term(p.n) ?? '10';
  const limits =
    isBlank(p, 'umin') && isBlank(p, 'umax')
      ? undefined
      : `output ${isBlank(p, 'umin') ? '−∞' : show(p.umin)} … ${isBlank(p, 'umax') ? '∞' : show(p.umax)}`;
  if (p.form === 'parallel') {
    const parts = [kp];
    const ki = term(p.ki);
    const kd = term(p.kd);
    if (!isZero(ki)) parts.push(`${ki}/s`);
    if (!isZero(kd)) parts.push(`${kd}*s/(1 + ${kd}/${kp}*s/${n})`);
    return { formula: parts.join(' + '), caption: limits };
  }
  const inner = ['1'];
  const ti = term(p.ti);
  const td = term(p.td);
  if (ti !== null) inner.push(`1/(${ti}*s)`);
  if (!isZero(td)) inner.push(`${td}*s/(1 + ${td}*s/${n})`);
  return { formula: inner.length === 1 ? kp : times(kp, `(${inner.join(' + ')})`), caption: limits };
}

export const pidSpec = defineBlock({
  kind: 'pid',
  title: 'PID controller',
  description:
    'Ideal form kp·(1 + 1/(ti·s) + td·s/(1 + td·s/n)) or parallel form kp + ki/s + kd·s/(1 + (kd/kp)·s/n); ' +
    'the derivative is filtered with time constant td/n. Optional output limits umin/umax (blank = none) ' +
    'with anti-windup by back-calculation (tracking time tt, blank = √(ti·td), or ti without derivative) or ' +
    'conditional integration. Its linear form ignores the limits.',
  category: 'linear',
  idPrefix: 'pid',
  params: [
    { name: 'form', label: 'Form', type: 'choice', default: 'ideal', choices: PID_FORMS },
    { name: 'kp', label: 'Proportional gain kp', type: 'number', default: 1 },
    {
      name: 'ti',
      label: 'Integral time ti',
      unit: 's',
      type: 'number',
      default: 1,
      min: 0,
      exclusiveMin: true,
      blank: Infinity,
      description: 'Ideal form; blank = no integral action',
    },
    { name: 'td', label: 'Derivative time td', unit: 's', type: 'number', default: 0, min: 0, max: 1e6, description: 'Ideal form' },
    { name: 'ki', label: 'Integral gain ki', unit: '1/s', type: 'number', default: 1, description: 'Parallel form' },
    { name: 'kd', label: 'Derivative gain kd', unit: 's', type: 'number', default: 0, description: 'Parallel form' },
    {
      name: 'n',
      label: 'Derivative filter n',
      type: 'number',
      default: 10,
      min: 0,
      exclusiveMin: true,
      max: 1e6,
      description: 'Filter time constant = td/n (typically 5–20)',
    },
    { name: 'umin', label: 'Output lower limit', type: 'number', default: '', blank: -Infinity },
    { name: 'umax', label: 'Output upper limit', type: 'number', default: '', blank: Infinity },
    { name: 'antiWindup', label: 'Anti-windup', type: 'choice', default: 'back-calculation', choices: ANTI_WINDUP_MODES },
    {
      name: 'tt',
      label: 'Tracking time tt',
      unit: 's',
      type: 'number',
      default: '',
      min: 0,
      exclusiveMin: true,
      blank: NaN,
      description: 'Back-calculation; blank = √(ti·td), or ti without derivative',
    },
    ...samplingParams('pid'),
  ],
  actuator: { lower: 'umin', upper: 'umax', onlyWithLimits: true },
  shows: (field, p) => {
    const parallel = p.form === 'parallel';
    if (field === 'ti' || field === 'td') return !parallel;
    if (field === 'ki' || field === 'kd') return parallel;
    if (field === 'tt') return (p.antiWindup ?? 'back-calculation') === 'back-calculation';
    return true;
  },
  card: pidCard,
  inputs: singleInput,
  outputs: singleOutput,
  complete: (p) => {
    if (typeof p.tt !== 'number' || Number.isNaN(p.tt)) p.tt = defaultTrackingTime(p);
  },
  linear: (p) => {
    orderedLimits(p, 'umin', 'umax', true);
    return { type: 'transfer', tf: transfer(pidRational(p)) };
  },
});
