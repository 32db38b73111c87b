// The solvent-matrix warning of a dilution (shared/prep/matrix.ts; issue 16 §5): a nitric-acid stock diluted with
// methanol is warned about; the same solvent (any lot, any spelling of spaces or case) is not [common practice].
import { describe, expect, it } from 'vitest';
import { solventMatrixWarning } from '../../../shared/prep/matrix.ts';

describe('solventMatrixWarning', () => {
  it('warns when the solvent differs from the parent\u2019s, naming both and deferring to the SDS and the lab\u2019s procedure', () => {
    const w = solventMatrixWarning({ identifier: 'HWL-2026-0001', solventName: 'Nitric acid 2 % (v/v)' }, 'Methanol');
    expect(w).toMatchObject({ parentSolvent: 'Nitric acid 2 % (v/v)', solvent: 'Methanol' });
    expect(w!.message).toMatch(/^HWL-2026-0001 is in Nitric acid 2 % \(v\/v\), but this dilution is made up with Methanol\./);
    expect(w!.message).toMatch(/SDS/);
    expect(w!.message).toMatch(/lab’s procedure/);
  });

  it('is silent for the same solvent, or when either side is unknown', () => {
    expect(solventMatrixWarning({ identifier: 'X', solventName: 'Nitric acid 2 % (v/v)' }, ' nitric  acid 2 % (v/v) ')).toBeNull();
    expect(solventMatrixWarning({ identifier: 'X', solventName: null }, 'Methanol')).toBeNull();
    expect(solventMatrixWarning({ identifier: 'X', solventName: 'Methanol' }, undefined)).toBeNull();
  });
});
