/**
 * The "Make a mix" page's rules (src/features/mixes/mix-form.ts): which standards can go in (verified, in date,
 * with a concentration, not a mix), each analyte once, the aliquots must fit the flask, piston pipettes set within
 * 10 % of nominal to nominal (the server's rule, common practice), the live expected concentration per analyte
 * (METROLOGY §5.5 with class A tolerances as triangular a/√6, QUAM A1 / §4.4), and the body of POST /api/mixes.
 */
import { describe, expect, it } from 'vitest';
import { D } from '../../shared/calc/decimal.ts';
import { mixInputSchema } from '../../shared/schemas/lineage.ts';
import { deliveredMl, expectedMix, mixFieldErrors, mixParentRefusal, parentConcentration, toMixInput, type ComponentRow, type Flask, type Pipette } from '../../src/features/mixes/mix-form.ts';
import type { PreparationDetail } from '../../src/features/preparations/types.ts';
import { expectClose } from '../helpers/decimal.ts';

const TODAY = '2026-12-02';
const conc = (value: string, u: string) => ({ value, unit: 'mg/L', standardUncertainty: u, expandedUncertainty: new D(u).mul(2).toString(), k: '2', display: `${value} ± ${new D(u).mul(2).toString()} mg/L (k = 2)` });
const detail = (identifier: string, analyte: string, over: Record<string, unknown> = {}) =>
  ({
    identifier,
    status: 'verified',
    analyteFormula: analyte,
    materialName: analyte,
    kind: 'stock',
    expiry: { expiresOn: '2027-01-31', reason: '' },
    result: { concentration: conc('1000.0', '1.0') },
    ...over,
  }) as unknown as PreparationDetail;

const BP1: Pipette = { id: 1, identifier: 'BP-1-01', kind: 'bulb_pipette', nominalVolumeMl: '1', toleranceMl: '0.008', class: 'A' };
const BP50: Pipette = { id: 50, identifier: 'BP-50-01', kind: 'bulb_pipette', nominalVolumeMl: '50', toleranceMl: '0.050', class: 'A' };
const PP1000: Pipette = { id: 9, identifier: 'PP-1000-01', kind: 'piston_pipette', nominalVolumeMl: '1.000', toleranceMl: '0.008', class: 'n/a' };
const PIPETTES = [BP1, BP50, PP1000];
const VF100: Flask = { id: 100, identifier: 'VF-100-02', nominalVolumeMl: '100', toleranceMl: '0.10', class: 'A' };

const pb = detail('HWL-2026-0001', 'Pb');
const cd = detail('HWL-2026-0012', 'Cd', { result: { concentration: conc('998.6', '0.9') } });
const parents = new Map([
  [pb.identifier, pb],
  [cd.identifier, cd],
]);
const row = (parentKey: string, pipetteId: number | '', aliquotMl = ''): ComponentRow => ({ parentKey, pipetteId: String(pipetteId), aliquotMl });

describe('which standards can go into a mix', () => {
  it('a verified, in-date stock with a result can; a planned, an expired, a mix and one without a concentration cannot', () => {
    expect(mixParentRefusal(pb, TODAY)).toBeNull();
    expect(mixParentRefusal(detail('X', 'Pb', { status: 'planned' }), TODAY)).toMatch(/not yet signed/);
    expect(mixParentRefusal(detail('X', 'Pb', { status: 'prepared' }), TODAY)).toMatch(/'prepared'.*verified/);
    expect(mixParentRefusal(detail('X', 'Pb', { expiry: { expiresOn: '2026-12-01', reason: '' } }), TODAY)).toMatch(/expired on 2026-12-01/);
    expect(mixParentRefusal(detail('X', 'Pb+Cd', { kind: 'mix', result: undefined, mix: { components: [] } }), TODAY)).toMatch(/itself a mix/);
    expect(mixParentRefusal(detail('X', 'Pb', { result: undefined }), TODAY)).toMatch(/no computed concentration/);
  });

  it("a verified dilution's concentration is its dilution result", () => {
    const d = detail('HWL-2026-0020', 'Pb', { kind: 'dilution', result: undefined, dilution: { result: conc('10.000', '0.035') } });
    expect(parentConcentration(d)?.value).toBe('10.000');
    expect(mixParentRefusal(d, TODAY)).toBeNull();
  });
});

