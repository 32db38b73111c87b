/**
 * The trace API as the client reads it (REQUIREMENTS W1 backward trace, W2 forward trace, TR-04):
 *   GET  /api/trace/:identifier?from=&to=        → TraceResponse (qa, admin, chemist)
 *   POST /api/trace/:identifier/review-flags      { reason, from?, to? } (qa) → { flagged, identifiers, source }
 *   GET  /api/trace/:identifier/report.pdf|.csv   (preparations only)
 * Same shapes as the trace contract (shared/schemas/trace.ts); node ids are "<type>:<key>", and node types
 * include preparation, material_lot, balance, volumetric_ware, solvent_lot, certificate, user, label_print.
 */
export type TraceNode = {
  id: string;
  type: string;
  label: string;
  status: string;
  detail: Record<string, unknown>;
};

export type TraceEdge = { from: string; to: string; relation: string; at: string | null };

export type TraceGraph = { nodes: TraceNode[]; edges: TraceEdge[] };

export type TraceSubject = { type: string; id: number; identifier: string; label: string };

export type TraceResponse = {
  subject: TraceSubject;
  range?: { from: string | null; to: string | null };
  backward: TraceGraph;
  forward: TraceGraph;
  forwardPreparations?: string[];
};

export type ReviewFlagInput = { reason: string; from?: string; to?: string };

export type ReviewFlagsCreated = { flagged: number; identifiers: string[]; source: string };

/** The graph node id of the subject ("preparation:12"), or the node whose label is the identifier. */
export function subjectNodeId(t: TraceResponse): string | undefined {
  const id = `${t.subject.type}:${t.subject.id}`;
  const all = [...t.backward.nodes, ...t.forward.nodes];
  if (all.some((n) => n.id === id)) return id;
  return all.find((n) => n.label === t.subject.identifier || n.label === t.subject.label)?.id;
}
