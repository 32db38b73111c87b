/**
 * The mix panel (detail) and the mix bench render what the API gives (server-side rendering to a string, no
 * browser): every analyte's parent, aliquot, planned and recomputed concentration ± U in words and numbers; at the
 * bench, one card per component, the aliquot form on the first component still without an aliquot, the make-up
 * held back until every aliquot is recorded, the hazard cautions. The numbers are the DTO's own strings.
 */
import { createElement } from 'react';
import { renderToString } from 'react-dom/server';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { MemoryRouter } from 'react-router';
import { describe, expect, it } from 'vitest';
import { MixBench } from '../../src/features/mixes/components/mix-bench.tsx';
import { MixInputs, MixPanel, isMix } from '../../src/features/mixes/components/mix-panel.tsx';
import { MixPage } from '../../src/features/mixes/mix-page.tsx';
import type { PreparationDetail } from '../../src/features/preparations/types.ts';

const result = (value: string, U: string, extra: Record<string, unknown> = {}) => ({
  value,
  unit: 'mg/L',
  standardUncertainty: String(Number(U) / 2),
  expandedUncertainty: U,
  relative: '0.0033',
  k: '2',
  display: `${value} ± ${U} mg/L (k = 2)`,
  budget: [],
  ...extra,
});
const pipette = (identifier: string, ml: string) => ({ id: 1, identifier, snapshot: { id: 1, identifier, kind: 'bulb_pipette', nominalVolumeMl: ml, class: 'A', toleranceMl: '0.008', status: 'in_service' } });
const parent = (identifier: string, analyte: string, display: string) => ({ id: 7, identifier, snapshot: { id: 7, identifier, kind: 'stock', status: 'verified', version: 3, analyteFormula: analyte, concentration: { value: '1000', unit: 'mg/L', standardUncertainty: '1', display }, expiresOn: '2027-01-31' } });
const aliquot = (id: number, ml: string, pip: string, over: Record<string, unknown> = {}) => ({ id, pipette: pipette(pip, ml), volumeMl: ml, recordedBy: { id: 3, fullName: 'Tomas Reyes' }, recordedAt: '2026-12-02T09:00:00Z', ...over });

function mixDetail(stage: 'one-aliquot' | 'done'): PreparationDetail {
  const done = stage === 'done';
  return {
    id: 40,
    identifier: 'HWL-2026-0040',
    status: 'planned',
    kind: 'mix',
    analyteFormula: 'Pb+Cd',
    materialName: 'Mix: Lead(II) nitrate + Cadmium metal (granules)',
    snapshot: { material: { name: 'Mix: Lead(II) nitrate + Cadmium metal (granules)', lot: 'NRM-24-0931 + NRM-23-0072' }, flask: { identifier: 'VF-100-02', nominalVolumeMl: '100', class: 'A', toleranceMl: '0.10' } },
    hazards: { task: 'Pipetting a solution of the standard, then making up to the mark', cautions: ['May cause cancer: handle in a fume hood'], solvents: [{ name: 'Nitric acid 2 % (v/v)', hazards: 'corrosive, oxidising', pictograms: ['GHS03', 'GHS05'], cautions: [] }], sdsNote: 'Follow the SDS, local regulations and the laboratory’s own procedures.', statements: ['H350'], pictograms: ['GHS08'] },
    concentrationDisplay: done ? 'Pb 10.00 ± 0.07 mg/L; Cd 19.98 ± 0.09 mg/L (k = 2)' : undefined,
    ...(done ? { makeUp: { id: 9, flask: { identifier: 'VF-100-02' }, solvent: { name: 'Nitric acid 2 % (v/v)', lot: 'HNO3-2-26-1130' }, solutionTemperatureC: '20.0', recordedBy: { fullName: 'Tomas Reyes' }, recordedAt: '2026-12-02T09:10:00Z' } } : {}),
    mix: {
      plannedFinalMl: '100',
      components: [
        {
          linkId: 11,
          parent: parent('HWL-2026-0001', 'Pb', '1000.3 ± 2.1 mg/L (k = 2)'),
          analyteFormula: 'Pb',
          plannedAliquot: { ...pipette('BP-1-01', '1'), volumeMl: '1', pipette: pipette('BP-1-01', '1') },
          aliquots: done ? [aliquot(21, '1', 'BP-1-01', { supersededById: 23 }), aliquot(23, '1', 'BP-1-01', { supersedesId: 21, correctionReason: 'drained into the wrong flask' })] : [aliquot(21, '1', 'BP-1-01')],
          planned: result('10.00', '0.07'),
          ...(done ? { result: result('10.00', '0.07', { calcVersion: 'mix-1', basedOn: { aliquotId: 23, makeUpId: 9 } }) } : {}),
        },
        {
          linkId: 12,
          parent: parent('HWL-2026-0012', 'Cd', '999.0 ± 2.0 mg/L (k = 2)'),
          analyteFormula: 'Cd',
          plannedAliquot: { volumeMl: '2', pipette: pipette('BP-2-01', '2') },
          aliquots: done ? [aliquot(22, '2', 'BP-2-01')] : [],
          planned: result('19.98', '0.09'),
          ...(done ? { result: result('19.98', '0.09', { calcVersion: 'mix-1', basedOn: { aliquotId: 22, makeUpId: 9 } }) } : {}),
        },
      ],
    },
  } as unknown as PreparationDetail;
}

