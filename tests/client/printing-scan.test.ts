/**
 * Client helpers of printing and scanning: the scanner-speed keystroke buffer, the identifier found in a
 * scan, and the label-template form mapped onto the shared API schema (errors land on their fields).
 */
import { describe, expect, it } from 'vitest';
import { ScanBuffer, SCAN_GAP_MS } from '../../src/features/scan/scan-buffer.ts';
import { cleanScan, preparationIdentifierIn, seriesIdentifierIn } from '../../src/features/scan/resolve-scan.ts';
import { EMPTY_TEMPLATE, formFieldFor, parseTemplateForm, templateToForm, type TemplateFormValues } from '../../src/features/printing/template-form.ts';
import { pagesFor, templateLayout } from '../../src/features/printing/format.ts';

describe('ScanBuffer', () => {
  const typeAt = (b: ScanBuffer, text: string, start: number, gap: number) => {
    let t = start;
    for (const ch of text) {
      b.push(ch, t);
      t += gap;
    }
    return t - gap;
  };

  it('when keys arrive a few ms apart and end with Enter, then the code is returned', () => {
    const b = new ScanBuffer();
    const last = typeAt(b, 'HWL-2026-0042', 1000, 8); // keyboard-wedge scanners: ~2–15 ms per character (common practice)
    expect(b.enter(last + 8)).toBe('HWL-2026-0042');
    expect(b.enter(last + 20)).toBeNull(); // consumed
  });

  it('when a person types (gaps over 50 ms), then Enter returns nothing', () => {
    const b = new ScanBuffer();
    const last = typeAt(b, 'HWL-2026-0042', 1000, 120);
    expect(b.enter(last + 30)).toBeNull();
  });

  it('when a pause splits the keys, then only the fast run after the pause counts', () => {
    const b = new ScanBuffer();
    b.push('x', 0);
    const last = typeAt(b, 'BAL-A1', 500, 5);
    expect(b.enter(last + 5)).toBe('BAL-A1');
  });

  it('when Enter comes long after the last key, or fewer than 3 keys arrived, then nothing is returned', () => {
    const b = new ScanBuffer();
    const last = typeAt(b, 'VF-100-01', 0, 5);
    expect(b.enter(last + SCAN_GAP_MS + 1)).toBeNull();
    typeAt(b, 'ab', 1000, 5);
    expect(b.enter(1010)).toBeNull();
  });

  it('reports itself active only while keys arrive at scanner speed', () => {
    const b = new ScanBuffer();
    expect(b.active(0)).toBe(false);
    b.push('H', 100);
    expect(b.active(120)).toBe(true);
    expect(b.active(100 + SCAN_GAP_MS + 1)).toBe(false);
  });
});

describe('preparationIdentifierIn', () => {
  it('reads a bare identifier in any case, with scanner control characters removed', () => {
    expect(preparationIdentifierIn('hwl-2026-0042')).toBe('HWL-2026-0042');
    expect(preparationIdentifierIn('\u001dHWL-2026-0042\r')).toBe('HWL-2026-0042');
    expect(cleanScan('  BAL-A1\n')).toBe('BAL-A1');
  });

  it('reads the identifier from a record link (QR code on the prep sheet)', () => {
    expect(preparationIdentifierIn('http://127.0.0.1:3000/preparations/HWL-2026-0007')).toBe('HWL-2026-0007');
    expect(preparationIdentifierIn('https://lab.example/preparations/HWL-2026-10001?x=1')).toBe('HWL-2026-10001');
  });

  it('returns null for inventory codes and malformed identifiers', () => {
    expect(preparationIdentifierIn('BAL-A1')).toBeNull();
    expect(preparationIdentifierIn('VF-100-01')).toBeNull();
    expect(preparationIdentifierIn('HWL-26-0042')).toBeNull();
    expect(preparationIdentifierIn('HWL-2026-042')).toBeNull();
  });
});

