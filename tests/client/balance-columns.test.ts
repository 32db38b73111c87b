/** The balances list shows status first after the identifier, so a tablet at 820 px sees it without scrolling sideways. */
import { describe, expect, it } from 'vitest';
import { balanceColumns } from '../../src/features/inventory/balances/balance-list.tsx';

describe('balances list columns', () => {
  it('puts Status and Calibration due right after the identifier', () => {
    expect(balanceColumns.slice(0, 3).map((c) => c.header)).toEqual(['Identifier', 'Status', 'Calibration due']);
  });
});
