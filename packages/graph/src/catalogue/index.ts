import { InputError } from '@loopwright/lti';
import { deadTimeSpec } from './dead-time.ts';
import { deadZoneSpec } from './dead-zone.ts';
import { firstOrderLagSpec } from './first-order-lag.ts';
import { gainSpec } from './gain.ts';
import { integratorSpec } from './integrator.ts';
import { leadLagSpec } from './lead-lag.ts';
import { notchSpec } from './notch.ts';
import { pidSpec } from './pid.ts';
import { probeSpec } from './probe.ts';
import { rateLimitSpec } from './rate-limit.ts';
import { saturationSpec } from './saturation.ts';
import { secondOrderSpec } from './second-order.ts';
import { sourceSpec } from './source.ts';
import { summingJunctionSpec } from './summing-junction.ts';
import { transferFunctionSpec } from './transfer-function.ts';
import type { BlockSpec, CardContent, StoredParams } from './types.ts';
import { show } from './card-text.ts';
import { isSampledKind, sampleTimeSet, samplingFieldVisible, SAMPLING_FIELDS } from './sampling.ts';

export type { BlockSpec, CardContent, IconStroke, LinearForm, ParamSpec, ResolvedParams, StoredParams } from './types.ts';
export { defineBlock, unitOf } from './types.ts';
export { sumSigns, MAX_SUM_INPUTS } from './summing-junction.ts';
export { defaultTrackingTime, PID_FORMS, ANTI_WINDUP_MODES } from './pid.ts';
export { SOURCE_SHAPES } from './source.ts';
export { NOTCH_UNITS, notchFigures, type NotchFigures } from './notch.ts';

export {
  SAMPLED_METHODS,
  SAMPLED_INTEGRALS,
  SAMPLED_DERIVATIVES,
  SAMPLING_FIELDS,
  samplingParams,
  samplingOf,
  samplingFieldVisible,
  sampleTimeSet,
  isSampledKind,
  type SampledKind,
  type BlockSampling,
} from './sampling.ts';

/** Every block kind, in the order the Parts panel lists them. */
export const catalogue = [
  sourceSpec,
  summingJunctionSpec,
  pidSpec,
  gainSpec,
  leadLagSpec,
  integratorSpec,
  firstOrderLagSpec,
  secondOrderSpec,
  notchSpec,
  transferFunctionSpec,
  deadTimeSpec,
  saturationSpec,
  rateLimitSpec,
  deadZoneSpec,
  probeSpec,
] as const;

/** The block kinds: derived from the catalogue, so adding a spec above is all a new kind needs here. */
export type BlockKind = (typeof catalogue)[number]['kind'];

export const blockKinds: readonly BlockKind[] = catalogue.map((s) => s.kind);

const byKind = new Map<string, BlockSpec>(catalogue.map((s): [string, BlockSpec] => [s.kind, s]));

export function isBlockKind(kind: unknown): kind is BlockKind {
  return typeof kind === 'string' && byKind.has(kind);
}

export function blockSpec(kind: BlockKind | string): BlockSpec {
  const spec = byKind.get(kind);
  if (!spec) throw new InputError(`unknown block kind "${kind}" (known: ${blockKinds.join(', ')})`, { field: 'kind' });
  return spec;
}

/** The fields that matter for a block as configured (BlockSpec.shows), in catalogue order. */
export function visibleParams(kind: BlockKind, params: StoredParams): BlockSpec['params'] {
  const spec = blockSpec(kind);
  const shown = spec.shows ? spec.params.filter((p) => spec.shows!(p.name, params)) : spec.params;
  // Sampling fields beyond the sample time matter only once a sample time is set.
  return isSampledKind(kind) ? shown.filter((p) => !SAMPLING_FIELDS.includes(p.name) || samplingFieldVisible(p.name, params)) : shown;
}

/** What a block's card shows: its kind's card, and for a sampled controller its sample time and computation delay. */
export function cardOf(kind: BlockKind, params: StoredParams): CardContent {
  const c = blockSpec(kind).card(params);
  const T = params.sampleTime;
  if (!isSampledKind(kind) || !sampleTimeSet(T)) return c;
  const delay = params.computeDelay;
  const d =
    typeof delay === 'number' && delay > 0
      ? `, delay ${show(delay)} sample${delay === 1 ? '' : 's'}`
      : typeof delay === 'string' && delay.trim()
        ? `, delay ${delay}`
        : '';
  const sampled = `sampled every ${show(T)} s${d}`;
  return { ...c, caption: c.caption ? `${c.caption}; ${sampled}` : sampled };
}
