/**
 * The trace graph's layout (dagre, left to right): inputs left of the subject, uses right of it; no two
 * record cards overlap; a card is tall enough for its whole label (labels wrap, they are never cut).
 */
import { describe, expect, it } from 'vitest';
import { layout, nodeHeight, NODE_WIDTH } from '../../src/features/trace/components/flow-graph.tsx';
import type { TraceGraph, TraceNode } from '../../src/features/trace/types.ts';

const node = (id: string, type: TraceNode['type'], label: string): TraceNode => ({ id, type, label, status: 'verified', detail: {} });
const subject = node('preparation:1', 'preparation', 'HWL-2026-0001 Pb from Lead(II) nitrate, 1001.0 ± 2.7 mg/L (k = 2)');
const backward: TraceGraph = {
  nodes: [subject, node('material_lot:1', 'material_lot', 'Lead(II) nitrate lot NRM-24-0931'), node('balance:1', 'balance', 'BAL-SM1 Semi-micro balance, 82 g × 0.01 mg'), node('volumetric_ware:4', 'volumetric_ware', 'VF-100-01 100 mL volumetric flask'), node('user:2', 'user', 'Dr. Maren Tollefsen')],
  edges: [
    { from: 'material_lot:1', to: 'preparation:1', relation: 'analyte source', at: null },
    { from: 'balance:1', to: 'preparation:1', relation: 'weighed on', at: null },
    { from: 'volumetric_ware:4', to: 'preparation:1', relation: 'made up in', at: null },
    { from: 'user:2', to: 'preparation:1', relation: 'signed prepared', at: null },
  ],
};
const forward: TraceGraph = {
  nodes: [subject, node('preparation:6', 'preparation', 'HWL-2026-0006 Pb from Lead(II) nitrate'), node('preparation:7', 'preparation', 'HWL-2026-0007 Pb from Lead(II) nitrate'), node('label_print:1', 'label_print', '3 labels of HWL-2026-0001 v3')],
  edges: [
    { from: 'preparation:1', to: 'preparation:6', relation: 'diluted into', at: null },
    { from: 'preparation:1', to: 'preparation:7', relation: 'diluted into', at: null },
    { from: 'preparation:1', to: 'label_print:1', relation: 'labels printed', at: null },
  ],
};

describe('trace graph layout', () => {
  const { nodes, edges } = layout(backward, forward, 'preparation:1');
  const at = (id: string) => nodes.find((n) => n.id === id)!;

  it('puts inputs to the left of the subject and what was made from it to the right', () => {
    for (const id of ['material_lot:1', 'balance:1', 'volumetric_ware:4', 'user:2']) expect(at(id).position.x).toBeLessThan(at('preparation:1').position.x);
    for (const id of ['preparation:6', 'preparation:7', 'label_print:1']) expect(at(id).position.x).toBeGreaterThan(at('preparation:1').position.x);
    expect(edges.every((e) => at(e.source).position.x < at(e.target).position.x)).toBe(true);
  });

  it('never lets two cards overlap', () => {
    for (const a of nodes) {
      for (const b of nodes) {
        if (a.id >= b.id) continue;
        const apart = a.position.x + a.width! <= b.position.x || b.position.x + b.width! <= a.position.x || a.position.y + a.height! <= b.position.y || b.position.y + b.height! <= a.position.y;
        expect(apart, `${a.id} and ${b.id}`).toBe(true);
      }
    }
  });

  it('gives a long label more lines rather than cutting it', () => {
    expect(at('preparation:1').width).toBe(NODE_WIDTH);
    expect(nodeHeight(subject)).toBeGreaterThan(nodeHeight(node('user:2', 'user', 'Dr. Maren Tollefsen')));
    expect(at('preparation:1').height).toBe(nodeHeight(subject));
  });
});
