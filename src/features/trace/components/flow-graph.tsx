/** The genealogy drawn with @xyflow/react (loaded on demand by LineageGraph in lineage-graph.tsx). */
import { useMemo } from 'react';
import { Background, Controls, Handle, Position, ReactFlow, type Edge, type Node, type NodeProps } from '@xyflow/react';
import '@xyflow/react/dist/style.css';
import type { TraceEdge, TraceGraph, TraceNode } from '../types.ts';
import { mergeGraphs, neighbours, nodeLook, nodeStatus } from './lineage-graph.tsx';

type FlowData = { node: TraceNode; isSubject: boolean };

function RecordNode({ data }: NodeProps<Node<FlowData>>) {
  const look = nodeLook(data.node);
  return (
    <div className={`w-56 rounded-lg border-2 px-3 py-2 text-left text-sm shadow-sm ${look.className} ${data.isSubject ? 'ring-4 ring-brass-400' : ''}`}>
      <Handle type="target" position={Position.Left} />
      <p className="text-xs font-semibold uppercase tracking-wide text-ink-soft">{look.label}</p>
      <p className="num truncate font-bold text-ink" title={data.node.label}>
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

function layout(backward: TraceGraph, forward: TraceGraph, subjectId: string | undefined): { nodes: Node<FlowData>[]; edges: Edge[]; tallest: number } {
  const graph = mergeGraphs(backward, forward);
  const col = columns(backward, forward, subjectId);
  const min = Math.min(0, ...col.values());
  const rows = new Map<number, number>();
  const nodes = graph.nodes.map((n) => {
    const c = (col.get(n.id) ?? 0) - min;
    const row = rows.get(c) ?? 0;
    rows.set(c, row + 1);
    return {
      id: n.id,
      type: 'record',
      position: { x: c * 290, y: row * 120 },
      data: { node: n, isSubject: n.id === subjectId },
      draggable: false,
      connectable: false,
    } satisfies Node<FlowData>;
  });
  const edges = graph.edges.map((e) => ({
    id: `${e.from}-${e.to}-${e.relation}`,
    source: (col.get(e.from) ?? 0) <= (col.get(e.to) ?? 0) ? e.from : e.to,
    target: (col.get(e.from) ?? 0) <= (col.get(e.to) ?? 0) ? e.to : e.from,
    label: e.relation.replace(/_/g, ' '),
    labelBgPadding: [4, 2] as [number, number],
  }));
  return { nodes, edges, tallest: Math.max(1, ...rows.values()) };
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
  const { nodes, edges, tallest } = useMemo(() => layout(backward, forward, subjectId), [backward, forward, subjectId]);
  const height = Math.min(560, Math.max(220, tallest * 120 + 60));
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