describe('label template form', () => {
  const sheet: TemplateFormValues = {
    ...EMPTY_TEMPLATE,
    name: 'Vial 2 mL',
    widthMm: '38.1',
    heightMm: '21.2',
    rows: '13',
    columns: '5',
    marginTopMm: '10.7',
    marginLeftMm: '4.7',
    gapXMm: '2.5',
    gapYMm: '0',
  };

  it('maps a sheet that fits A4 onto the API body with whole-number rows and columns', () => {
    // 4.7 + 5 × 38.1 + 4 × 2.5 = 205.2 mm ≤ 210 mm; 10.7 + 13 × 21.2 = 286.3 mm ≤ 297 mm (ISO 216 A4; arithmetic)
    const r = parseTemplateForm(sheet);
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.input.layout).toEqual({ kind: 'sheet', pageSize: 'A4', rows: 13, columns: 5, marginTopMm: '10.7', marginLeftMm: '4.7', gapXMm: '2.5', gapYMm: '0' });
      expect(r.input.widthMm).toBe('38.1'); // decimal strings kept as typed
    }
  });

  it('puts the "does not fit the page" message on the columns field', () => {
    // 4.7 + 6 × 38.1 + 5 × 2.5 = 245.8 mm > 210 mm (arithmetic)
    const r = parseTemplateForm({ ...sheet, columns: '6' });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.columns).toMatch(/245\.8 mm .*210 mm/);
  });

  it('puts messages on their fields for a missing width, a fractional row count and an empty name', () => {
    const r = parseTemplateForm({ ...sheet, name: ' ', widthMm: '', rows: '2.5' });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(Object.keys(r.errors).sort()).toEqual(['name', 'rows', 'widthMm']);
      expect(r.errors.rows).toMatch(/whole number/);
    }
  });

  it('ignores the sheet fields for a roll layout', () => {
    const r = parseTemplateForm({ ...sheet, kind: 'roll', rows: '', columns: 'x' });
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.input.layout).toEqual({ kind: 'roll' });
  });

  it('maps server field paths to form fields', () => {
    expect(formFieldFor('layout.rows')).toBe('rows');
    expect(formFieldFor('layout')).toBe('kind');
    expect(formFieldFor('widthMm')).toBe('widthMm');
    expect(formFieldFor('nonsense')).toBeNull();
  });

  it('round-trips a stored template through the form', () => {
    const stored = {
      id: 1,
      name: 'Roll 50 × 25',
      widthMm: '50',
      heightMm: '25',
      layout: { kind: 'roll' as const },
      content: 'small' as const,
      active: true,
      labelsPerPage: 1,
      createdAt: '2026-11-01T00:00:00.000Z',
      updatedAt: '2026-11-01T00:00:00.000Z',
    };
    const r = parseTemplateForm(templateToForm(stored));
    expect(r.ok && r.input).toMatchObject({ name: 'Roll 50 × 25', widthMm: '50', heightMm: '25', layout: { kind: 'roll' }, content: 'small' });
    expect(templateLayout(stored)).toBe('roll, one label per page');
    expect(pagesFor({ labelsPerPage: 65 }, 130)).toBe(2); // 130 / 65 (arithmetic)
    expect(pagesFor({ labelsPerPage: 65 }, 131)).toBe(3);
  });
});

describe('seriesIdentifierIn', () => {
  it('when the series sheet QR code (the identifier) or a series link is scanned, then the series identifier is found', () => {
    expect(seriesIdentifierIn('HWL-2026-S001')).toBe('HWL-2026-S001');
    expect(seriesIdentifierIn(' hwl-2026-s012\r')).toBe('HWL-2026-S012'); // lower case, trailing CR from a scanner
    expect(seriesIdentifierIn('https://lab.example/series/HWL-2026-S003?x=1')).toBe('HWL-2026-S003');
  });

  it('when a preparation or inventory code is scanned, then it is not a series', () => {
    expect(seriesIdentifierIn('HWL-2026-0001')).toBeNull();
    expect(seriesIdentifierIn('BAL-A1')).toBeNull();
    expect(seriesIdentifierIn('HWL-26-S001')).toBeNull();
    expect(preparationIdentifierIn('HWL-2026-S001')).toBeNull(); // and a series is not taken for a preparation
  });
});