const render = (el: ReturnType<typeof createElement>) =>
  renderToString(createElement(QueryClientProvider, { client: new QueryClient() }, createElement(MemoryRouter, null, el)))
    .replace(/<!-- -->/g, '')
    .replace(/&#x27;/g, "'");

describe('the mix panel on the detail page', () => {
  it('lists every analyte with its parent as used, the aliquots, planned and recomputed concentration ± U', () => {
    const d = mixDetail('done');
    expect(isMix(d)).toBe(true);
    const html = render(createElement(MixPanel, { d }));
    expect(html).toContain('Result per analyte');
    expect(html).toContain('HWL-2026-0001');
    expect(html).toContain('1000.3 ± 2.1 mg/L (k = 2)');
    expect(html).toContain('delivered 1 mL with BP-1-01');
    expect(html).toContain('(1 superseded)');
    expect(html).toMatch(/data-testid="detail-mix-result-Cd">19\.98 ± 0\.09 mg\/L \(k = 2\)/);
    expect(html).toContain('make-up #9');
    const inputs = render(createElement(MixInputs, { d }));
    expect(inputs).toContain('HWL-2026-0012 v3, verified');
    expect(inputs).toContain('NRM-24-0931 + NRM-23-0072');
  });

  it('before the bench work: expected values and "not recorded yet"', () => {
    const html = render(createElement(MixPanel, { d: mixDetail('one-aliquot') }));
    expect(html).toContain('Expected result per analyte');
    expect(html).toContain('not recorded yet');
    expect(html).toContain('after the aliquot and the make-up');
  });

  it('a stock is not a mix', () => {
    expect(isMix({ kind: 'stock', children: [] } as unknown as PreparationDetail)).toBe(false);
  });
});

describe('the mix bench', () => {
  it('one card per component; the aliquot form opens on the first component without an aliquot; make-up waits for all', () => {
    const html = render(createElement(MixBench, { d: mixDetail('one-aliquot') }));
    expect(html).toContain('data-testid="mix-bench-component-Pb"');
    expect(html).toContain('data-testid="mix-bench-component-Cd"');
    expect(html).toMatch(/data-testid="mix-bench-volume-Cd">2</);
    // Pb has its aliquot: a correction button; Cd is open for its aliquot
    expect(html).toContain('data-testid="mix-correct-Pb"');
    expect(html.match(/data-testid="aliquot-form"/g)).toHaveLength(1);
    expect(html.indexOf('data-testid="aliquot-form"')).toBeGreaterThan(html.indexOf('mix-bench-component-Cd'));
    expect(html).toContain('Planned: BP-2-01');
    expect(html).toContain('data-testid="make-up-wait"');
    expect(html).toContain('May cause cancer');
    // the task, the solvent's own hazards and the SDS line once, as the server gives them (shared/prep/cautions.ts)
    expect(html).toContain('Pipetting a solution of the standard');
    expect(html).toMatch(/Nitric acid 2 % \(v\/v\)<\/span>: corrosive, oxidising/);
    expect(html.split('Follow the SDS, local regulations').length - 1).toBe(1);
  });

  it('when every aliquot and the make-up are recorded: each analyte recomputed, superseded aliquot shown struck through, next step to sign', () => {
    const html = render(createElement(MixBench, { d: mixDetail('done') }));
    expect(html).not.toContain('data-testid="aliquot-form"');
    expect(html).toMatch(/data-testid="mix-bench-result-Pb">10\.00 ± 0\.07 mg\/L \(k = 2\)/);
    expect(html).toContain('data-testid="mix-aliquot-superseded"');
    expect(html).toContain('drained into the wrong flask');
    expect(html).toContain('data-testid="make-up-done"');
    expect(html).toContain('data-testid="bench-next-step"');
  });
});

describe('the Make a mix page', () => {
  it('opened from a standard (?from=) starts with it as the first component, a flask choice and the create button', () => {
    const html = renderToString(
      createElement(QueryClientProvider, { client: new QueryClient() }, createElement(MemoryRouter, { initialEntries: ['/mixes/new?from=HWL-2026-0001'] }, createElement(MixPage))),
    ).replace(/<!-- -->/g, '');
    expect(html).toContain('Make a mix');
    expect(html).toContain('data-testid="mix-component-0"');
    expect(html).toContain('HWL-2026-0001');
    expect(html).toContain('data-testid="mix-component-0-pipette"');
    expect(html).toContain('data-testid="mix-flask"');
    expect(html).toContain('data-testid="mix-search"');
    expect(html).toContain('data-testid="mix-submit"');
    expect(html).toContain('Follow the SDS');
  });
});
