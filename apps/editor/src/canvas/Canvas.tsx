/**
 * The diagram canvas. React Flow draws and measures; the store owns the document. Nodes are
 * kept in local state (React Flow needs its measurements on them) and rebuilt from the
 * document; drags move nodes locally and commit ONE document edit on drop.
 */
import { useCallback, useEffect, useMemo, useRef, useState, type DragEvent } from 'react';
import {
  ReactFlow,
  Background,
  BackgroundVariant,
  Controls,
  MarkerType,
  applyNodeChanges,
  useReactFlow,
  type Connection,
  type EdgeChange,
  type NodeChange,
  type IsValidConnection,
} from '@xyflow/react';
import { useDiagramStore } from '../store/diagram-store.ts';
import { blockSpec, type BlockKind, type Diagram, type Finding } from '../store/graph-bridge.ts';
import { faultsByElement, useFindings } from '../store/findings.ts';
import { useUiStore } from '../store/ui-store.ts';
import { identifiersIn } from '../store/rename.ts';
import { nodeTypes, type BlockFlowNode } from './nodes.tsx';
import { edgeTypes, type WireFlowEdge } from './WireEdge.tsx';
import { fitReadable } from './fit.ts';
// The sweep the analysis views vary (E2's sweep bar), so the canvas highlights the same one.
import { useSweepChoice } from '../views/SweepBar.tsx';

export const GRID = 10;
export const PART_MIME = 'application/x-loopwright-part';

/** What the sweep varies: a named parameter, or a gain block's k (chosen in the analysis sweep bar). */
export interface SweptTarget {
  parameter?: string;
  block?: string;
}

function safeInputs(kind: BlockKind, params: Record<string, unknown>): string[] {
  try {
    return blockSpec(kind).inputs(params);
  } catch {
    return [];
  }
}

function buildNodes(d: Diagram, selected: Set<string>, faults: Map<string, Finding>, prev: BlockFlowNode[], target: SweptTarget): BlockFlowNode[] {
  const old = new Map(prev.map((n) => [n.id, n]));
  const swept = target.parameter;
  return d.blocks.map((b) => {
    const spec = blockSpec(b.kind);
    const f = faults.get(b.id);
    const p = old.get(b.id);
    const sweptHere =
      target.block === b.id || (swept !== undefined && Object.values(b.params).some((v) => typeof v === 'string' && identifiersIn(v).includes(swept)));
    return {
      ...(p ?? {}),
      id: b.id,
      type: b.kind === 'summing-junction' ? 'sum' : 'block',
      position: p?.dragging ? p.position : b.position,
      selected: selected.has(b.id),
      data: {
        block: b,
        title: spec.title,
        inputs: safeInputs(b.kind, b.params),
        outputs: spec.outputs,
        fault: f?.severity ?? null,
        faultText: f?.message,
        swept,
        sweptHere,
        sweptWhole: target.block === b.id,
      },
    } as BlockFlowNode;
  });
}

function buildEdges(d: Diagram, selected: Set<string>, faults: Map<string, Finding>): WireFlowEdge[] {
  const fan = new Map<string, number>();
  for (const w of d.wires) {
    const k = `${w.from.block}:${w.from.port}`;
    fan.set(k, (fan.get(k) ?? 0) + 1);
  }
  return d.wires.map((w) => {
    const cut = d.cuts.find((c) => c.wire === w.id);
    const f = faults.get(w.id);
    const color = f?.severity === 'error' ? 'var(--error)' : selected.has(w.id) ? 'var(--selected)' : 'var(--wire)';
    return {
      id: w.id,
      type: 'wire',
      source: w.from.block,
      sourceHandle: w.from.port,
      target: w.to.block,
      targetHandle: w.to.port,
      selected: selected.has(w.id),
      markerEnd: { type: MarkerType.ArrowClosed, width: 14, height: 14, color },
      ariaLabel: `wire ${w.id} from ${w.from.block}.${w.from.port} to ${w.to.block}.${w.to.port}`,
      data: {
        fanOut: (fan.get(`${w.from.block}:${w.from.port}`) ?? 0) > 1,
        cut: cut ? { id: cut.id, label: cut.label ?? cut.id } : undefined,
        fault: f?.severity ?? null,
        faultText: f?.message,
      },
    };
  });
}

