/**
 * Genealogy of a record (REQUIREMENTS W1/W2, TR-04): a graph drawn with @xyflow/react, nodes coloured by
 * type AND labelled with the type and status in words (colour is never the only cue), and below it the
 * same genealogy as a plain nested list for screen readers and keyboard users.
 */
import { lazy, Suspense, type ReactNode } from 'react';
import { Link } from 'react-router';
import { isPreparationIdentifier, statusLabel } from '../../preparations/format.ts';
import type { TraceEdge, TraceGraph, TraceNode } from '../types.ts';

export type Look = { label: string; className: string };

/** Fill per node type; the type is also written on the node, so colour is never the only cue. */
const LOOKS: Record<string, Look> = {
  material_lot: { label: 'Reference material lot', className: 'border-brass-600 bg-brass-100' },
  certificate: { label: 'Certificate', className: 'border-brass-600 bg-card' },
  stock: { label: 'Stock solution', className: 'border-slate-900 bg-card' },
  dilution: { label: 'Dilution', className: 'border-slate-700 bg-slate-100' },
  series_level: { label: 'Series level', className: 'border-ok-700 bg-ok-50' },
  mix: { label: 'Mix', className: 'border-slate-700 bg-slate-100' },
  preparation: { label: 'Preparation', className: 'border-slate-900 bg-card' },
  balance: { label: 'Balance', className: 'border-line bg-paper' },
  volumetric_ware: { label: 'Volumetric ware', className: 'border-line bg-paper' },
  solvent_lot: { label: 'Solvent lot', className: 'border-line bg-paper' },
  user: { label: 'Person', className: 'border-line bg-card' },
  label_print: { label: 'Label print', className: 'border-line bg-card' },
  volume_check: { label: 'Volume check', className: 'border-line bg-paper' },
};

export function nodeLook(n: Pick<TraceNode, 'type' | 'detail'>): Look {
  const kind = n.type === 'preparation' && n.detail && typeof n.detail.kind === 'string' ? n.detail.kind : null;
  return (kind ? LOOKS[kind] : undefined) ?? LOOKS[n.type] ?? { label: statusLabel(n.type || 'record'), className: 'border-line bg-card' };
}

/** The preparation identifier a node stands for, when it is one (for links). */
export function nodeIdentifier(n: TraceNode): string | null {
  if (n.type !== 'preparation') return null;
  const d = n.detail as { identifier?: unknown } | null | undefined;
  if (d && typeof d.identifier === 'string') return d.identifier;
  return isPreparationIdentifier(n.label) ? n.label.trim() : null;
}

export function nodeStatus(n: TraceNode): string {
  return n.status ? statusLabel(n.status) : 'no status';
}

/** Merge the backward and forward graphs (they share the subject). */
export function mergeGraphs(...graphs: TraceGraph[]): TraceGraph {
  const nodes = new Map<string, TraceNode>();
  const edges = new Map<string, TraceEdge>();
  for (const g of graphs) {
    for (const n of g.nodes) if (!nodes.has(String(n.id))) nodes.set(String(n.id), { ...n, id: String(n.id) });
    for (const e of g.edges) edges.set(`${e.from}→${e.to}→${e.relation}`, { ...e, from: String(e.from), to: String(e.to) });
  }
  return { nodes: [...nodes.values()], edges: [...edges.values()].filter((e) => nodes.has(e.from) && nodes.has(e.to)) };
}

/** Neighbours of a node, edges taken either way (the walk is away from the subject). */
export function neighbours(graph: TraceGraph, id: string): Array<{ e: TraceEdge; other: string }> {
  const out: Array<{ e: TraceEdge; other: string }> = [];
  for (const e of graph.edges) {
    if (e.from === id) out.push({ e, other: e.to });
    else if (e.to === id) out.push({ e, other: e.from });
  }
  return out;
}

/** The drawing library loads only when a graph is shown (it is large). */
const FlowGraph = lazy(async () => ({ default: (await import('./flow-graph.tsx')).FlowGraph }));

export function LineageGraph(props: { backward: TraceGraph; forward: TraceGraph; subjectId?: string; testId?: string }) {
  return (
    <Suspense fallback={<p className="text-ink-soft">Drawing the genealogy…</p>}>
      <FlowGraph {...props} />
    </Suspense>
  );
}

/** Legend: every colour with its words. */
export function GraphLegend({ graph }: { graph: TraceGraph }) {
  const seen = new Map<string, Look>();
  for (const n of graph.nodes) {
    const look = nodeLook(n);
    seen.set(look.label, look);
  }
  return (
    <ul className="flex flex-wrap gap-2 text-sm" aria-label="Legend">
      {[...seen.values()].map((l) => (
        <li key={l.label} className={`rounded border-2 px-2 py-0.5 ${l.className}`}>
          {l.label}
        </li>
      ))}
    </ul>
  );
}

function NodeLine({ n, edge }: { n: TraceNode; edge?: TraceEdge }) {
  const id = nodeIdentifier(n);
  return (
    <span className="flex flex-wrap items-baseline gap-x-2">
      <span className="text-sm font-semibold text-ink-soft">{nodeLook(n).label}:</span>
      {id ? (
        <Link to={`/preparations/${encodeURIComponent(id)}`} className="num font-semibold text-brass-600 underline">
          {n.label}
        </Link>
      ) : (
        <span className="num font-semibold">{n.label}</span>
      )}
      <span>— {nodeStatus(n)}</span>
      {edge ? <span className="text-sm text-ink-soft">({edge.relation.replace(/_/g, ' ')})</span> : null}
    </span>
  );
}

/**
 * The genealogy as a nested list from the subject: the backward graph lists its inputs (and theirs),
 * the forward graph what was made from it. Each record is listed once (shared inputs are not repeated).
 */
export function LineageList({ graph, subjectId, direction, testId }: { graph: TraceGraph; subjectId: string; direction: 'backward' | 'forward'; testId?: string }) {
  const byId = new Map(graph.nodes.map((n) => [String(n.id), n]));
  const seen = new Set<string>([subjectId]);
  const render = (id: string, level: number): ReactNode => {
    const items = neighbours(graph, id)
      .filter(({ other }) => {
        if (seen.has(other) || !byId.has(other)) return false;
        seen.add(other);
        return true;
      });
    if (items.length === 0) return null;
    return (
      <ul className={`flex flex-col gap-1 ${level > 0 ? 'ml-6 border-l-2 border-line pl-3' : ''}`}>
        {items.map(({ e, other }) => (
          <li key={`${e.from}-${e.to}-${e.relation}`}>
            <NodeLine n={byId.get(other)!} edge={e} />
            {render(other, level + 1)}
          </li>
        ))}
      </ul>
    );
  };
  const tree = render(subjectId, 0);
  return (
    <div data-testid={testId}>
      {tree ?? <p className="text-ink-soft">{direction === 'backward' ? 'No recorded inputs.' : 'Nothing has been made from it yet.'}</p>}
    </div>
  );
}
