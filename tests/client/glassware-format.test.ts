/**
 * The glassware-check pages' field and formatting logic (src/features/glassware): reading text as typed, the plan
 * form → POST /api/volume-checks body with errors at the field, the balance gates the server refuses with, the
 * request of the bench's live calculation (built as the server builds the stored result), statuses in words, and
 * rounding at the edge only.
 */
import { describe, expect, it } from 'vitest';
import { calculateVolumeCheck } from '../../shared/calc/volume-check.ts';
import { volumeCheckRequestSchema } from '../../shared/schemas/volume-check.ts';
import {
  defaultReadingUnit,
  displayStatus,
  gramDecimals,
  limitSource,
  liveRequest,
  nextReplicate,
  progress,
  readingError,
  replicateSlots,
  testedLabel,
  uncertaintyText,
  valueAtUncertainty,
  volumeText,
} from '../../src/features/glassware/format.ts';
import { EMPTY_CHECK_PLAN, formFieldOf, refusedGates, toPlanInput, type PlanFormValues } from '../../src/features/glassware/plan-form.ts';
import type { CheckReading, VolumeCheckDetail } from '../../src/features/glassware/types.ts';

const person = { id: 3, fullName: 'Priya Lindqvist' };
let nextId = 1;
const reading = (replicate: number, value: string, opts: Partial<CheckReading> = {}): CheckReading => ({
  id: nextId++,
  testedIndex: 0,
  replicate,
  value,
  unit: 'g',
  supersedesId: null,
  correctionReason: null,
  recordedBy: person,
  recordedAt: '2026-12-05T10:00:00.000Z',
  current: true,
  ...opts,
});

function check(readings: CheckReading[], over: Partial<VolumeCheckDetail> = {}): VolumeCheckDetail {
  return {
    id: 1,
    identifier: 'VC-2026-0001',
    status: 'planned',
    version: 1,
    ware: { id: 9, identifier: 'BP-10-01', kind: 'bulb_pipette', nominalVolumeMl: '10', class: 'A', material: 'borosilicate 3.3' },
    balance: { id: 1, identifier: 'BAL-A1', readabilityMg: '0.1', description: 'analytical' },
    plan: { kind: 'bulb_pipette', class: 'A', material: 'borosilicate_3_3', mode: 'delivery', nominal: { value: '10', unit: 'mL' }, tested: [{ value: '10', unit: 'mL', replicates: 10 }], intervalMonths: 12 },
    gates: [],
    conditions: { waterTemperatureC: '20.5', waterAirSaturated: false, air: { temperatureC: '21.0', pressureHPa: '1012', relativeHumidityPct: '45' } },
    notes: null,
    readings,
    result: null,
    calcVersion: null,
    nextDueOn: null,
    createdBy: person,
    createdAt: '2026-12-05T09:00:00.000Z',
    signatures: [],
    verificationChecklist: [],
    canSign: { prepare: false, verify: false, return: false, reasons: {} },
    ...over,
  };
}

const BALANCE = { weightDensityGPerMl: '8.0', calibrationUncertaintyMg: '0.2', calibrationUncertaintyK: '2' };

describe('a reading as typed', () => {
  it('keeps the digits and refuses what the shared schema refuses, with a message for the field', () => {
    expect(readingError('9.9740')).toBeNull();
    expect(readingError(' 9.9740 ')).toBeNull();
    expect(readingError('')).toMatch(/as the balance shows it/);
    expect(readingError('9,9740')).toMatch(/point/);
    expect(readingError('abc')).toMatch(/decimal number/);
    expect(readingError('0')).toMatch(/greater than 0/);
    expect(readingError('-1.2')).toMatch(/greater than 0/);
  });

  it('defaults to grams from 1 mL up and milligrams below (common practice)', () => {
    expect(defaultReadingUnit('10')).toBe('g');
    expect(defaultReadingUnit('1.000')).toBe('g');
    expect(defaultReadingUnit('0.1')).toBe('mg');
  });
});

describe('the replicate grid', () => {
  it('shows the reading in force per replicate and keeps what it superseded', () => {
    const first = reading(1, '9.9743');
    const wrong = reading(2, '9.9379', { current: false });
    const fixed = reading(2, '9.9739', { supersedesId: wrong.id, correctionReason: 'Digits transposed' });
    const d = check([first, wrong, fixed]);
    const slots = replicateSlots(d, 0);
    expect(slots).toHaveLength(10);
    expect(slots[1]!.current?.value).toBe('9.9739');
    expect(slots[1]!.history.map((h) => h.value)).toEqual(['9.9379']);
    expect(nextReplicate(slots)).toBe(3);
    expect(progress(d)).toEqual({ done: 2, total: 10 });
    expect(testedLabel(d, 0)).toBe('10 mL (nominal)');
  });
});

