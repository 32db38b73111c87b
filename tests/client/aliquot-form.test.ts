/**
 * The bench aliquot form's rules (src/features/lineage/components/aliquot-fields.ts): a bulb pipette delivers
 * its nominal volume and has no volume field; a piston pipette is set within 10 % of nominal to nominal (the
 * server's range, lineage.service aliquotVolume; common practice for air-displacement pipettes, ISO 8655-2
 * gives tolerances from 10 % of nominal); the body sent is the shared aliquotInputSchema's; a scanned code is
 * cleaned; a correction needs a reason. Messages come from the shared schema, so the field shows the API's text.
 */
import { describe, expect, it } from 'vitest';
import {
  ALIQUOT_FORM_FIELDS,
  aliquotFieldsFor,
  aliquotFormSchema,
  pipetteIdentifierToSend,
  pipetteMatch,
  toAliquotInput,
  type AliquotFormValues,
} from '../../src/features/lineage/components/aliquot-fields.ts';
import { aliquotInputSchema } from '../../shared/schemas/lineage.ts';

const BULB = { identifier: 'BP-10-01', kind: 'bulb_pipette', nominalVolumeMl: '10' };
const PISTON = { identifier: 'PP-1000-01', kind: 'piston_pipette', nominalVolumeMl: '1.000' };

const values = (v: Partial<AliquotFormValues>): AliquotFormValues => ({ pipetteIdentifier: '', volumeMl: '', correctionReason: '', ...v });

function issues(schema: ReturnType<typeof aliquotFormSchema>, v: AliquotFormValues): Record<string, string> {
  const r = schema.safeParse(v);
  if (r.success) return {};
  return Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]));
}

describe('which fields the aliquot form shows', () => {
  it('when the planned pipette is a bulb pipette, then there is no volume field: it delivers its nominal volume', () => {
    expect(aliquotFieldsFor(BULB)).toEqual({ volume: 'fixed', deliversMl: '10' });
  });

  it('when the planned pipette is a piston pipette, then the volume is set, from 10 % of nominal to nominal', () => {
    expect(aliquotFieldsFor(PISTON)).toEqual({ volume: 'set', minMl: '0.1', maxMl: '1' });
    expect(aliquotFieldsFor({ kind: 'piston_pipette', nominalVolumeMl: '5' })).toEqual({ volume: 'set', minMl: '0.5', maxMl: '5' });
  });
});

describe('the client schema', () => {
  it('when a bulb pipette is scanned, then only the identifier is needed and the volume is ignored', () => {
    const s = aliquotFormSchema(aliquotFieldsFor(BULB), false);
    expect(issues(s, values({ pipetteIdentifier: 'BP-10-01' }))).toEqual({});
    expect(issues(s, values({ pipetteIdentifier: 'BP-10-01', volumeMl: 'anything' }))).toEqual({});
  });

  it('when nothing is scanned, then the identifier field shows the shared schema message', () => {
    const s = aliquotFormSchema(aliquotFieldsFor(BULB), false);
    expect(issues(s, values({ pipetteIdentifier: '  \r' }))).toEqual({ pipetteIdentifier: 'Scan or type the pipette identifier' });
  });

  it('when a piston pipette volume is missing, malformed or outside its range, then the volume field says so', () => {
    const s = aliquotFormSchema(aliquotFieldsFor(PISTON), false);
    expect(issues(s, values({ pipetteIdentifier: 'PP-1000-01', volumeMl: '' })).volumeMl).toBe('Enter the delivered volume');
    expect(issues(s, values({ pipetteIdentifier: 'PP-1000-01', volumeMl: '0,5' })).volumeMl).toMatch(/use a point, not a comma/);
    expect(issues(s, values({ pipetteIdentifier: 'PP-1000-01', volumeMl: '0.05' })).volumeMl).toBe('Set the pipette between 0.1 and 1 mL (10 % of nominal to nominal)');
    expect(issues(s, values({ pipetteIdentifier: 'PP-1000-01', volumeMl: '1.5' })).volumeMl).toMatch(/between 0\.1 and 1 mL/);
    // the ends of the range are allowed
    expect(issues(s, values({ pipetteIdentifier: 'PP-1000-01', volumeMl: '0.100' }))).toEqual({});
    expect(issues(s, values({ pipetteIdentifier: 'PP-1000-01', volumeMl: '1.000' }))).toEqual({});
  });

  it('when correcting, then the reason is required (at least 3 characters), and not otherwise', () => {
    const f = aliquotFieldsFor(BULB);
    expect(issues(aliquotFormSchema(f, true), values({ pipetteIdentifier: 'BP-10-01', correctionReason: 'x' })).correctionReason).toBe('Give the reason for the correction (at least 3 characters)');
    expect(issues(aliquotFormSchema(f, true), values({ pipetteIdentifier: 'BP-10-01', correctionReason: 'Wrong pipette scanned' }))).toEqual({});
    expect(issues(aliquotFormSchema(f, false), values({ pipetteIdentifier: 'BP-10-01' }))).toEqual({});
  });
});

describe('the request body', () => {
  it('when a bulb pipette is recorded, then the body has the identifier only, valid for the shared schema', () => {
    const body = toAliquotInput(values({ pipetteIdentifier: ' BP-10-01\r', volumeMl: '10' }), { fields: aliquotFieldsFor(BULB), plannedIdentifier: 'BP-10-01' });
    expect(body).toEqual({ pipetteIdentifier: 'BP-10-01' });
    expect(aliquotInputSchema.safeParse(body).success).toBe(true);
  });

  it('when a piston pipette is recorded, then the volume is sent exactly as typed (a decimal string)', () => {
    const body = toAliquotInput(values({ pipetteIdentifier: 'PP-1000-01', volumeMl: '0.500 ' }), { fields: aliquotFieldsFor(PISTON), plannedIdentifier: 'PP-1000-01' });
    expect(body).toEqual({ pipetteIdentifier: 'PP-1000-01', volumeMl: '0.500' });
  });

  it('when correcting, then the body supersedes the current aliquot with the reason', () => {
    const body = toAliquotInput(values({ pipetteIdentifier: 'BP-10-02', correctionReason: ' Scanned the wrong pipette ' }), {
      fields: aliquotFieldsFor(BULB),
      plannedIdentifier: 'BP-10-01',
      supersedesId: 7,
    });
    expect(body).toEqual({ pipetteIdentifier: 'BP-10-02', supersedesId: 7, correctionReason: 'Scanned the wrong pipette' });
  });

  it('the server fields the form places are the ones the API names (lineage.service recordAliquot)', () => {
    expect([...ALIQUOT_FORM_FIELDS]).toEqual(['pipetteIdentifier', 'volumeMl', 'correctionReason']);
  });
});

describe('the scanned pipette code', () => {
  it('when the scanner adds control characters or the code is typed in lower case, then the planned spelling is sent', () => {
    expect(pipetteIdentifierToSend('\u001dbp-10-01\r', 'BP-10-01')).toBe('BP-10-01');
    expect(pipetteMatch('bp-10-01', 'BP-10-01')).toBe('planned');
  });

  it('when another pipette is scanned, then it is sent as scanned and marked as not the planned one', () => {
    expect(pipetteIdentifierToSend(' BP-10-02 ', 'BP-10-01')).toBe('BP-10-02');
    expect(pipetteMatch('BP-10-02', 'BP-10-01')).toBe('other');
    expect(pipetteMatch('   ', 'BP-10-01')).toBe('empty');
  });
});
