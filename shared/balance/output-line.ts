/**
 * Balance output: one parser for the lines a balance sends when its Print key is pressed or the app asks for a
 * reading (keyboard-output adapters, serial ports, the bench bridge). It turns a line into the value as shown
 * (a decimal string with the displayed digits: "8.0" stays "8.0"), the unit, the stability and the sign, and
 * always keeps the raw line. Nothing here rounds or converts: the caller stores the value as parsed.
 *
 * Line shapes (names of our own; every balance record says which one it prints, `auto` tries them in order):
 * - `status_pair`  "S S     12.3456 g" / "S D     12.3457 g": a command echo letter, then S (stable) or
 *                  D (dynamic, unstable); "S +" / "S -" overload / underload, "S I" busy.
 * - `header_csv`   "ST,GS,+00012.3456  g": stability (ST stable, US unstable, OL overload), the weighing kind
 *                  (GS gross, NT net, TR tare), then the signed value and unit.
 * - `plain`        "+   12.3456 g", "N    -0.0012 g", "   12.3456 g ?": an optional gross/net letter (G, N),
 *                  a sign, the value and unit; a "?" before the value or after the unit marks it unstable.
 * A multi-line print (parsePrintout) may add date, time and identifier lines around the reading line; the
 * identifier (the balance's own ID or serial number) is returned for comparison with the chosen balance.
 * Sources: these are the line shapes in common practice for laboratory balances' RS-232/USB print output (stated
 * from memory: no single standard governs them); the decimal point may be "." or "," (both occur in practice).
 */

export type LineShape = 'status_pair' | 'header_csv' | 'plain';
export const LINE_SHAPES = ['auto', 'status_pair', 'header_csv', 'plain'] as const;
export type LineShapeSetting = (typeof LINE_SHAPES)[number];

export type BalanceUnit = 'g' | 'mg' | 'kg';
export type Stability = 'stable' | 'unstable';

export interface ParsedReading {
  kind: 'reading';
  /** The value as shown, sign applied, leading zero padding removed: "+00012.3456" -> "12.3456", "-0.0012". */
  value: string;
  unit: BalanceUnit;
  stability: Stability;
  sign: '+' | '-';
  /** Gross or net, when the line says so. */
  weighing: 'gross' | 'net' | 'tare' | null;
  shape: LineShape;
  raw: string;
}

export interface ParsedFault {
  kind: 'overload' | 'underload' | 'busy' | 'not_a_reading';
  message: string;
  raw: string;
}

export type ParsedLine = ParsedReading | ParsedFault;

const UNITS: Record<string, BalanceUnit> = { g: 'g', mg: 'mg', kg: 'kg' };
/** A signed decimal as balances print it: sign, optional spaces, digits with "." or "," (no exponent). */
const NUMBER = String.raw`([+-]?)\s*(\d+(?:[.,]\d+)?|[.,]\d+)`;
/** The same with a decimal point only, where commas separate the fields. */
const NUMBER_POINT = String.raw`([+-]?)\s*(\d+(?:\.\d+)?|\.\d+)`;
const UNIT = String.raw`([a-zA-Zµ]+)`;

const fault = (kind: ParsedFault['kind'], raw: string, message: string): ParsedFault => ({ kind, message, raw });

/** "+00012.3456" -> "12.3456"; "-,5" -> "-0.5"; keeps every decimal digit as sent. */
function shownValue(sign: string, digits: string): { value: string; sign: '+' | '-' } {
  let d = digits.replace(',', '.');
  if (d.startsWith('.')) d = `0${d}`;
  const [int, frac] = d.split('.') as [string, string | undefined];
  const trimmed = int.replace(/^0+(?=\d)/, '');
  const body = frac === undefined ? trimmed : `${trimmed}.${frac}`;
  const negative = sign === '-' && /[1-9]/.test(body);
  return { value: negative ? `-${body}` : body, sign: sign === '-' ? '-' : '+' };
}

function reading(raw: string, shape: LineShape, sign: string, digits: string, unitText: string, stability: Stability, weighing: ParsedReading['weighing']): ParsedLine {
  const unit = UNITS[unitText];
  if (!unit) return fault('not_a_reading', raw, `The balance sent the unit "${unitText}": set the balance to g, mg or kg.`);
  return { kind: 'reading', ...shownValue(sign, digits), unit, stability, weighing, shape, raw };
}

function parseStatusPair(raw: string, line: string): ParsedLine | null {
  const m = /^([A-Z]{1,2})\s+([SDI+-])(?:\s+(.*))?$/.exec(line);
  if (!m) return null;
  const [, , status, rest = ''] = m;
  if (status === '+') return fault('overload', raw, 'The balance reports an overload: the load is above its capacity.');
  if (status === '-') return fault('underload', raw, 'The balance reports an underload: check the pan and tare.');
  if (status === 'I') return fault('busy', raw, 'The balance is busy and sent no reading: press Print again.');
  const v = new RegExp(`^${NUMBER}\\s*${UNIT}$`).exec(rest.trim());
  if (!v) return null;
  return reading(raw, 'status_pair', v[1]!, v[2]!, v[3]!, status === 'S' ? 'stable' : 'unstable', null);
}

