// A reading typed by a keyboard-output balance (a burst ending in Enter) is told from one typed by hand.
// Thresholds are ours (common practice for scanner-speed input): ≥ 4 characters, gaps ≤ 35 ms, total ≤ 1 s.
import { describe, expect, it } from 'vitest';
import { burstText, type KeyStamp } from '../../../shared/balance/keyboard-burst.ts';

const keys = (text: string, gapMs: number, start = 1000): KeyStamp[] => [...text.split(''), 'Enter'].map((key, i) => ({ key, at: start + i * gapMs }));

describe('burstText', () => {
  it('when a balance types "  +12.3456 g" and Enter at 5 ms a key, then the text is a captured burst', () => {
    expect(burstText(keys('  +12.3456 g', 5))).toBe('  +12.3456 g');
  });
  it('when a person types the same at 120 ms a key, then it is typed', () => {
    expect(burstText(keys('12.3456', 120))).toBeNull();
  });
  it('when one gap is a pause (an edit), then it is typed', () => {
    const k = keys('12.3456 g', 5);
    k.slice(5).forEach((x) => (x.at += 200));
    expect(burstText(k)).toBeNull();
  });
  it('when no Enter ends it, or it is too short, or a key is not a character, then it is not a burst', () => {
    expect(burstText(keys('12.3456 g', 5).slice(0, -1))).toBeNull();
    expect(burstText(keys('1.2', 5))).toBeNull();
    expect(burstText([{ key: 'Backspace', at: 0 }, ...keys('12.3456 g', 5, 5)])).toBeNull();
  });
  it('when a long burst takes over a second, then it is not taken as one reading', () => {
    expect(burstText(keys('x'.repeat(40), 30))).toBeNull();
  });
});
