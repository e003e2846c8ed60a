/**
 * The diagram canvas. React Flow draws and measures; the store owns the document. Nodes are
 * kept in local state (React Flow needs its measurements on them) and rebuilt from the
 * document; drags move nodes locally and commit ONE document edit on drop. A part dropped on
 * a wire, or an unwired block dragged onto one, goes into that wire; a wire drawn onto an
 * input that already has one asks before replacing it; feedback wires get separate lanes.
 */
import { useCallback, useEffect, useMemo, useRef, useState, type DragEvent } from 'react';
import {
  ReactFlow,
  Background,
  BackgroundVariant,
  Controls,
  MarkerType,
  applyNodeChanges,
  useNodesInitialized,
  useReactFlow,
  type Connection,
  type EdgeChange,
  type NodeChange,
  type IsValidConnection,
} from '@xyflow/react';
import { coalesced, useDiagramStore } from '../store/diagram-store.ts';
import { blockSpec, type BlockKind, type Diagram, type Finding } from '../store/graph-bridge.ts';
import { faultsByElement, useFindings } from '../store/findings.ts';
import { useUiStore } from '../store/ui-store.ts';
import { identifiersIn } from '../store/rename.ts';
import { nodeTypes, type BlockFlowNode } from './nodes.tsx';
import { edgeTypes, type WireFlowEdge } from './WireEdge.tsx';
import { fitAll, MIN_ZOOM } from './fit.ts';
import { feedbackLanes, type Box } from './lanes.ts';
import { wireAt } from './wire-geometry.ts';
import { ReplaceWireDialog } from './ReplaceWireDialog.tsx';
import { occupyingWire, spliceMode } from '../store/wiring.ts';
// The sweep the analysis views vary (E2's sweep bar), so the canvas highlights the same one.
import { useSweepChoice } from '../views/SweepBar.tsx';

export const GRID = 10;
export const PART_MIME = 'application/x-loopwright-part';
/** A second drag type naming the kind, readable while dragging (the data itself is not). */
export const partKindMime = (kind: string) => `application/x-loopwright-kind-${kind}`;
/** How near (screen px) to a wire a dropped block must land to go into it. */
const DROP_REACH_PX = 14;
/** Rough size of a new block before it is measured, to centre it under the pointer. */
const NEW_SIZE: Record<string, { width: number; height: number }> = { 'summing-junction': { width: 44, height: 44 } };
const DEFAULT_SIZE = { width: 150, height: 52 };

/** Screen point of a mouse or touch event (a drag ends with the touch in changedTouches). */
function pointOf(e: MouseEvent | TouchEvent): { x: number; y: number } {
  if ('clientX' in e) return { x: e.clientX, y: e.clientY };
  const t = e.touches[0] ?? e.changedTouches[0];
  return t ? { x: t.clientX, y: t.clientY } : { x: Number.NaN, y: Number.NaN };
}

function kindFromDrag(types: readonly string[]): BlockKind | null {
  const prefix = partKindMime('');
  const t = types.find((x) => x.startsWith(prefix));
  return t ? (t.slice(prefix.length) as BlockKind) : null;
}

/** Whether a new block of this kind can go into a wire (it has an input). */
function kindSplices(kind: BlockKind | null): boolean {
  if (!kind) return false;
  try {
    return blockSpec(kind).inputs(Object.fromEntries(blockSpec(kind).params.map((p) => [p.name, p.default]))).length > 0;
  } catch {
    return false;
  }
}

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

function buildNodes(
  d: Diagram,
  selected: Set<string>,
  faults: Map<string, Finding>,
  prev: BlockFlowNode[],
  target: SweptTarget,
): BlockFlowNode[] {
  const old = new Map(prev.map((n) => [n.id, n]));
  const swept = target.parameter;
  return d.blocks.map((b) => {
    const spec = blockSpec(b.kind);
    const f = faults.get(b.id);
    const p = old.get(b.id);
    const sweptHere =
      target.block === b.id ||
      (swept !== undefined && Object.values(b.params).some((v) => typeof v === 'string' && identifiersIn(v).includes(swept)));
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

function buildEdges(
  d: Diagram,
  selected: Set<string>,
  faults: Map<string, Finding>,
  lanes: Map<string, number>,
  dropWire: string | null,
): WireFlowEdge[] {
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
        lane: lanes.get(w.id),
        dropTarget: dropWire === w.id,
      },
    };
  });
}

