/**
 * The copies field of label printing: what is typed is checked at the field and kept as typed; "-3" is an
 * error (never silently 3), 501 is an error (the button does not print a stale count).
 */
import { createElement } from 'react';
import { renderToString } from 'react-dom/server';
import { describe, expect, it } from 'vitest';
import { CopiesStepper, copiesError } from '../../src/features/printing/components/copies-stepper.tsx';

describe('copies field', () => {
  it('accepts whole numbers from 1 to 500 only', () => {
    expect(copiesError('1')).toBeUndefined();
    expect(copiesError(' 500 ')).toBeUndefined();
    expect(copiesError('501')).toBe('Use 1 to 500 copies, not 501');
    expect(copiesError('0')).toBe('Use 1 to 500 copies, not 0');
    expect(copiesError('-3')).toBe('Copies are a whole number from 1 to 500, not -3');
    expect(copiesError('2.5')).toMatch(/whole number/);
    expect(copiesError('')).toMatch(/Enter the number of copies/);
  });

  it('shows the typed text and its error at the field', () => {
    const html = renderToString(createElement(CopiesStepper, { value: 3, onChange: () => {}, text: '-3', onTextChange: () => {}, error: copiesError('-3') }));
    expect(html).toContain('value="-3"');
    expect(html).toContain('aria-invalid="true"');
    expect(html).toContain('Copies are a whole number from 1 to 500, not -3');
  });
});
