import Decimal from 'decimal.js';
import { describe, expect, it } from 'vitest';
import { CALIBRATION_DUE_SOON_DAYS, evaluateGates, GATE_CODES, type GateInput } from '../../../shared/prep/gates.ts';
import { CalcError } from '../../../shared/calc/errors.ts';

// Base case: nothing fires. Balance BAL-A1 reads to 0.01 mg with m_min 16.4 mg
// (METROLOGY §7 [C]: d = 0.01 mg -> 820 d = 8.2 mg; with safety factor 2 -> 16.4 mg).
function base(over: Partial<GateInput> = {}): GateInput {
  return {
    today: '2026-03-12',
    plannedReadingMg: '25.00',
    balance: { identifier: 'BAL-A1', status: 'in_service', calibrationDueOn: '2026-09-30', minWeightMg: '16.4', readabilityMg: '0.01' },
    material: { name: 'NaCl CRM lot 4711', status: 'accepted', expiresOn: '2027-01-31', purityValue: '0.9998' },
    volumeMl: '10',
    ...over,
  };
}
const codes = (input: GateInput) => evaluateGates(input).map((g) => g.code);
const find = (input: GateInput, code: string) => evaluateGates(input).find((g) => g.code === code);

describe('evaluateGates: clean plan', () => {
  it('fires nothing for an in-service, calibrated balance, reading above m_min and an accepted, valid material', () => {
    expect(evaluateGates(base())).toEqual([]);
  });
  it('exports every code once', () => {
    expect(new Set(GATE_CODES).size).toBe(GATE_CODES.length);
    expect(GATE_CODES).toEqual(expect.arrayContaining([
      'below_min_weight', 'balance_out_of_service', 'calibration_overdue', 'calibration_due_soon',
      'material_expired', 'material_not_accepted', 'purity_missing', 'min_weight_unknown',
    ]));
  });
});

