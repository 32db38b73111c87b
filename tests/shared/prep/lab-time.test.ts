// One date convention (issue 16 §4 Wording): ISO dates and 24 h times in the lab's zone, the zone stated once, lab
// days for filters. Expected offsets follow the EU and US daylight-saving rules of the IANA time zone database
// (EU: last Sunday of March and October at 01:00 UTC; US: second Sunday of March, first Sunday of November at 02:00
// local), cited from memory.
import { describe, expect, it } from 'vitest';
import { labDate, labDateTime, labDayStart, labTime, utcOffset, zoneNote } from '../../../shared/prep/lab-time.ts';

describe('lab time', () => {
  it('dates YYYY-MM-DD and times HH:mm (24 h) on the lab’s clock, not the server’s', () => {
    expect(labDateTime('2026-07-01T12:34:56Z', 'Europe/London')).toBe('2026-07-01 13:34'); // BST, UTC+1
    expect(labDateTime('2026-12-05T23:30:00Z', 'Europe/Berlin')).toBe('2026-12-06 00:30'); // the next lab day
    expect(labDate('2026-12-05T23:30:00Z', 'Europe/Berlin')).toBe('2026-12-06');
    expect(labTime('2026-01-10T17:05:00Z', 'America/New_York')).toBe('12:05');
    expect(labDateTime('2026-01-10T00:00:09Z', 'UTC', { seconds: true })).toBe('2026-01-10 00:00:09');
    expect(labDate('not a time', 'UTC')).toBe('not a time');
  });

  it('the zone is stated with its abbreviation and offset on the day', () => {
    expect(utcOffset('Europe/London', '2026-01-15T12:00:00Z')).toBe('UTC+00:00');
    expect(utcOffset('Europe/London', '2026-07-15T12:00:00Z')).toBe('UTC+01:00');
    expect(zoneNote('Europe/London', '2026-01-15T12:00:00Z')).toBe('Dates YYYY-MM-DD, times 24 h, in Europe/London (GMT, UTC+00:00)');
  });

  it('a lab day starts at 00:00 on the lab’s clock, across daylight-saving changes', () => {
    expect(labDayStart('2026-03-29', 'Europe/London')).toBe('2026-03-29T00:00:00.000Z'); // BST begins at 01:00 UTC that day
    expect(labDayStart('2026-03-30', 'Europe/London')).toBe('2026-03-29T23:00:00.000Z');
    expect(labDayStart('2026-12-05', 'Europe/Berlin')).toBe('2026-12-04T23:00:00.000Z');
    expect(labDayStart('2026-11-01', 'America/New_York')).toBe('2026-11-01T04:00:00.000Z'); // still EDT at midnight
    expect(labDayStart('2026-11-02', 'America/New_York')).toBe('2026-11-02T05:00:00.000Z');
    expect(() => labDayStart('2026-13-01x', 'UTC')).toThrow(RangeError);
  });
});
