import { InputError, type TransferFunction } from '@loopwright/lti';
import type { ControllerSpec } from './controller.ts';

const num = (v: unknown): number | undefined => (typeof v === 'number' && !Number.isNaN(v) ? v : undefined);

/**
 * The controller spec of a diagram block from its resolved parameters (field names as in the
 * block catalogue; blanks already resolved: no limit ±Infinity, blank tracking time NaN) and its
 * continuous transfer function (used by the transfer-function kind). The one mapping the
 * simulator, the sampled-loop analysis and the code export share.
 */
export function controllerSpecOf(kind: string, p: Record<string, unknown>, continuous: TransferFunction): ControllerSpec {
  switch (kind) {
    case 'pid': {
      const spec: ControllerSpec = { kind: 'pid', form: p.form === 'parallel' ? 'parallel' : 'ideal', kp: num(p.kp) ?? 0, n: num(p.n) };
      for (const f of ['ti', 'td', 'ki', 'kd', 'umin', 'umax', 'tt'] as const) {
        const v = num(p[f]);
        if (v !== undefined) spec[f] = v;
      }
      spec.antiWindup = p.antiWindup as 'off' | 'back-calculation' | 'conditional';
      return spec;
    }
    case 'lead-lag':
      return { kind: 'lead-lag', k: num(p.k) ?? 1, tLead: num(p.tLead) ?? 0, tLag: num(p.tLag) ?? 0 };
    case 'gain':
      return { kind: 'gain', k: num(p.k) ?? 1 };
    case 'transfer-function':
      return { kind: 'transfer-function', tf: continuous };
    default:
      throw new InputError(`block kind ${kind} has no sampled form`, { field: 'kind' });
  }
}