describe('below_min_weight (USP <41> via REQUIREMENTS EQ-04/OT-04: block when net < m_min)', () => {
  const flasks = ['5', '10', '20', '25', '50'];

  it('blocks 9.6 mg on a 16.4 mg balance and suggests the smallest larger flask that reaches ≥ 16.4 mg', () => {
    const g = find(base({ plannedReadingMg: '9.6', flaskOptions: flasks }), 'below_min_weight')!;
    expect(g.severity).toBe('block');
    expect(g.message).toBe('Planned reading 9.6 mg is below the minimum weight 16.4 mg of BAL-A1');
    // reading scales with volume: 9.6 mg × 20/10 = 19.2 mg ≥ 16.4 mg (arithmetic); 5 and 10 mL are not larger
    expect(g.suggestion).toMatchObject({ volumeMl: '20', readingMg: '19.20' });
    expect(new Decimal(g.suggestion!.readingMg!).gte('16.4')).toBe(true);
    expect(g.action).toBe(
      'Make up 20 mL instead of 10 mL (same concentration): the planned reading becomes 19.20 mg, at or above 16.4 mg',
    );
    // smallest volume meeting m_min: 10 × 16.4 / 9.6 = 17.083… -> 17.1 mL rounded up (arithmetic)
    expect(g.suggestion!.minimumVolumeMl).toBe('17.1');
  });

  it('skips a larger flask that is still not enough (9.6 mg × 15/10 = 14.4 mg < 16.4 mg, arithmetic)', () => {
    const g = find(base({ plannedReadingMg: '9.6', flaskOptions: ['15', '100', '25'] }), 'below_min_weight')!;
    expect(g.suggestion).toMatchObject({ volumeMl: '25', readingMg: '24.00' });
  });

  it('also suggests a more sensitive balance whose minimum weight the reading meets (smallest m_min first)', () => {
    const g = find(
      base({
        plannedReadingMg: '9.6',
        flaskOptions: flasks,
        otherBalances: [
          { identifier: 'BAL-A2', status: 'in_service', calibrationDueOn: '2026-12-01', minWeightMg: '16.4', readabilityMg: '0.01' }, // not met
          { identifier: 'BAL-U9', status: 'out_of_service', calibrationDueOn: '2026-12-01', minWeightMg: '0.9', readabilityMg: '0.001' }, // unusable
          { identifier: 'BAL-U2', status: 'in_service', calibrationDueOn: '2026-12-01', minWeightMg: '8.2', readabilityMg: '0.01' },
          { identifier: 'BAL-U1', status: 'in_service', calibrationDueOn: '2026-12-01', minWeightMg: '2.0', readabilityMg: '0.001' },
          { identifier: 'BAL-U3', status: 'in_service', calibrationDueOn: '2026-03-11', minWeightMg: '1.0', readabilityMg: '0.001' }, // overdue
        ],
      }),
      'below_min_weight',
    )!;
    expect(g.suggestion).toMatchObject({ volumeMl: '20', balanceIdentifier: 'BAL-U1' });
    expect(g.action).toContain('; or weigh on BAL-U1 (minimum weight 2.0 mg, reads to 0.001 mg)');
  });

  it('says what volume would be needed when no flask or balance is enough', () => {
    const g = find(base({ plannedReadingMg: '9.6', flaskOptions: ['5', '10'] }), 'below_min_weight')!;
    expect(g.suggestion).toEqual({ minimumVolumeMl: '17.1' });
    expect(g.action).toBe(
      'Make up at least 17.1 mL (the reading scales with the volume) or use a balance whose minimum weight is at most 9.6 mg; none of the listed flasks is enough',
    );
  });

  it('USP <41> own example (METROLOGY §7, V-src): s = 0.00015 g -> m_min 300.00 mg; 250.0 mg is blocked, 300.0 mg passes', () => {
    const bal = { identifier: 'BAL-B1', status: 'in_service' as const, calibrationDueOn: '2026-12-31', minWeightMg: '300.00', readabilityMg: '0.1' };
    expect(codes(base({ balance: bal, plannedReadingMg: '250.0' }))).toEqual(['below_min_weight']);
    expect(codes(base({ balance: bal, plannedReadingMg: '300.0' }))).toEqual([]);
  });

  it('REQUIREMENTS EQ-04 example: m_min 16 mg (d 0.01 mg, s 0.008 mg): 12 mg refused, 20 mg accepted', () => {
    const bal = { ...base().balance, minWeightMg: '16' };
    expect(codes(base({ balance: bal, plannedReadingMg: '12.00' }))).toEqual(['below_min_weight']);
    expect(codes(base({ balance: bal, plannedReadingMg: '20.00' }))).toEqual([]);
  });

  it('a reading exactly at m_min is not blocked (EQ-04 blocks only net < m_min)', () => {
    expect(codes(base({ plannedReadingMg: '16.40' }))).toEqual([]);
  });
});

describe('min_weight_unknown (warn)', () => {
  it('warns and gives the USP <41> 820 d floor (METROLOGY §7: 820 × 0.01 mg = 8.2 mg)', () => {
    const bal = { identifier: 'BAL-A1', status: 'in_service' as const, calibrationDueOn: '2026-09-30', readabilityMg: '0.01' };
    const g = find(base({ balance: bal }), 'min_weight_unknown')!;
    expect(g.severity).toBe('warn');
    expect(g.message).toBe('BAL-A1 has no recorded minimum weight, so the planned reading 25.00 mg cannot be checked against it');
    expect(g.action).toBe('Have the minimum weight of BAL-A1 determined (USP <41>: m_min = 2000 · s, with s at least 0.41 d, so at least 8.20 mg)');
    expect(codes(base({ balance: bal }))).toEqual(['min_weight_unknown']);
  });
  it('says when the reading is below even the 820 d floor (5.00 mg < 8.20 mg)', () => {
    const bal = { identifier: 'BAL-A1', status: 'in_service' as const, calibrationDueOn: '2026-09-30', readabilityMg: '0.01' };
    expect(find(base({ balance: bal, plannedReadingMg: '5.00' }), 'min_weight_unknown')!.message).toContain('it is below 8.20 mg (820 d)');
  });
  it('does not fire when m_min is recorded', () => {
    expect(codes(base())).not.toContain('min_weight_unknown');
  });
});