describe('the live calculation request', () => {
  it('is built from the plan, conditions and balance as the server builds the stored result, current readings only', () => {
    const wrong = reading(2, '9.9379', { current: false });
    const d = check([reading(1, '9.9743'), wrong, reading(2, '9.9739', { supersedesId: wrong.id, correctionReason: 'typo' })]);
    const built = liveRequest(d, 0, BALANCE, { value: '9.9758 ', unit: 'g' })!;
    expect(built.single).toBe(false);
    expect(built.request.readings).toEqual([
      { value: '9.9743', unit: 'g' },
      { value: '9.9739', unit: 'g' },
      { value: '9.9758', unit: 'g' },
    ]);
    expect(built.request.ware).toEqual({ kind: 'bulb_pipette', nominal: { value: '10', unit: 'mL' }, class: 'A', material: 'borosilicate_3_3', mode: 'delivery' });
    // u = U/k of the balance calibration (0.2 mg, k = 2 → 0.1 mg), as volume-check.service.ts calcFor does
    expect(built.request.balance).toEqual({ weightDensity: { value: '8.0', unit: 'g/mL' }, readability: { value: '0.1', unit: 'mg' }, standardUncertainty: { value: '0.1', unit: 'mg' } });
    expect(volumeCheckRequestSchema.safeParse(built.request).success).toBe(true);
    const r = calculateVolumeCheck(built.request);
    expect(r.replicates.map((x) => x.reading.value)).toEqual(['9.9743', '9.9739', '9.9758']);
  });

  it('a reading typed with a comma is not sent; a single reading is sent twice and flagged so only its own volume is shown', () => {
    const d = check([reading(1, '9.9743')]);
    expect(liveRequest(d, 0, BALANCE, { value: '9,97', unit: 'g' })).toMatchObject({ single: true });
    const one = liveRequest(d, 0, BALANCE, null)!;
    expect(one.single).toBe(true);
    expect(one.request.readings).toEqual([
      { value: '9.9743', unit: 'g' },
      { value: '9.9743', unit: 'g' },
    ]);
    // the volume of that one replicate does not depend on the duplicate (V20 per replicate, ISO 4787)
    const alone = calculateVolumeCheck(one.request).replicates[0]!.volume.value;
    const withOthers = calculateVolumeCheck(liveRequest(d, 0, BALANCE, { value: '9.9800', unit: 'g' })!.request).replicates[0]!.volume.value;
    expect(alone).toBe(withOthers);
    expect(liveRequest(check([]), 0, BALANCE, null)).toBeNull();
  });

  it('a piston pipette sends the tested volume of the tab and the plan limits the server stored', () => {
    const d = check([reading(1, '99.12', { testedIndex: 1, unit: 'mg' }), reading(2, '99.15', { testedIndex: 1, unit: 'mg' })], {
      plan: {
        kind: 'piston_pipette',
        class: null,
        material: 'polypropylene',
        mode: 'delivery',
        nominal: { value: '0.200', unit: 'mL' },
        tested: [
          { value: '0.200', unit: 'mL', replicates: 10 },
          { value: '0.100', unit: 'mL', replicates: 10 },
          { value: '0.0200', unit: 'mL', replicates: 10 },
        ],
        intervalMonths: 12,
        limits: { systematic: { value: '0.0016', unit: 'mL' }, source: 'tolerance recorded for PP-200-01 in the inventory' },
      },
    });
    const built = liveRequest(d, 1, { weightDensityGPerMl: '8.0', calibrationUncertaintyMg: null, calibrationUncertaintyK: null }, null)!;
    expect(built.request.ware.testedVolume).toEqual({ value: '0.100', unit: 'mL' });
    expect(built.request.ware.limits?.source).toMatch(/inventory/);
    expect(built.request.balance?.standardUncertainty).toBeUndefined();
    expect(testedLabel(d, 1)).toBe('0.100 mL (50 %)');
  });
});