describe('expected concentration per analyte [METROLOGY §5.5]', () => {
  it('c_i = c_parent,i·V_i/V_flask, u_r² = u_r(parent)² + (a_p/√6/V_p)² + (a_f/√6/V_f)²; aliquots add up against the flask', () => {
    const e = expectedMix([row(pb.identifier, 1), row(cd.identifier, 9, '0.500')], parents, PIPETTES, VF100);
    const [ePb, eCd] = e.components.map((c) => c.expected!);
    // Pb: 1000.0 × 1/100 = 10.000 mg/L; u_r² = (1.0/1000)² + (0.008/√6)² + (0.10/√6/100)² = 1e-6 + 1.0667e-5 + 1.667e-7 [by hand]
    expectClose(ePb.value, '10', '1e-12');
    expectClose(new D(ePb.relative).pow(2), '1.18333333e-5', '1e-12');
    // Cd with a piston pipette set to 0.500 mL: 998.6 × 0.5/100 = 4.993; its tolerance is absolute at any setting,
    // rectangular a/√3 (ISO 8655 maximum permissible error, the conservative choice): (0.008/√3/0.5)² = 8.5333e-5
    expectClose(eCd.value, '4.993', '1e-12');
    expectClose(new D(eCd.relative).pow(2), new D('0.9').div('998.6').pow(2).plus('8.53333333e-5').plus('1.66666667e-7'), '1e-12');
    expect(e.totalMl).toBe('1.5');
    expect(e.fits).toBe(true);
    expect(ePb.display).toMatch(/^10\.0\d* ± 0\.0\d+ mg\/L \(k = 2\)$/);
  });

  it('a bulb pipette delivers its nominal volume; a piston pipette its setting, or nominal when none is typed', () => {
    expect(deliveredMl(BP1, '0.5')).toBe('1');
    expect(deliveredMl(PP1000, '')).toBe('1.000');
    expect(deliveredMl(PP1000, '0.250')).toBe('0.25');
    expect(deliveredMl(PP1000, 'abc')).toBeNull();
    expect(deliveredMl(undefined, '')).toBeNull();
  });
});

describe('messages at the fields before sending', () => {
  it('a complete, valid mix has none', () => {
    expect(mixFieldErrors([row(pb.identifier, 1), row(cd.identifier, 1)], parents, PIPETTES, VF100, TODAY)).toEqual({});
  });

  it('one component, a repeated analyte, a missing pipette, a piston setting out of range, no flask', () => {
    expect(mixFieldErrors([row(pb.identifier, 1)], parents, PIPETTES, VF100, TODAY).components).toMatch(/at least two/);
    const pb2 = detail('HWL-2026-0030', 'Pb');
    const twice = mixFieldErrors([row(pb.identifier, 1), row(pb2.identifier, 1)], new Map([...parents, [pb2.identifier, pb2]]), PIPETTES, VF100, TODAY);
    expect(twice['components.1.parentKey']).toMatch(/Pb, like component 1.*once/);
    const e = mixFieldErrors([row(pb.identifier, ''), row(cd.identifier, 9, '0.05')], parents, PIPETTES, undefined, TODAY);
    expect(e['components.0.pipetteId']).toBe('Choose a pipette');
    expect(e['components.1.aliquotMl']).toMatch(/between 0\.1 and 1 mL/);
    expect(e.flaskId).toBe('Choose a volumetric flask');
  });

  it('aliquots that fill the flask leave no room for the solvent', () => {
    const e = mixFieldErrors([row(pb.identifier, 50), row(cd.identifier, 50)], parents, PIPETTES, VF100, TODAY);
    expect(e.flaskId).toMatch(/add up to 100 mL.*100 mL flask/);
  });

  it('an unverified parent is named at its component', () => {
    const planned = detail('HWL-2026-0040', 'Cu', { status: 'planned' });
    const e = mixFieldErrors([row(pb.identifier, 1), row(planned.identifier, 1)], new Map([...parents, [planned.identifier, planned]]), PIPETTES, VF100, TODAY);
    expect(e['components.1.parentKey']).toMatch(/only a verified standard/);
  });
});

describe('the body of POST /api/mixes', () => {
  it("is the shared schema's: pipette ids as numbers, a piston pipette's setting only when typed, notes trimmed", () => {
    const body = toMixInput([row(pb.identifier, 1, '0.7'), row(cd.identifier, 9, ' 0.500 ')], PIPETTES, VF100.id, '  for ICP-OES calibration ');
    expect(body).toEqual({
      components: [
        { parentKey: pb.identifier, pipetteId: 1 },
        { parentKey: cd.identifier, pipetteId: 9, aliquotMl: '0.500' },
      ],
      flaskId: 100,
      notes: 'for ICP-OES calibration',
    });
    expect(mixInputSchema.safeParse(body).success).toBe(true);
  });
});