function parseHeaderCsv(raw: string, line: string): ParsedLine | null {
  const m = /^(ST|US|OL)\s*,\s*(GS|NT|TR)\s*,\s*(.*)$/.exec(line);
  if (!m) return null;
  const [, status, kind, rest = ''] = m;
  const weighing = kind === 'GS' ? 'gross' : kind === 'NT' ? 'net' : 'tare';
  if (status === 'OL') return fault(rest.trim().startsWith('-') ? 'underload' : 'overload', raw, rest.trim().startsWith('-') ? 'The balance reports an underload: check the pan and tare.' : 'The balance reports an overload: the load is above its capacity.');
  const v = new RegExp(`^${NUMBER_POINT}\\s*${UNIT}$`).exec(rest.trim());
  if (!v) return null;
  return reading(raw, 'header_csv', v[1]!, v[2]!, v[3]!, status === 'ST' ? 'stable' : 'unstable', weighing);
}

function parsePlain(raw: string, line: string): ParsedLine | null {
  if (/^[-+]?\s*(?:-{2,}\s*)?(?:OL|OVER|O-L|Err\w*)\s*(?:-{2,})?$/i.test(line) || /^[HL]$/.test(line)) {
    const under = /^-(?!-)/.test(line) || line === 'L';
    return fault(under ? 'underload' : 'overload', raw, 'The balance shows an overload or an error instead of a reading.');
  }
  const m = new RegExp(`^([GN]\\s+)?(\\?\\s*)?${NUMBER}\\s*${UNIT}\\s*(\\?)?$`).exec(line);
  if (!m) return null;
  const weighing = m[1]?.trim() === 'G' ? 'gross' : m[1]?.trim() === 'N' ? 'net' : null;
  const unstable = Boolean(m[2] || m[6]);
  return reading(raw, 'plain', m[3]!, m[4]!, m[5]!, unstable ? 'unstable' : 'stable', weighing);
}

const PARSERS: Record<LineShape, (raw: string, line: string) => ParsedLine | null> = {
  status_pair: parseStatusPair,
  header_csv: parseHeaderCsv,
  plain: parsePlain,
};

/** One output line (without or with its line ending) in the given shape, or in the first shape that fits. */
export function parseBalanceLine(raw: string, shape: LineShapeSetting = 'auto'): ParsedLine {
  const line = raw.replace(/[\r\n\u0002\u0003]+/g, '').trim();
  if (line === '') return fault('not_a_reading', raw, 'The balance sent an empty line.');
  const order: LineShape[] = shape === 'auto' ? ['status_pair', 'header_csv', 'plain'] : [shape];
  for (const s of order) {
    const parsed = PARSERS[s](raw, line);
    if (parsed) return parsed;
  }
  return fault('not_a_reading', raw, shape === 'auto' ? 'This line is not a reading the app recognises.' : `This line is not a reading in the balance's set line shape (${shape}).`);
}

export interface ParsedPrintout {
  /** The reading line of the print; a fault when no line is a reading. */
  reading: ParsedLine;
  /** The balance's identifier or serial number, when a line states it. */
  balanceId: string | null;
  /** Date and time lines as printed (the balance's clock; informative, the server stamps its own time). */
  printedAt: string | null;
  raw: string;
}

const ID_LINE = /^(?:bal(?:ance)?\s*)?(?:id|ident|s\/?n|serial(?:\s*no\.?)?)\s*[:#.]?\s*([A-Za-z0-9][A-Za-z0-9._/-]{0,39})$/i;
const DATE_TIME = /^(\d{4}-\d{2}-\d{2}|\d{1,2}[./]\d{1,2}[./]\d{2,4})?\s*(\d{1,2}:\d{2}(?::\d{2})?)?$/;

/** A multi-line print: identifier, date/time and one reading line, in any order; blank and dashed lines ignored. */
export function parsePrintout(raw: string, shape: LineShapeSetting = 'auto'): ParsedPrintout {
  const lines = raw.split(/\r\n|\r|\n/).map((l) => l.replace(/[\u0002\u0003]/g, '').trim()).filter((l) => l !== '' && !/^[-=_*]{3,}$/.test(l));
  let balanceId: string | null = null;
  const when: string[] = [];
  let found: ParsedLine | null = null;
  let firstFault: ParsedLine | null = null;
  for (const line of lines) {
    const id = ID_LINE.exec(line);
    if (id) {
      balanceId ??= id[1]!;
      continue;
    }
    const dt = DATE_TIME.exec(line);
    if (dt && (dt[1] || dt[2])) {
      when.push(line);
      continue;
    }
    const parsed = parseBalanceLine(line, shape);
    if (parsed.kind === 'reading') {
      if (found) return { reading: fault('not_a_reading', raw, 'The print holds more than one reading: print one reading at a time.'), balanceId, printedAt: when.join(' ') || null, raw };
      found = parsed;
    } else if (parsed.kind !== 'not_a_reading' || !firstFault) {
      firstFault ??= parsed;
    }
  }
  return {
    reading: found ?? firstFault ?? fault('not_a_reading', raw, 'The print holds no reading.'),
    balanceId,
    printedAt: when.join(' ') || null,
    raw,
  };
}

/** Same identity, ignoring case, spaces and dashes ("BAL-A1" = "bal a1"). */
export function sameBalanceId(a: string, b: string): boolean {
  const norm = (s: string) => s.toLowerCase().replace(/[\s_-]+/g, '');
  return norm(a) === norm(b);
}
