import type { BlockKind } from '@loopwright/graph';
import { buildDeadZone } from './dead-zone.ts';
import { buildLinear } from './linear.ts';
import { buildPid } from './pid.ts';
import { buildRateLimit } from './rate-limit.ts';
import type { Builder } from './registry-types.ts';
import { buildSaturation } from './saturation.ts';
import { buildSource } from './source.ts';
import { sampledOr } from './sampled.ts';
import { buildSum } from './sum.ts';

/**
 * Which builder makes the run-time nodes of each block kind, keyed by the catalogue's kinds: a
 * kind added to the catalogue and missing here is a type error. Linear kinds use buildLinear
 * (their catalogue transfer function with its dead time, ops/linear.ts). A probe makes no node
 * (null): it reads the signal it is wired to.
 */
const builders: Readonly<Record<BlockKind, Builder | null>> = {
  source: buildSource,
  'summing-junction': buildSum,
  pid: sampledOr(buildPid), // controller kinds with sampling fields: sampled when a sample time is set
  gain: sampledOr(buildLinear),
  'lead-lag': sampledOr(buildLinear),
  integrator: buildLinear,
  'first-order-lag': buildLinear,
  'second-order': buildLinear,
  notch: buildLinear,
  'transfer-function': sampledOr(buildLinear),
  'dead-time': buildLinear,
  saturation: buildSaturation,
  'rate-limit': buildRateLimit,
  'dead-zone': buildDeadZone,
  probe: null,
};

/** The builder of a kind; null for a kind that makes no node (a probe). */
export function builderFor(kind: BlockKind): Builder | null {
  return builders[kind];
}
