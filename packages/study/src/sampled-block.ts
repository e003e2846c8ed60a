/**
 * A sampled controller block of a diagram as `@loopwright/sampled` sees it: its resolved
 * parameters turned into a controller spec, its sampling fields into sampling settings, and the
 * discrete controller (coefficients, difference equation, C(z)) that the simulator, the
 * sampled-loop analysis and the code export all use.
 */
import { InputError, type TransferFunction } from '@loopwright/lti';
import { type Block, type BlockSampling, type Diagram, linearForm, resolveParams, samplingOf } from '@loopwright/graph';
import { type DiscreteController, controllerSpecOf, discretizeController } from '@loopwright/sampled';

export interface SampledBlock {
  block: Block;
  sampling: BlockSampling;
  /** The continuous transfer function the block stands for (its linear form). */
  continuous: TransferFunction;
  controller: DiscreteController;
}

/** Re-throws an error of the sampled math with the block named. */
function naming<T>(block: Block, fn: () => T): T {
  try {
    return fn();
  } catch (err) {
    if (err instanceof InputError && !err.message.startsWith(`block ${block.id}`)) {
      throw new InputError(`block ${block.id} ${err.message.startsWith('field ') ? err.message : `sampled form: ${err.message}`}`, {
        ...err.details,
        field: `blocks.${block.id}.params.${err.details.field ?? 'sampleTime'}`,
      });
    }
    throw err;
  }
}

/** The sampled form of a block, or null when the block is continuous (no sample time). */
export function sampledBlockOf(d: Pick<Diagram, 'parameters'>, block: Block, overrides?: Record<string, number>): SampledBlock | null {
  const p = resolveParams(d, block, overrides);
  const sampling = naming(block, () => samplingOf(block.kind, p));
  if (!sampling) return null;
  const lf = linearForm(d, block, overrides);
  if (lf.type !== 'transfer') return null;
  const controller = naming(block, () => discretizeController(controllerSpecOf(block.kind, p, lf.tf), sampling));
  return { block, sampling, continuous: lf.tf, controller };
}

/** Every sampled block of a diagram, in document order. */
export function sampledBlocks(d: Diagram, overrides?: Record<string, number>): SampledBlock[] {
  const out: SampledBlock[] = [];
  for (const b of d.blocks) {
    const s = sampledBlockOf(d, b, overrides);
    if (s) out.push(s);
  }
  return out;
}

/** The sampled block with this id; InputError when there is none or it has no sample time. */
export function requireSampledBlock(d: Diagram, id: string, overrides?: Record<string, number>): SampledBlock {
  const block = d.blocks.find((b) => b.id === id);
  if (!block)
    throw new InputError(`block ${id}: no block with this id in the diagram (blocks: ${d.blocks.map((b) => b.id).join(', ')})`, {
      field: `blocks.${id}`,
    });
  const s = sampledBlockOf(d, block, overrides);
  if (!s) {
    throw new InputError(`block ${id}: a ${block.kind} block without a sample time has no sampled form; set its field sampleTime`, {
      field: `blocks.${id}.params.sampleTime`,
    });
  }
  return s;
}
