/**
 * The demo lab's dates move with the calendar. The scenario is written as of DEMO_BASE_DAY (its "today");
 * seeding on a later day shifts every demo date and time by the same whole number of days, so the demo stays
 * what it was written to be: a verified Pb stock a few weeks from its expiry, one balance overdue for
 * calibration, one lot already expired, and so on. Seeding on or before the base day shifts nothing.
 * Tests that check a seeded date compute it with demoDay()/demoInstant() on the same clock.
 */
export const DEMO_BASE_DAY = '2026-12-01';

const DAY_MS = 86_400_000;
const DAY_RE = /^\d{4}-\d{2}-\d{2}$/;
const INSTANT_RE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?Z$/;

/** Whole UTC days from the base day to `now` (never negative). */
export function demoShiftDays(now: Date = new Date()): number {
  const days = Math.floor((now.getTime() - Date.parse(`${DEMO_BASE_DAY}T00:00:00Z`)) / DAY_MS);
  return Math.max(0, days);
}

/** A scenario day (YYYY-MM-DD) as seeded on `now`. */
export function demoDay(day: string, now: Date = new Date()): string {
  if (!DAY_RE.test(day)) throw new Error(`not a day: ${day}`);
  return new Date(Date.parse(`${day}T00:00:00Z`) + demoShiftDays(now) * DAY_MS).toISOString().slice(0, 10);
}

/** A scenario instant (ISO 8601 in UTC, "Z") as seeded on `now`, in the same ISO form with milliseconds. */
export function demoInstant(iso: string, now: Date = new Date()): string {
  if (!INSTANT_RE.test(iso)) throw new Error(`not a UTC instant: ${iso}`);
  return new Date(Date.parse(iso) + demoShiftDays(now) * DAY_MS).toISOString();
}

/** A copy of a demo record with every day-shaped or instant-shaped string field shifted (other fields as they are). */
export function shiftDemoRecord<T extends object>(record: T, now: Date = new Date()): T {
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(record)) {
    if (typeof v === 'string' && DAY_RE.test(v)) out[k] = demoDay(v, now);
    else if (typeof v === 'string' && INSTANT_RE.test(v)) out[k] = demoInstant(v, now);
    else out[k] = v;
  }
  return out as T;
}
