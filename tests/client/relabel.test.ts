// The relabel prompt after an expiry extension (issue 16 §5; src/features/expiry/relabel.ts): the print page is
// opened with the old and new dates, and the reprint reason is pre-filled from them; anything else pre-fills nothing.
import { describe, expect, it } from 'vitest';
import { relabelHref, relabelReason, relabelReasonFromQuery } from '../../src/features/expiry/relabel.ts';

describe('relabel after an expiry extension', () => {
  it('links to the print page with both dates, and the print page pre-fills the reason from them', () => {
    const href = relabelHref('HWL-2026-0001', '2026-12-13', '2027-01-10');
    expect(href).toBe('/preparations/HWL-2026-0001/print?relabel=2026-12-13..2027-01-10');
    const reason = relabelReasonFromQuery(href.slice(href.indexOf('?')));
    expect(reason).toBe(relabelReason('2026-12-13', '2027-01-10'));
    expect(reason).toBe('Relabel after expiry extension: labels printed before show the expiry 2026-12-13; the expiry is now 2027-01-10');
  });

  it('pre-fills nothing without a well-formed request', () => {
    expect(relabelReasonFromQuery('')).toBe('');
    expect(relabelReasonFromQuery('?relabel=<script>')).toBe('');
    expect(relabelReasonFromQuery('?relabel=2026-12-13')).toBe('');
  });
});
