/**
 * Custom React Flow nodes: rounded block cards (title, formula, caption; inputs on the left,
 * the output on the right) and summing junctions drawn as circles with the sign of each input
 * beside where it enters (first input from the left, second from below, third from above).
 */
import { memo, useEffect } from 'react';
import { Handle, Position, useUpdateNodeInternals, type Node, type NodeProps } from '@xyflow/react';
import { blockSpec, cardOf, type Block, type IconStroke } from '../store/graph-bridge.ts';
import { Formula } from './formula.tsx';
import { inputSide } from './ports.ts';

export interface BlockNodeData extends Record<string, unknown> {
  block: Block;
  title: string;
  inputs: string[];
  outputs: string[];
  fault: 'error' | 'warning' | 'info' | null;
  faultText?: string;
  swept?: string;
  /** The swept parameter enters this block. */
  sweptHere: boolean;
  /** The block's own gain is what is swept. */
  sweptWhole?: boolean;
}
export type BlockFlowNode = Node<BlockNodeData, 'block' | 'sum'>;

function portLabel(block: Block, port: string) {
  return `${block.label ?? block.id} ${port}`;
}

export const BlockNode = memo(function BlockNode({ data, selected }: NodeProps<BlockFlowNode>) {
  const { block, inputs, outputs, fault, swept, sweptHere } = data;
  const spec = blockSpec(block.kind);
  const content = cardOf(block.kind, block.params);
  const cls = [
    'lw-card',
    `lw-kind-${block.kind}`,
    `lw-category-${spec.category}`,
    selected ? 'is-selected' : '',
    fault ? `fault-${fault}` : '',
    sweptHere ? 'is-swept' : '',
  ]
    .filter(Boolean)
    .join(' ');
  return (
    <div className={cls} role="group" aria-label={`block ${block.id}`} data-block={block.id} title={data.faultText}>
      {inputs.map((p, i) => (
        <Handle
          key={p}
          id={p}
          type="target"
          position={Position.Left}
          style={{ top: `${((i + 1) / (inputs.length + 1)) * 100}%` }}
          aria-label={`input ${portLabel(block, p)}`}
          data-testid={`port-${block.id}-${p}`}
        />
      ))}
      <div className="lw-card-head">
        {/* Sized by the card, never the other way round: a long label is cut short, in full on hover. */}
        <span className="lw-card-title" title={block.label ?? data.title}>
          {block.label ?? data.title}
        </span>
        <span className="lw-card-id">{block.id}</span>
      </div>
      {content.formula !== undefined && (
        <div className="lw-card-formula">
          {data.sweptWhole ? (
            <span className="fx-swept" title="swept">
              <Formula text={content.formula} />
            </span>
          ) : (
            <Formula text={content.formula} swept={swept} />
          )}
        </div>
      )}
      {content.caption && <div className="lw-card-caption">{content.caption}</div>}
      {spec.icon && <CardIcon strokes={spec.icon} />}
      {fault && (
        <span className={`lw-fault-badge ${fault}`} aria-label={`${fault}: ${data.faultText ?? ''}`}>
          {fault === 'error' ? '!' : fault === 'warning' ? '▲' : 'i'}
        </span>
      )}
      {outputs.map((p) => (
        <Handle
          key={p}
          id={p}
          type="source"
          position={Position.Right}
          aria-label={`output ${portLabel(block, p)}`}
          data-testid={`port-${block.id}-${p}`}
        />
      ))}
    </div>
  );
});

/** The catalogue's small drawing of a block's characteristic (BlockSpec.icon). */
function CardIcon({ strokes }: { strokes: readonly IconStroke[] }) {
  return (
    <svg className="lw-icon" viewBox="0 0 40 20" aria-hidden="true">
      {strokes.map((k, i) => (
        <path key={i} d={k.d} className={k.ghost ? 'lw-icon-ghost' : undefined} />
      ))}
    </svg>
  );
}

const SIDE = { left: Position.Left, bottom: Position.Bottom, top: Position.Top } as const;
/** Where input i of a summing junction enters (see ports.ts). */
export function sumPortSide(i: number): Position {
  return SIDE[inputSide('summing-junction', i)];
}

export const SumNode = memo(function SumNode({ id, data, selected }: NodeProps<BlockFlowNode>) {
  const { block, inputs, fault } = data;
  // Its ports follow the signs: React Flow must re-measure them when they change.
  const updateInternals = useUpdateNodeInternals();
  const portKey = inputs.join(',');
  useEffect(() => updateInternals(id), [id, portKey, updateInternals]);
  const signs = typeof block.params.signs === 'string' ? block.params.signs : '';
  const leftPorts = inputs.filter((_, i) => sumPortSide(i) === Position.Left);
  const cls = ['lw-sum', selected ? 'is-selected' : '', fault ? `fault-${fault}` : ''].filter(Boolean).join(' ');
  return (
    <div className={cls} role="group" aria-label={`block ${block.id}`} data-block={block.id} title={data.faultText}>
      <svg className="lw-sum-x" viewBox="0 0 44 44" aria-hidden="true">
        <path d="M14 14 L30 30 M30 14 L14 30" />
      </svg>
      {inputs.map((p, i) => {
        const side = sumPortSide(i);
        const li = leftPorts.indexOf(p);
        const style =
          side === Position.Left
            ? { top: leftPorts.length === 1 ? '50%' : `${20 + (60 * li) / Math.max(1, leftPorts.length - 1)}%` }
            : undefined;
        const sign = signs[i] === '-' ? '−' : '+';
        return (
          <span key={p}>
            <Handle
              id={p}
              type="target"
              position={side}
              style={style}
              aria-label={`input ${portLabel(block, p)}`}
              data-testid={`port-${block.id}-${p}`}
            />
            <span
              className={`lw-sign lw-sign-${side}`}
              style={side === Position.Left ? { top: style?.top } : undefined}
              aria-label={`sign of ${p}: ${sign}`}
            >
              {sign}
            </span>
          </span>
        );
      })}
      <Handle
        id="out"
        type="source"
        position={Position.Right}
        aria-label={`output ${portLabel(block, 'out')}`}
        data-testid={`port-${block.id}-out`}
      />
      <span className="lw-sum-id" title={block.label ?? block.id}>
        {block.label ?? block.id}
      </span>
    </div>
  );
});

export const nodeTypes = { block: BlockNode, sum: SumNode };