describe('statuses and the limit in words', () => {
  it('a check sent back (stored planned, latest signature "returned") is shown as returned', () => {
    const sig = (meaning: string) => ({ id: 1, meaning, meaningText: '', signer: person, signedAt: '', recordVersion: 1, recordHash: '', reason: 'x', valid: false });
    expect(displayStatus({ status: 'planned', signatures: [] })).toBe('planned');
    expect(displayStatus({ status: 'planned', signatures: [sig('prepared'), sig('returned')] })).toBe('returned');
    expect(displayStatus({ status: 'verified', signatures: [sig('prepared'), sig('verified')] })).toBe('verified');
  });

  it('prints the limit source without internal document references, saying "from memory" once (shared helper)', () => {
    const text = limitSource({ systematic: { value: '0.020', unit: 'mL' }, random: null, source: 'ISO 648 (one-mark pipettes), class A, 10 mL: ISO 648 class A table as recalled in METROLOGY.md §4.4 (from memory)', fromMemory: true });
    expect(text).not.toMatch(/METROLOGY|§/);
    expect(text.match(/from memory/g)).toHaveLength(1);
    expect(limitSource({ systematic: { value: '1', unit: 'mL' }, random: null, source: 'lab procedure LP-12', fromMemory: true })).toBe('lab procedure LP-12 (from memory; check against the standard)');
  });
});

describe('rounding at the edge', () => {
  it('shows volumes to the places the balance resolves (1 mg of water ≈ 1 µL) and U to two significant figures (JCGM 100 §7.2.6)', () => {
    expect(gramDecimals('0.1')).toBe(4);
    expect(gramDecimals('0.01')).toBe(5);
    expect(gramDecimals('10')).toBe(2);
    expect(volumeText('10.003952714', '0.1')).toBe('10.0040');
    expect(volumeText('-0.00123456', '0.01')).toBe('-0.00123');
    expect(uncertaintyText('0.000934187')).toBe('0.00093');
    expect(valueAtUncertainty('10.004002146323527361', '0.000934187')).toBe('10.00400');
    expect(valueAtUncertainty('0.19876', '0.0021')).toBe('0.1988');
  });
});

describe('the plan form', () => {
  const filled: PlanFormValues = {
    ...EMPTY_CHECK_PLAN,
    wareId: '9',
    balanceId: '1',
    conditions: { waterTemperatureC: '20.5', waterAirSaturated: true, air: { temperatureC: '21.0', pressureHPa: '1012', relativeHumidityPct: '45' }, evaporationMg: '0.3' },
  };

  it('becomes the shared request body with the digits as typed', () => {
    const r = toPlanInput(filled, false);
    expect('input' in r && r.input).toEqual({
      wareId: 9,
      balanceId: 1,
      replicates: 10,
      intervalMonths: 12,
      conditions: { waterTemperatureC: '20.5', waterAirSaturated: true, air: { temperatureC: '21.0', pressureHPa: '1012', relativeHumidityPct: '45' }, evaporation: { value: '0.3', unit: 'mg' } },
    });
  });

  it('sends no replicate count for a piston pipette (ISO 8655-6 fixes 10 per tested volume)', () => {
    const r = toPlanInput({ ...filled, replicates: 'x' }, true);
    expect('input' in r && r.input.replicates).toBeUndefined();
  });

  it('puts each problem on its field', () => {
    const r = toPlanInput({ ...filled, wareId: '', replicates: '1', conditions: { ...filled.conditions, waterTemperatureC: '20,5', evaporationMg: '-1', air: { ...filled.conditions.air, relativeHumidityPct: '120' } } }, false);
    expect('errors' in r).toBe(true);
    const e = 'errors' in r ? r.errors : {};
    expect(e.wareId).toBe('Choose the ware to check');
    expect(e.replicates).toBe('At least 2 replicates');
    expect(e['conditions.waterTemperatureC']).toMatch(/point, not a comma/);
    expect(e['conditions.air.relativeHumidityPct']).toMatch(/0 to 100/);
    expect(e['conditions.evaporationMg']).toMatch(/not be negative/);
    expect(toPlanInput({ ...filled, replicates: '2.5' }, false)).toEqual({ errors: { replicates: 'Replicates is a whole number from 2 to 30' } });
  });

  it('maps the server’s field paths to the form’s', () => {
    expect(formFieldOf('conditions.evaporation.value')).toBe('conditions.evaporationMg');
    expect(formFieldOf('conditions.waterTemperatureC')).toBe('conditions.waterTemperatureC');
    expect(formFieldOf('balanceId')).toBe('balanceId');
  });

  it('splits a refused balance into one blocking gate per reason, each with what to do', () => {
    const gates = refusedGates('BAL-A2 calibration due 2026-05-20 (overdue); smallest water mass about 9970 mg against the minimum weight 20000 mg of BAL-A2');
    expect(gates.map((g) => g.severity)).toEqual(['block', 'block']);
    expect(gates[0]!.action).toMatch(/calibrat/);
    expect(gates[1]!.action).toMatch(/minimum weight/);
    expect(refusedGates(undefined)).toEqual([]);
  });
});
