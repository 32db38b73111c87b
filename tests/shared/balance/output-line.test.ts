// Balance output lines → value as shown, unit, stability, sign; the raw line is kept. The line shapes are those
// laboratory balances print over RS-232/USB in common practice (stated from memory; no standard governs them).
// Each row says what it checks.
import { describe, expect, it } from 'vitest';
import { parseBalanceLine, parsePrintout, sameBalanceId, type LineShapeSetting } from '../../../shared/balance/output-line.ts';

type Row = [line: string, shape: LineShapeSetting, expected: Record<string, unknown>, note: string];

const READINGS: Row[] = [
  ['S S     12.3456 g\r\n', 'auto', { value: '12.3456', unit: 'g', stability: 'stable', sign: '+', shape: 'status_pair' }, 'status pair, stable (common practice)'],
  ['S D     12.3457 g', 'auto', { value: '12.3457', stability: 'unstable' }, 'status pair, dynamic = unstable'],
  ['S S    -0.0012 g', 'status_pair', { value: '-0.0012', sign: '-' }, 'negative reading after a tare'],
  ['SI S   8.0 mg', 'auto', { value: '8.0', unit: 'mg' }, 'two-letter echo; "8.0" keeps its zero'],
  ['ST,GS,+00012.3456  g', 'auto', { value: '12.3456', stability: 'stable', weighing: 'gross', shape: 'header_csv' }, 'header csv, zero padding removed, digits kept'],
  ['US,NT,-00000.0040  g', 'header_csv', { value: '-0.0040', stability: 'unstable', weighing: 'net', sign: '-' }, 'header csv, unstable net, trailing zero kept'],
  ['+   12.3456 g', 'auto', { value: '12.3456', stability: 'stable', shape: 'plain' }, 'plain with sign'],
  ['N    -0.0012 g', 'plain', { value: '-0.0012', weighing: 'net' }, 'plain net'],
  ['G     150.20 g', 'plain', { value: '150.20', weighing: 'gross' }, 'plain gross, two decimals kept'],
  ['   12.3456 g ?', 'plain', { value: '12.3456', stability: 'unstable' }, 'plain, "?" after the unit = unstable'],
  ['?  12.3456 g', 'plain', { value: '12.3456', stability: 'unstable' }, 'plain, "?" before the value = unstable'],
  ['     0,4531 g', 'plain', { value: '0.4531' }, 'decimal comma (occurs in practice) read as a point, digits kept'],
  ['     1.234567 kg', 'auto', { value: '1.234567', unit: 'kg' }, 'kilograms'],
  ['-0.0000 g', 'auto', { value: '0.0000', sign: '-' }, 'negative zero is zero, digits kept'],
  ['\u000212.3456 g\u0003', 'auto', { value: '12.3456' }, 'framing characters STX/ETX stripped'],
];

const FAULTS: Row[] = [
  ['S +', 'auto', { kind: 'overload' }, 'status pair overload'],
  ['S -', 'auto', { kind: 'underload' }, 'status pair underload'],
  ['S I', 'auto', { kind: 'busy' }, 'status pair busy'],
  ['OL,GS,+9999999  g', 'auto', { kind: 'overload' }, 'header csv overload'],
  ['---OL---', 'auto', { kind: 'overload' }, 'plain overload banner'],
  ['- OL', 'auto', { kind: 'underload' }, 'plain, minus before OL = underload'],
  ['12.3456 ct', 'auto', { kind: 'not_a_reading' }, 'a unit we do not record (carat)'],
  ['12.3456', 'auto', { kind: 'not_a_reading' }, 'no unit'],
  ['hello balance', 'auto', { kind: 'not_a_reading' }, 'garbage'],
  ['', 'auto', { kind: 'not_a_reading' }, 'empty'],
  ['1.2.3 g', 'auto', { kind: 'not_a_reading' }, 'two points'],
  ['1e-3 g', 'auto', { kind: 'not_a_reading' }, 'exponent: no balance prints it'],
  ['ST,GS,+00012.3456  g', 'status_pair', { kind: 'not_a_reading' }, 'a line in another shape than the balance is set to'],
];

describe('parseBalanceLine', () => {
  it.each(READINGS)('when the balance sends %j (%s), then the reading is read as shown', (line, shape, expected) => {
    const parsed = parseBalanceLine(line, shape);
    expect(parsed).toMatchObject({ kind: 'reading', ...expected });
    expect(parsed.raw).toBe(line); // the raw line is kept as received
  });

  it.each(FAULTS)('when the balance sends %j (%s), then no reading is taken', (line, shape, expected) => {
    const parsed = parseBalanceLine(line, shape);
    expect(parsed).toMatchObject(expected);
    expect(parsed.kind === 'reading').toBe(false);
    if (parsed.kind !== 'reading') expect(parsed.message.length).toBeGreaterThan(10);
  });
});

describe('parsePrintout', () => {
  it('when a print has identifier, date, time and a reading, then each is found', () => {
    const raw = '--------------------\r\n2026-12-05\r\n11:53:10\r\nBal ID BAL-A1\r\nS S      0.1602 g\r\n--------------------\r\n';
    const p = parsePrintout(raw);
    expect(p.reading).toMatchObject({ kind: 'reading', value: '0.1602', unit: 'g', stability: 'stable' });
    expect(p.balanceId).toBe('BAL-A1');
    expect(p.printedAt).toBe('2026-12-05 11:53:10');
    expect(p.raw).toBe(raw);
  });

  it('when a print states a serial number, then it is the identity', () => {
    expect(parsePrintout('S/N 1128347\n+  4.5301 g\n').balanceId).toBe('1128347');
    expect(parsePrintout('Serial No. 88-2201\nST,GS,+0004.5301  g\n').balanceId).toBe('88-2201');
  });

  it('when a print holds two readings, then none is taken', () => {
    expect(parsePrintout('S S 1.0000 g\nS S 2.0000 g\n').reading.kind).toBe('not_a_reading');
  });

  it('when a print holds only an overload, then the overload is reported', () => {
    expect(parsePrintout('ID: BAL-A1\nS +\n').reading.kind).toBe('overload');
  });

  it('identities compare without case, spaces or dashes', () => {
    expect(sameBalanceId('BAL-A1', 'bal a1')).toBe(true);
    expect(sameBalanceId('BAL-A1', 'BAL-A2')).toBe(false);
  });
});
