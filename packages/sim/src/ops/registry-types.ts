import type { CompiledBlock } from '../compile.ts';
import type { Op, SimNode } from './node.ts';

/** What a block builder may do while the run's nodes are made (build.ts implements it). */
export interface BuildContext {
  /** This run replaces every nonlinearity by its linear form. */
  readonly linear: boolean;
  /** The run's named-parameter values (with overrides). */
  readonly scope: Readonly<Record<string, number>>;
  /** A new node of `op` for block `cb` (its output, unless another node of the block is declared the output later). */
  add(op: Op, cb: CompiledBlock | null): SimNode;
  /** Gives the node `n` states. */
  states(nd: SimNode, n: number): void;
  /** The node's inputs are the outputs of these blocks (in the order of its input ports). */
  wire(nd: SimNode, fromBlocks: readonly number[]): void;
  /** The node reads another node's signal directly (a linear block after its own dead time). */
  wireNode(nd: SimNode, from: SimNode): void;
  /** Declares which node carries the block's output signal. */
  output(cb: CompiledBlock, nd: SimNode): void;
  /** Evaluates the block's catalogue linear form (which checks its parameters, naming the block). */
  checkLinearForm(): unknown;
  /** Source edges in (0, until) come from this node's waveform (lazily). */
  source(nd: SimNode): void;
  /** A sampled node: its instants are breakpoints, its steps run at them. */
  sampler(nd: SimNode): void;
}

/** Makes the run-time nodes of one block from its resolved parameters. */
export type Builder = (cb: CompiledBlock, params: Record<string, unknown>, ctx: BuildContext) => void;
