/** The genealogy drawn with @xyflow/react (loaded on demand by LineageGraph in lineage-graph.tsx). */
import { useMemo } from 'react';
import { Graph, layout as dagreLayout } from '@dagrejs/dagre';
import { Background, Controls, Handle, Position, ReactFlow, type Edge, type Node, type NodeProps } from '@xyflow/react';
import '@xyflow/react/dist/style.css';
import type { TraceEdge, TraceGraph, TraceNode } from '../types.ts';
import { mergeGraphs, neighbours, nodeLook, nodeStatus } from './lineage-graph.tsx';

type FlowData = { node: TraceNode; isSubject: boolean };

function RecordNode({ data }: NodeProps<Node<FlowData>>) {
  const look = nodeLook(data.node);
  return (
    <div style={{ width: NODE_WIDTH }} className={`h-full rounded-lg border-2 px-3 py-2 text-left text-sm shadow-sm ${look.className} ${data.isSubject ? 'ring-4 ring-brass-400' : ''}`}>
      <Handle type="target" position={Position.Left} />
      <p className="text-xs font-semibold uppercase tracking-wide text-ink-soft">{look.label}</p>
      <p className="num font-bold text-ink [overflow-wrap:anywhere]">
        {data.node.label}
      </p>
      <p className="text-ink">Status: {nodeStatus(data.node)}</p>
      <Handle type="source" position={Position.Right} />
    </div>
  );
}

const NODE_TYPES = { record: RecordNode };

/** Breadth-first distance from the subject; nodes not reached get the largest distance + 1. */
function distances(graph: TraceGraph, subjectId: string | undefined): Map<string, number> {
  const dist = new Map<string, number>();
  if (subjectId && graph.nodes.some((n) => n.id === subjectId)) {
    dist.set(subjectId, 0);
    const queue = [subjectId];
    while (queue.length) {
      const id = queue.shift()!;
      for (const { other } of neighbours(graph, id)) {
        if (!dist.has(other)) {
          dist.set(other, dist.get(id)! + 1);
          queue.push(other);
        }
      }
    }
  }
  const far = Math.max(0, ...dist.values()) + 1;
  for (const n of graph.nodes) if (!dist.has(n.id)) dist.set(n.id, far);
  return dist;
}

/** Backward records to the left of the subject, forward records to the right, one column per step. */
function columns(backward: TraceGraph, forward: TraceGraph, subjectId: string | undefined): Map<string, number> {
  const col = new Map<string, number>();
  for (const [id, d] of distances(backward, subjectId)) col.set(id, -d);
  for (const [id, d] of distances(forward, subjectId)) if (!col.has(id) || d > 0) col.set(id, id === subjectId ? 0 : d);
  if (subjectId) col.set(subjectId, 0);
  return col;
}

export const NODE_WIDTH = 240;
const CHARS_PER_LINE = 22; // bold monospace text-sm in the 216 px inside a 240 px card (about 8.5 px a character)

/** A node's height for its wrapped label (labels are never cut: they wrap). */
export function nodeHeight(n: TraceNode): number {
  const lines = Math.max(1, Math.ceil(n.label.length / CHARS_PER_LINE)) + Math.max(1, Math.ceil(`Status: ${nodeStatus(n)}`.length / 28));
  return 44 + lines * 20;
}

/**
 * Positions from dagre (layered, left to right: inputs, the subject, then what was made from it), so edges
 * run between layers and crossings are kept few; edge labels get their own room between the layers.
 */
export function layout(backward: TraceGraph, forward: TraceGraph, subjectId: string | undefined): { nodes: Node<FlowData>[]; edges: Edge[]; width: number; height: number } {
  const graph = mergeGraphs(backward, forward);
  const col = columns(backward, forward, subjectId);
  const g = new Graph({ multigraph: true });
  g.setGraph({ rankdir: 'LR', nodesep: 28, ranksep: 110, edgesep: 16, marginx: 8, marginy: 8 });
  g.setDefaultEdgeLabel(() => ({}));
  for (const n of graph.nodes) g.setNode(n.id, { width: NODE_WIDTH, height: nodeHeight(n) });
  const edges = graph.edges.map((e) => {
    const leftToRight = (col.get(e.from) ?? 0) <= (col.get(e.to) ?? 0);
    const source = leftToRight ? e.from : e.to;
    const target = leftToRight ? e.to : e.from;
    const label = e.relation.replace(/_/g, ' ');
    const id = `${e.from}-${e.to}-${e.relation}`;
    g.setEdge(source, target, { label, width: label.length * 7 + 12, height: 20, labelpos: 'c' }, id);
    return { id, source, target, label, type: 'default', labelBgPadding: [4, 2] as [number, number], labelBgStyle: { fill: '#fffdf7' } } satisfies Edge;
  });
  dagreLayout(g);
  const nodes = graph.nodes.map((n) => {
    const p = g.node(n.id) as { x: number; y: number; width: number; height: number };
    return {
      id: n.id,
      type: 'record',
      position: { x: p.x - p.width / 2, y: p.y - p.height / 2 },
      width: p.width,
      height: p.height,
      data: { node: n, isSubject: n.id === subjectId },
      draggable: false,
      connectable: false,
    } satisfies Node<FlowData>;
  });
  const box = g.graph() as { width?: number; height?: number };
  return { nodes, edges, width: box.width ?? NODE_WIDTH, height: box.height ?? 120 };
}

export function FlowGraph({
  backward,
  forward,
  subjectId,
  testId = 'lineage-graph',
}: {
  backward: TraceGraph;
  forward: TraceGraph;
  subjectId?: string;
  testId?: string;
}) {
  const { nodes, edges, height: drawn } = useMemo(() => layout(backward, forward, subjectId), [backward, forward, subjectId]);
  const height = Math.min(760, Math.max(220, drawn + 60));
  if (nodes.length === 0) return <p className="text-ink-soft">Nothing to draw.</p>;
  return (
    <div
      className="w-full overflow-hidden rounded-lg border-2 border-line bg-paper"
      style={{ height }}
      data-testid={testId}
      role="img"
      aria-label={`Genealogy graph with ${nodes.length} records; the same information follows as a list.`}
    >
      <ReactFlow
        nodes={nodes}
        edges={edges}
        nodeTypes={NODE_TYPES}
        fitView
        fitViewOptions={{ padding: 0.15 }}
        nodesDraggable={false}
        nodesConnectable={false}
        elementsSelectable={false}
        minZoom={0.3}
        proOptions={{ hideAttribution: true }}
      >
        <Background />
        <Controls showInteractive={false} />
      </ReactFlow>
    </div>
  );
}

