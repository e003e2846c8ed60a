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
import type { BlockSpec, StoredParams } from './types.ts';

export type { BlockSpec, CardContent, IconStroke, LinearForm, ParamSpec, ResolvedParams, StoredParams } from './types.ts';
export { defineBlock, unitOf } from './types.ts';
export { sumSigns, MAX_SUM_INPUTS } from './summing-junction.ts';
export { defaultTrackingTime, PID_FORMS, ANTI_WINDUP_MODES } from './pid.ts';
export { SOURCE_SHAPES } from './source.ts';
export { NOTCH_UNITS, notchFigures, type NotchFigures } from './notch.ts';

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
  return spec.shows ? spec.params.filter((p) => spec.shows!(p.name, params)) : spec.params;
}
