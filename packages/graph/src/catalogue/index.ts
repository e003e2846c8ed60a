import { InputError } from '@loopwright/lti';
import type { BlockKind } from '../document-types.ts';
import { deadTimeSpec } from './dead-time.ts';
import { deadZoneSpec } from './dead-zone.ts';
import { firstOrderLagSpec } from './first-order-lag.ts';
import { gainSpec } from './gain.ts';
import { integratorSpec } from './integrator.ts';
import { leadLagSpec } from './lead-lag.ts';
import { pidSpec } from './pid.ts';
import { probeSpec } from './probe.ts';
import { rateLimitSpec } from './rate-limit.ts';
import { saturationSpec } from './saturation.ts';
import { secondOrderSpec } from './second-order.ts';
import { sourceSpec } from './source.ts';
import { summingJunctionSpec } from './summing-junction.ts';
import { transferFunctionSpec } from './transfer-function.ts';
import type { BlockSpec } from './types.ts';

export type { BlockSpec, LinearForm, ParamSpec, ResolvedParams } from './types.ts';
export { sumSigns, MAX_SUM_INPUTS } from './summing-junction.ts';
export { defaultTrackingTime, PID_FORMS, ANTI_WINDUP_MODES } from './pid.ts';
export { SOURCE_SHAPES } from './source.ts';
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
export const catalogue: BlockSpec[] = [
  sourceSpec,
  summingJunctionSpec,
  pidSpec,
  gainSpec,
  leadLagSpec,
  integratorSpec,
  firstOrderLagSpec,
  secondOrderSpec,
  transferFunctionSpec,
  deadTimeSpec,
  saturationSpec,
  rateLimitSpec,
  deadZoneSpec,
  probeSpec,
];

export const blockKinds = catalogue.map((s) => s.kind) as BlockKind[];

const byKind = new Map<string, BlockSpec>(catalogue.map((s) => [s.kind, s]));

export function isBlockKind(kind: unknown): kind is BlockKind {
  return typeof kind === 'string' && byKind.has(kind);
}

export function blockSpec(kind: BlockKind | string): BlockSpec {
  const spec = byKind.get(kind);
  if (!spec) throw new InputError(`unknown block kind "${kind}" (known: ${blockKinds.join(', ')})`, { field: 'kind' });
  return spec;
}