describe('balance status and calibration (REQUIREMENTS EQ-01, EQ-02)', () => {
  const other = { identifier: 'BAL-A2', status: 'in_service' as const, calibrationDueOn: '2026-12-01', minWeightMg: '16.4', readabilityMg: '0.01' };

  it('balance_out_of_service blocks and names a usable alternative', () => {
    const g = find(base({ balance: { ...base().balance, status: 'out_of_service' }, otherBalances: [other] }), 'balance_out_of_service')!;
    expect(g.severity).toBe('block');
    expect(g.message).toBe('BAL-A1 is out of service');
    expect(g.action).toBe('Do not weigh on BAL-A1; weigh on BAL-A2 (minimum weight 16.4 mg, reads to 0.01 mg)');
  });
  it('balance_out_of_service without alternatives asks for a suitable balance', () => {
    const g = find(base({ balance: { ...base().balance, status: 'out_of_service' } }), 'balance_out_of_service')!;
    expect(g.action).toBe('Do not weigh on BAL-A1; choose an in-service, calibrated balance whose minimum weight is at most 25.00 mg');
  });

  it('calibration due today is not overdue, but is due soon (common practice: usable through the due date)', () => {
    const input = base({ balance: { ...base().balance, calibrationDueOn: '2026-03-12' } });
    expect(codes(input)).toEqual(['calibration_due_soon']);
    expect(find(input, 'calibration_due_soon')!.message).toBe('Calibration of BAL-A1 is due on 2026-03-12 (today)');
  });
  it('calibration due yesterday is overdue and blocks (REQUIREMENTS EQ-02 test: due date yesterday -> refused)', () => {
    const g = find(base({ balance: { ...base().balance, calibrationDueOn: '2026-03-11' } }), 'calibration_overdue')!;
    expect(g.severity).toBe('block');
    expect(g.message).toBe('Calibration of BAL-A1 was due on 2026-03-11 (1 day ago)');
    expect(g.action).toBe('Do not weigh on BAL-A1 until it is recalibrated; choose a calibrated balance');
    expect(codes(base({ balance: { ...base().balance, calibrationDueOn: '2026-03-11' } }))).not.toContain('calibration_due_soon');
  });
  it('overdue across a month and year boundary counts calendar days (2025-12-31 -> 2026-03-12 = 71 days)', () => {
    expect(find(base({ balance: { ...base().balance, calibrationDueOn: '2025-12-31' } }), 'calibration_overdue')!.message).toContain('(71 days ago)');
  });
  it('calibration_due_soon warns within 14 days (inclusive) and not on day 15', () => {
    expect(CALIBRATION_DUE_SOON_DAYS).toBe(14);
    const in14 = find(base({ balance: { ...base().balance, calibrationDueOn: '2026-03-26' } }), 'calibration_due_soon')!;
    expect(in14.severity).toBe('warn');
    expect(in14.message).toBe('Calibration of BAL-A1 is due on 2026-03-26 (in 14 days)');
    expect(in14.action).toBe('BAL-A1 may be used up to and including 2026-03-26; book its calibration with the equipment custodian');
    expect(codes(base({ balance: { ...base().balance, calibrationDueOn: '2026-03-27' } }))).toEqual([]);
  });
  it('a balance with no due date is blocked (EQ-01: no due date, cannot be in service)', () => {
    const { calibrationDueOn: _omit, ...bal } = base().balance;
    const g = find(base({ balance: bal, otherBalances: [other] }), 'calibration_due_unknown')!;
    expect(g.severity).toBe('block');
    expect(g.action).toContain('or weigh on BAL-A2');
  });
  it('overdue suggests an alternative that is calibrated and whose m_min the reading meets', () => {
    const g = find(base({ balance: { ...base().balance, calibrationDueOn: '2026-01-01' }, otherBalances: [other] }), 'calibration_overdue')!;
    expect(g.action).toBe('Do not weigh on BAL-A1 until it is recalibrated; weigh on BAL-A2 (minimum weight 16.4 mg, reads to 0.01 mg)');
    expect(g.suggestion).toEqual({ balanceIdentifier: 'BAL-A2' });
  });
});