/** Block boxes in flow units (measured size once React Flow has it). */
function boxesOf(nodes: BlockFlowNode[]): Map<string, Box> {
  const m = new Map<string, Box>();
  for (const n of nodes) {
    const size = n.measured?.width
      ? { width: n.measured.width, height: n.measured.height ?? DEFAULT_SIZE.height }
      : (NEW_SIZE[n.data.block.kind] ?? DEFAULT_SIZE);
    m.set(n.id, { x: n.position.x, y: n.position.y, ...size });
  }
  return m;
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
  const lanes = useMemo(() => feedbackLanes(diagram, boxesOf(nodes)), [diagram, nodes]);
  const [dropWire, setDropWire] = useState<string | null>(null);
  const edges = useMemo(() => buildEdges(diagram, selWires, faults.wires, lanes, dropWire), [diagram, selWires, faults, lanes, dropWire]);

  // Fit the whole drawing when asked (start, new, open, demo, Tidy, the Fit button), once the
  // blocks are measured and the wires drawn (their lanes extend the drawing).
  // `fitted` is the last request served (-1: the fit at start is still to come); the canvas
  // says `data-fit-pending` meanwhile, so a test (or anything else) can wait for the view to settle.
  const box = useRef<HTMLDivElement>(null);
  const initialized = useNodesInitialized();
  const [fitted, setFitted] = useState(-1);
  const fitPending = fitted !== fitRequest;
  useEffect(() => {
    if (!fitPending || (!initialized && nodes.length > 0)) return;
    let frame = requestAnimationFrame(() => {
      frame = requestAnimationFrame(() => {
        fitAll(flow, box.current);
        setFitted(fitRequest);
      });
    });
    return () => cancelAnimationFrame(frame);
  }, [fitPending, fitRequest, initialized, edges, flow, nodes.length]);

  /** The wire under a screen point that a block may go into (none attached to `except`). */
  const wireUnder = useCallback(
    (clientX: number, clientY: number, except?: string) => {
      if (!Number.isFinite(clientX) || !Number.isFinite(clientY)) return null;
      const p = flow.screenToFlowPosition({ x: clientX, y: clientY });
      const reach = DROP_REACH_PX / flow.getZoom();
      const wires = useDiagramStore.getState().diagram.wires;
      const attached = except ? new Set(wires.filter((w) => w.from.block === except || w.to.block === except).map((w) => w.id)) : null;
      return wireAt(p, reach, attached ? (id) => attached.has(id) : undefined);
    },
    [flow],
  );

  // While a mouse drag is on, its moves stay local; onNodeDragStop commits them (React Flow's
  // last position change of a drag arrives before the stop and must not be a step of its own).
  const dragging = useRef(false);
  const onNodesChange = useCallback((changes: NodeChange<BlockFlowNode>[]) => {
    setNodes((nds) => applyNodeChanges(changes, nds));
    // Moves that are not drags (arrow keys on a focused, selected block) commit at once; a run
    // of them is one undo step.
    const moved: Record<string, { x: number; y: number }> = {};
    for (const c of changes) if (c.type === 'position' && c.position && !c.dragging) moved[c.id] = c.position;
    if (Object.keys(moved).length && !dragging.current) {
      coalesced(`move:${Object.keys(moved).sort().join(',')}`, () => useDiagramStore.getState().moveBlocks(moved));
    }
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

  /** A single unwired block that could go into a wire (the others only move). */
  const insertable = useCallback((dragged: BlockFlowNode[]) => {
    if (dragged.length !== 1) return null;
    const d = useDiagramStore.getState().diagram;
    const id = dragged[0].id;
    if (d.wires.some((w) => w.from.block === id || w.to.block === id)) return null;
    return spliceMode(d, id) ? id : null;
  }, []);

  const onNodeDrag = useCallback(
    (e: MouseEvent | TouchEvent, _n: BlockFlowNode, dragged: BlockFlowNode[]) => {
      const id = insertable(dragged);
      const p = pointOf(e);
      const w = id ? wireUnder(p.x, p.y, id) : null;
      setDropWire((old) => (old === w ? old : w));
    },
    [insertable, wireUnder],
  );

  const onNodeDragStart = useCallback(() => {
    dragging.current = true;
  }, []);
  const onNodeDragStop = useCallback(
    (e: MouseEvent | TouchEvent, _n: BlockFlowNode, dragged: BlockFlowNode[]) => {
      dragging.current = false;
      setDropWire(null);
      const id = insertable(dragged);
      const p = pointOf(e);
      const w = id ? wireUnder(p.x, p.y, id) : null;
      if (id && w) {
        useDiagramStore.getState().moveBlockOntoWire(id, dragged[0].position, w);
        return;
      }
      const positions: Record<string, { x: number; y: number }> = {};
      for (const n of dragged) positions[n.id] = n.position;
      useDiagramStore.getState().moveBlocks(positions);
    },
    [insertable, wireUnder],
  );

  const onConnect = useCallback((c: Connection) => {
    if (!c.source || !c.target || !c.sourceHandle || !c.targetHandle) return;
    const from = { block: c.source, port: c.sourceHandle };
    const to = { block: c.target, port: c.targetHandle };
    const st = useDiagramStore.getState();
    if (
      st.diagram.wires.some(
        (w) => w.from.block === from.block && w.from.port === from.port && w.to.block === to.block && w.to.port === to.port,
      )
    )
      return;
    // An input takes one wire: never replace the one it has without asking.
    const existing = occupyingWire(st.diagram, from, to);
    if (existing) useUiStore.getState().setPendingConnection({ from, to, existing: existing.id });
    else st.connect(from, to);
  }, []);

  const isValidConnection: IsValidConnection = useCallback((c) => c.source !== c.target, []);

  const onDragOver = useCallback(
    (e: DragEvent) => {
      if (!e.dataTransfer.types.includes(PART_MIME)) return;
      e.preventDefault();
      e.dataTransfer.dropEffect = 'copy';
      const w = kindSplices(kindFromDrag(e.dataTransfer.types)) ? wireUnder(e.clientX, e.clientY) : null;
      setDropWire((old) => (old === w ? old : w));
    },
    [wireUnder],
  );
  const onDragLeave = useCallback(() => setDropWire(null), []);
  const onDrop = useCallback(
    (e: DragEvent) => {
      setDropWire(null);
      const kind = e.dataTransfer.getData(PART_MIME) as BlockKind;
      if (!kind) return;
      e.preventDefault();
      e.stopPropagation();
      // The new block lands centred under the pointer, on the grid.
      const p = flow.screenToFlowPosition({ x: e.clientX, y: e.clientY });
      const size = NEW_SIZE[kind] ?? DEFAULT_SIZE;
      const at = { x: Math.round((p.x - size.width / 2) / GRID) * GRID, y: Math.round((p.y - size.height / 2) / GRID) * GRID };
      const w = kindSplices(kind) ? wireUnder(e.clientX, e.clientY) : null;
      if (w) useDiagramStore.getState().addBlockOnWire(kind, at, w);
      else useDiagramStore.getState().addBlock(kind, at);
    },
    [flow, wireUnder],
  );

  return (
    <div ref={box} className="canvas-box" data-fit-pending={fitPending || undefined}>
      <ReactFlow<BlockFlowNode, WireFlowEdge>
        nodes={nodes}
        edges={edges}
        nodeTypes={nodeTypes}
        edgeTypes={edgeTypes}
        onNodesChange={onNodesChange}
        onEdgesChange={onEdgesChange}
        onNodeDragStart={onNodeDragStart}
        onSelectionDragStart={onNodeDragStart}
        onNodeDrag={onNodeDrag}
        onNodeDragStop={onNodeDragStop}
        onSelectionDragStop={(e, dragged) => onNodeDragStop(e.nativeEvent, dragged[0], dragged)}
        onConnect={onConnect}
        isValidConnection={isValidConnection}
        onDragOver={onDragOver}
        onDragLeave={onDragLeave}
        onDrop={onDrop}
        snapToGrid
        snapGrid={[GRID, GRID]}
        deleteKeyCode={null}
        selectionKeyCode="Shift"
        multiSelectionKeyCode={['Control', 'Meta']}
        colorMode={theme}
        minZoom={MIN_ZOOM}
        maxZoom={3}
        proOptions={{ hideAttribution: true }}
        aria-label="Diagram canvas"
      >
        <Background variant={BackgroundVariant.Dots} gap={GRID * 2} size={1.2} color="var(--grid)" />
        <Controls showInteractive={false} showFitView={false} position="top-right" aria-label="Zoom controls" />
      </ReactFlow>
      <ReplaceWireDialog />
    </div>
  );
}