export function Canvas() {
  const diagram = useDiagramStore((s) => s.diagram);
  const selection = useDiagramStore((s) => s.selection);
  const findings = useFindings();
  const theme = useUiStore((s) => s.theme);
  const fitRequest = useUiStore((s) => s.fitRequest);
  const flow = useReactFlow();
  const faults = useMemo(() => faultsByElement(findings), [findings]);
  const selBlocks = useMemo(() => new Set(selection.blocks), [selection.blocks]);
  const selWires = useMemo(() => new Set(selection.wires), [selection.wires]);

  const { choice } = useSweepChoice();
  const sweptParam = choice?.target.kind === 'parameter' ? choice.target.name : undefined;
  const sweptBlock = choice?.target.kind === 'block' ? choice.target.block : undefined;
  const target = useMemo(() => ({ parameter: sweptParam, block: sweptBlock }), [sweptParam, sweptBlock]);
  const [nodes, setNodes] = useState<BlockFlowNode[]>(() => buildNodes(diagram, selBlocks, faults.blocks, [], target));
  useEffect(() => {
    setNodes((prev) => buildNodes(diagram, selBlocks, faults.blocks, prev, target));
  }, [diagram, selBlocks, faults, target]);
  const edges = useMemo(() => buildEdges(diagram, selWires, faults.wires), [diagram, selWires, faults]);

  // Fit the view when asked (load, new, open, demo) and once the first measurements exist.
  const box = useRef<HTMLDivElement>(null);
  useEffect(() => {
    const t = setTimeout(() => fitReadable(flow, box.current), 60);
    return () => clearTimeout(t);
  }, [fitRequest, flow]);

  const onNodesChange = useCallback((changes: NodeChange<BlockFlowNode>[]) => {
    setNodes((nds) => applyNodeChanges(changes, nds));
    // Moves that are not drags (arrow keys on a focused, selected block) commit at once.
    const moved: Record<string, { x: number; y: number }> = {};
    for (const c of changes) if (c.type === 'position' && c.position && !c.dragging) moved[c.id] = c.position;
    if (Object.keys(moved).length) useDiagramStore.getState().moveBlocks(moved);
    const sel = changes.filter((c) => c.type === 'select');
    if (sel.length) {
      const st = useDiagramStore.getState();
      const set = new Set(st.selection.blocks);
      for (const c of sel) {
        if (c.type !== 'select') continue;
        if (c.selected) set.add(c.id);
        else set.delete(c.id);
      }
      st.setSelection({ blocks: st.diagram.blocks.map((b) => b.id).filter((id) => set.has(id)) });
    }
  }, []);

  const onEdgesChange = useCallback((changes: EdgeChange<WireFlowEdge>[]) => {
    const sel = changes.filter((c) => c.type === 'select');
    if (!sel.length) return;
    const st = useDiagramStore.getState();
    const set = new Set(st.selection.wires);
    for (const c of sel) {
      if (c.type !== 'select') continue;
      if (c.selected) set.add(c.id);
      else set.delete(c.id);
    }
    st.setSelection({ wires: st.diagram.wires.map((w) => w.id).filter((id) => set.has(id)) });
  }, []);

  const onNodeDragStop = useCallback((_e: unknown, _n: BlockFlowNode, dragged: BlockFlowNode[]) => {
    const positions: Record<string, { x: number; y: number }> = {};
    for (const n of dragged) positions[n.id] = n.position;
    useDiagramStore.getState().moveBlocks(positions);
  }, []);

  const onConnect = useCallback((c: Connection) => {
    if (!c.source || !c.target || !c.sourceHandle || !c.targetHandle) return;
    useDiagramStore.getState().connect({ block: c.source, port: c.sourceHandle }, { block: c.target, port: c.targetHandle });
  }, []);

  const isValidConnection: IsValidConnection = useCallback((c) => c.source !== c.target, []);

  const onDragOver = useCallback((e: DragEvent) => {
    if (e.dataTransfer.types.includes(PART_MIME)) {
      e.preventDefault();
      e.dataTransfer.dropEffect = 'copy';
    }
  }, []);
  const onDrop = useCallback(
    (e: DragEvent) => {
      const kind = e.dataTransfer.getData(PART_MIME);
      if (!kind) return;
      e.preventDefault();
      e.stopPropagation();
      const p = flow.screenToFlowPosition({ x: e.clientX, y: e.clientY });
      useDiagramStore.getState().addBlock(kind as BlockKind, { x: Math.round(p.x / GRID) * GRID, y: Math.round(p.y / GRID) * GRID });
    },
    [flow],
  );

  return (
    <div ref={box} className="canvas-box">
    <ReactFlow<BlockFlowNode, WireFlowEdge>
      nodes={nodes}
      edges={edges}
      nodeTypes={nodeTypes}
      edgeTypes={edgeTypes}
      onNodesChange={onNodesChange}
      onEdgesChange={onEdgesChange}
      onNodeDragStop={onNodeDragStop}
      onSelectionDragStop={(e, dragged) => onNodeDragStop(e, dragged[0], dragged)}
      onConnect={onConnect}
      isValidConnection={isValidConnection}
      onDragOver={onDragOver}
      onDrop={onDrop}
      snapToGrid
      snapGrid={[GRID, GRID]}
      deleteKeyCode={null}
      selectionKeyCode="Shift"
      multiSelectionKeyCode={['Control', 'Meta']}
      colorMode={theme}
      minZoom={0.2}
      maxZoom={3}
      onInit={() => setTimeout(() => fitReadable(flow, box.current), 60)}
      proOptions={{ hideAttribution: true }}
      aria-label="Diagram canvas"
    >
      <Background variant={BackgroundVariant.Dots} gap={GRID * 2} size={1.2} color="var(--grid)" />
      <Controls showInteractive={false} position="top-right" aria-label="Zoom controls" />
    </ReactFlow>
    </div>
  );
}
