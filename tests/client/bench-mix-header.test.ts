/**
 * The bench header of a mix names every analyte's target (its planned concentration, rounded as the record
 * shows it), never only the first analyte's (server-side rendering to a string, no browser).
 */
import { createElement } from 'react';
import { renderToString } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { MixTargets } from '../../src/features/preparations/bench-page.tsx';
import type { PreparationDetail } from '../../src/features/preparations/types.ts';

const planned = (value: string, u: string) => ({ value, unit: 'mg/L', standardUncertainty: u, expandedUncertainty: String(Number(u) * 2), k: '2', display: `${value} mg/L`, budget: [] });
const component = (linkId: number, analyte: string, parent: string, value: string, u: string) => ({ linkId, analyteFormula: analyte, parent: { id: linkId, identifier: parent }, plannedAliquot: {}, aliquots: [], planned: planned(value, u) });

describe('bench header of a mix', () => {
  it('shows each analyte with its own target, GUM-rounded, and its parent', () => {
    const d = { kind: 'mix', analyteFormula: 'Pb', target: { value: '10.0093', unit: 'mg/L' }, mix: { plannedFinalMl: '100', components: [component(1, 'Pb', 'HWL-2026-0001', '10.00938271', '0.012'), component(2, 'Cd', 'HWL-2026-0007', '4.99871', '0.0061')] } } as unknown as PreparationDetail;
    const html = renderToString(createElement(MixTargets, { d })).replace(/<!-- -->/g, '');
    expect(html).toContain('Mix of 2 analytes');
    // U = 2u = 0.024 and 0.0122 → 0.012: three decimals each (GUM 7.2.6, two significant digits of U)
    expect(html).toMatch(/data-testid="bench-mix-target-Pb">Pb 10\.009 mg\/L/);
    expect(html).toMatch(/data-testid="bench-mix-target-Cd">Cd 4\.999 mg\/L/);
    expect(html).toContain('HWL-2026-0007');
  });
});
