import type { Diagram } from '../document-types.ts';
import { linearFormWithScope, parameterScope, type ParameterOverrides } from '../resolve.ts';
import type { LinearBlock, LinearGraph } from './linear-graph.ts';

/**
 * The linear model of a diagram: each block's linear form (nonlinear blocks take their
 * small-signal form as the catalogue documents it) with parameters resolved over the named
 * parameters and the overrides. Errors name the block and field (from the catalogue).
 */
export function linearGraphOf(d: Diagram, overrides?: ParameterOverrides): LinearGraph {
  const scope = parameterScope(d, overrides);
  const blocks: LinearBlock[] = d.blocks.map((b) => {
    const f = linearFormWithScope(b, scope);
    switch (f.type) {
      case 'transfer':
        return { id: b.id, kind: 'transfer', tf: f.tf };
      case 'sum':
        return { id: b.id, kind: 'sum', signs: f.signs };
      case 'source':
        return { id: b.id, kind: 'source' };
      case 'probe':
        return { id: b.id, kind: 'probe' };
    }
  });
  const wires = d.wires.map((w) => ({ id: w.id, from: w.from.block, to: w.to.block, port: w.to.port }));
  return { blocks, wires };
}
