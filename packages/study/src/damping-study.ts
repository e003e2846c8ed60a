/**
 * The gain for a target damping on the exact locus of a sweep: the swept value at which the
 * dominant closed-loop poles of the whole diagram reach damping ζ (@loopwright/tune
 * gainForDamping on the characteristic polynomial D0 + k·N0 the locus is drawn from) — strictly
 * dominant (no pole to their right), else the slowest oscillating pair (only real poles to its
 * right, named in a note). The direction follows the document's value: a negative value is
 * searched on the k < 0 locus.
 */
import { DEFAULT_PADE_ORDER, type Diagram } from '@loopwright/graph';
import { InputError, poly } from '@loopwright/lti';
import { gainForDamping } from '@loopwright/tune';
import { splitOf, without } from './split.ts';
import { checkTarget, documentValue, engineDiagram, engineParameterName, targetKey } from './sweep-target.ts';
import type { DampingData, SweepTarget } from './types.ts';
import { assertAnalysable } from './validate.ts';

export interface DampingRequest {
  target: SweepTarget;
  /** Target damping ζ in [0, 1) (default 0.7). */
  zeta?: number;
  overrides?: Record<string, number>;
  padeOrder?: number;
}

const plain = (c: { re: number; im: number }) => ({ re: c.re, im: c.im });

export function dampingStudy(d: Diagram, req: DampingRequest): DampingData {
  const zeta = req.zeta ?? 0.7;
  checkTarget(d, req.target);
  const ed = engineDiagram(d, req.target);
  const name = engineParameterName(req.target);
  const overrides = without(req.overrides ?? {}, name);
  assertAnalysable(ed, overrides);
  const split = splitOf(ed, name, overrides, req.padeOrder ?? DEFAULT_PADE_ORDER);
  if (!split) {
    throw new InputError(
      `${name} does not enter the characteristic polynomial as one affine gain, so its locus is not exact: no damping target can be read from it`,
      { field: 'sweep' },
    );
  }
  const current = documentValue(d, req.target);
  const sign = current < 0 ? -1 : 1;
  const r = gainForDamping(sign > 0 ? split.n0 : poly.scale(split.n0, -1), split.d0, zeta);
  const notes: string[] = [];
  // Strictly dominant: no closed-loop pole to the right. Failing that, the slowest oscillating
  // pair: no complex pole to its right, only real ones (a PI's slow pole beside its zero, a
  // slow lag), which the note names — what an engineer reads as "the dominant pair".
  const oscillatory = (c: (typeof r.crossings)[number]) => {
    const tol = 1e-6 * Math.max(1, Math.hypot(c.pole.re, c.pole.im));
    return !c.poles.some((p) => Math.abs(p.im) > tol && p.re > c.pole.re + tol);
  };
  let crossing = r.crossing;
  if (!crossing) {
    crossing = r.crossings.find(oscillatory) ?? null;
    if (crossing) {
      const tol = 1e-6 * Math.max(1, Math.hypot(crossing.pole.re, crossing.pole.im));
      const slower = crossing.poles.filter((p) => Math.abs(p.im) <= tol && p.re > crossing!.pole.re + tol).map((p) => p.re);
      notes.push(
        `the pair at damping ${zeta} is the slowest oscillating one; real pole${slower.length > 1 ? 's' : ''} at ${slower.map((x) => x.toPrecision(3)).join(', ')} lie${slower.length > 1 ? '' : 's'} to its right (slower, not oscillating): check them in the response`,
      );
    }
  }
  if (!crossing) {
    notes.push(
      r.crossings.length
        ? `the ζ = ${zeta} line is crossed, but never by the slowest oscillating pair (another complex pole lies to its right there)`
        : `no branch of the locus crosses the ζ = ${zeta} line for ${sign > 0 ? 'positive' : 'negative'} values`,
    );
  }
  if (split.handling.mode === 'pade') notes.push(split.handling.note);
  return {
    zeta,
    target: targetKey(req.target),
    parameter: name,
    value: crossing ? sign * crossing.gain : null,
    dominance: crossing ? (crossing === r.crossing ? 'strict' : 'oscillatory') : null,
    current,
    pole: crossing ? plain(crossing.pole) : null,
    naturalFrequency: crossing ? crossing.naturalFrequency : null,
    poles: crossing ? crossing.poles.map(plain) : [],
    crossings: r.crossings.map((c) => ({ value: sign * c.gain, pole: plain(c.pole), dominant: c.dominant })),
    delayHandling: split.handling,
    notes,
  };
}
