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
 * Which builder makes the run-time nodes of each block kind. Kinds not listed are linear: their
 * catalogue transfer function (with its dead time) is realised by ops/linear.ts — a new linear
 * kind (a notch filter, say) needs nothing here. Probes make no node: they read the signal
 * they are wired to.
 */
const builders: Partial<Record<BlockKind, Builder>> = {
  source: buildSource,
  'summing-junction': buildSum,
  saturation: buildSaturation,
  'dead-zone': buildDeadZone,
  'rate-limit': buildRateLimit,
  // controller kinds with sampling fields: sampled when a sample time is set
  pid: sampledOr(buildPid),
  'lead-lag': sampledOr(buildLinear),
  'transfer-function': sampledOr(buildLinear),
  gain: sampledOr(buildLinear),
};

export function builderFor(kind: BlockKind): Builder {
  return builders[kind] ?? buildLinear;
}