describe('reference material gates (REQUIREMENTS TR-03, TR-11, EX-04, TR-02)', () => {
  const mat = base().material;
  it('material_expired: expired yesterday blocks; expiring today does not', () => {
    const g = find(base({ material: { ...mat, expiresOn: '2026-03-11' } }), 'material_expired')!;
    expect(g.severity).toBe('block');
    expect(g.message).toBe('Reference material NaCl CRM lot 4711 expired on 2026-03-11 (1 day ago)');
    expect(g.action).toBe('Choose an unexpired lot; an expiry can only be extended with documented evidence and QA approval');
    expect(codes(base({ material: { ...mat, expiresOn: '2026-03-12' } }))).toEqual([]);
  });
  it('material_not_accepted: quarantined and retired block with different actions', () => {
    const q = find(base({ material: { ...mat, status: 'quarantined' } }), 'material_not_accepted')!;
    expect(q.severity).toBe('block');
    expect(q.message).toBe('Reference material NaCl CRM lot 4711 is quarantined, not accepted for use');
    expect(q.action).toBe('Complete the receipt check and acceptance of NaCl CRM lot 4711, or choose an accepted lot');
    const r = find(base({ material: { ...mat, status: 'retired' } }), 'material_not_accepted')!;
    expect(r.action).toBe('NaCl CRM lot 4711 is retired and cannot be used; choose an accepted lot');
  });
  it('purity_missing blocks when absent, blank or not a positive number', () => {
    for (const purityValue of [undefined, '', '  ', 'abc', '0']) {
      const g = find(base({ material: { ...mat, purityValue } }), 'purity_missing');
      expect(g?.severity, String(purityValue)).toBe('block');
    }
    expect(find(base({ material: { ...mat, purityValue: undefined } }), 'purity_missing')!.action).toBe(
      'Enter the purity (certified value) from the certificate of NaCl CRM lot 4711',
    );
  });
  it('material_expiry_unknown warns (TR-02: validity is a mandatory certificate field)', () => {
    const { expiresOn: _omit, ...noExpiry } = mat;
    const g = find(base({ material: noExpiry }), 'material_expiry_unknown')!;
    expect(g.severity).toBe('warn');
  });
});

describe('several gates together and bad input', () => {
  it('returns all that fire, in GATE_CODES order', () => {
    const got = codes(
      base({
        plannedReadingMg: '9.6',
        balance: { identifier: 'BAL-A1', status: 'out_of_service', calibrationDueOn: '2026-03-01', minWeightMg: '16.4', readabilityMg: '0.01' },
        material: { name: 'X', status: 'quarantined', expiresOn: '2026-01-01' },
      }),
    );
    expect(got).toEqual(['balance_out_of_service', 'calibration_overdue', 'below_min_weight', 'material_not_accepted', 'material_expired', 'purity_missing']);
    expect(got).toEqual(GATE_CODES.filter((c) => got.includes(c)));
  });
  it('throws CalcError on an invalid date or a non-positive reading', () => {
    expect(() => evaluateGates(base({ today: '2026-02-30' }))).toThrow(CalcError);
    expect(() => evaluateGates(base({ plannedReadingMg: '0' }))).toThrow(CalcError);
    expect(() => evaluateGates(base({ volumeMl: 'ten' }))).toThrow(CalcError);
  });
});
