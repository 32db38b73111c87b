/**
 * One date convention for every screen, list, filter, PDF and export (issue 16 §4 Wording): ISO 8601 dates
 * "YYYY-MM-DD" and 24-hour times "HH:mm" in the laboratory's time zone (settings.timeZone); the zone is stated
 * once per page or sheet (`zoneNote`), not beside every time. Lab days (a date filter's from/to, "today", expiry)
 * are calendar days in that zone: `labDayStart` gives the instant a lab day begins.
 *
 * Intl formatters are costly to build and hold no state: one per zone and shape, kept for the life of the process.
 */

const formats = new Map<string, Intl.DateTimeFormat>();
function format(timeZone: string, shape: 'parts' | 'zone' | 'offset'): Intl.DateTimeFormat {
  const key = `${shape}|${timeZone}`;
  let f = formats.get(key);
  if (!f) {
    f =
      shape === 'parts'
        ? new Intl.DateTimeFormat('en-GB', { timeZone, hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit' })
        : new Intl.DateTimeFormat('en-GB', { timeZone, timeZoneName: shape === 'zone' ? 'short' : 'longOffset' });
    if (formats.size > 200) formats.clear();
    formats.set(key, f);
  }
  return f;
}

const toDate = (at: Date | string | number): Date => (at instanceof Date ? at : new Date(at));

/** The parts of an instant on the lab's clock; null for an invalid instant or zone. */
function partsOf(at: Date | string | number, timeZone: string): Record<'year' | 'month' | 'day' | 'hour' | 'minute' | 'second', string> | null {
  const d = toDate(at);
  if (Number.isNaN(d.getTime())) return null;
  let p: Intl.DateTimeFormatPart[];
  try {
    p = format(timeZone, 'parts').formatToParts(d);
  } catch {
    return null;
  }
  const get = (t: string) => p.find((x) => x.type === t)?.value ?? '00';
  return { year: get('year'), month: get('month'), day: get('day'), hour: get('hour') === '24' ? '00' : get('hour'), minute: get('minute'), second: get('second') };
}

/** "YYYY-MM-DD": the lab's calendar date of an instant. An invalid instant is returned as given. */
export function labDate(at: Date | string | number, timeZone: string): string {
  const p = partsOf(at, timeZone);
  return p ? `${p.year}-${p.month}-${p.day}` : String(at);
}

/** "HH:mm" (24 h) on the lab's clock. */
export function labTime(at: Date | string | number, timeZone: string): string {
  const p = partsOf(at, timeZone);
  return p ? `${p.hour}:${p.minute}` : String(at);
}

/** "YYYY-MM-DD HH:mm" on the lab's clock; `seconds` adds ":ss" (audit entries). */
export function labDateTime(at: Date | string | number, timeZone: string, opts: { seconds?: boolean } = {}): string {
  const p = partsOf(at, timeZone);
  return p ? `${p.year}-${p.month}-${p.day} ${p.hour}:${p.minute}${opts.seconds ? `:${p.second}` : ''}` : String(at);
}

/** "UTC+01:00" on a given instant (the offset changes with daylight saving time). */
export function utcOffset(timeZone: string, at: Date | string | number = new Date()): string {
  try {
    const v = format(timeZone, 'offset').formatToParts(toDate(at)).find((x) => x.type === 'timeZoneName')?.value ?? 'GMT';
    return v === 'GMT' ? 'UTC+00:00' : v.replace('GMT', 'UTC');
  } catch {
    return 'UTC+00:00';
  }
}

/** The zone's short name on an instant ("GMT", "BST", "CET"; some zones have only an offset such as "GMT+1"). */
export function zoneAbbreviation(timeZone: string, at: Date | string | number = new Date()): string {
  try {
    return format(timeZone, 'zone').formatToParts(toDate(at)).find((x) => x.type === 'timeZoneName')?.value ?? timeZone;
  } catch {
    return timeZone;
  }
}

/** The sentence that states the zone once per page or sheet: "Dates YYYY-MM-DD, times 24 h, in Europe/London (GMT, UTC+00:00)". */
export function zoneNote(timeZone: string, at: Date | string | number = new Date()): string {
  return `Dates YYYY-MM-DD, times 24 h, in ${timeZone} (${zoneAbbreviation(timeZone, at)}, ${utcOffset(timeZone, at)})`;
}

/**
 * The instant a lab day begins (00:00 on the lab's clock), as an ISO string in UTC. A day filter from A to B covers
 * [labDayStart(A), labDayStart(B + 1 day)). Found by correcting a UTC guess with the zone's offset twice, so a
 * daylight-saving change on that day is met.
 */
export function labDayStart(day: string, timeZone: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(day);
  if (!m) throw new RangeError(`"${day}" is not a date written YYYY-MM-DD`);
  const wall = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
  let t = wall;
  for (let i = 0; i < 2; i++) {
    const p = partsOf(t, timeZone);
    if (!p) return new Date(wall).toISOString();
    const shown = Date.UTC(Number(p.year), Number(p.month) - 1, Number(p.day), Number(p.hour), Number(p.minute), Number(p.second));
    t += wall - shown;
  }
  return new Date(t).toISOString();
}
