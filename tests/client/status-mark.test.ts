/** The status badge: our own mark (two signature slots) beside the word, distinct in shape for each status. */
import { createElement } from 'react';
import { renderToString } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { StatusBadge, StatusMark } from '../../src/features/signatures/components/status-badge.tsx';

const filledSlots = (html: string) => (html.match(/fill="currentColor"/g) ?? []).length;

describe('status mark', () => {
  it('fills one slot per signature: planned 0, prepared 1, verified 2', () => {
    expect(filledSlots(renderToString(createElement(StatusMark, { status: 'planned' })))).toBe(0);
    expect(filledSlots(renderToString(createElement(StatusMark, { status: 'prepared' })))).toBe(1);
    expect(filledSlots(renderToString(createElement(StatusMark, { status: 'verified' })))).toBe(2);
  });

  it('gives every status a different drawing, and the badge always writes the word; no circle glyphs', () => {
    const drawings = ['planned', 'prepared', 'verified', 'returned', 'discarded', 'expired'].map((s) => renderToString(createElement(StatusMark, { status: s })).replace(/data-mark="[^"]*"/, ''));
    expect(new Set(drawings).size).toBe(6);
    const badge = renderToString(createElement(StatusBadge, { status: 'verified' }));
    expect(badge).toContain('Verified');
    expect(badge).not.toMatch(/[○◐●]/);
  });
});

describe('the two badges of a record', () => {
  it('the bench badge is captioned and both are explained in one sentence', async () => {
    const { StageBadge, BADGES_EXPLAINED } = await import('../../src/features/preparations/components/stage-badge.tsx');
    const html = renderToString(createElement(StageBadge, { stage: 'planned', testId: 'detail-stage' })).replace(/<!-- -->/g, '');
    expect(html).toContain('>Bench<');
    expect(html).toMatch(/data-testid="detail-stage"[^>]*>Planned</);
    expect(BADGES_EXPLAINED).toMatch(/Bench: how far the work is/);
    expect(BADGES_EXPLAINED).toMatch(/who has signed/);
  });
});
