import type { DilutionSection } from '../../../../shared/schemas/lineage.ts';

/** The dilution's solvent differs from its parent's matrix (shared/prep/matrix.ts): a caution, shown where the solvent matters. */
export function MatrixWarningNote({ warning }: { warning: DilutionSection['matrixWarning'] }) {
  if (!warning) return null;
  return (
    <div role="note" data-testid="matrix-warning" className="rounded-xl border-4 border-caution-700 bg-caution-50 px-5 py-4 text-caution-700">
      <p className="text-lg font-bold">
        Solvent differs from the parent’s matrix: {warning.parentSolvent} → {warning.solvent}
      </p>
      <p className="mt-1 text-ink">{warning.message}</p>
    </div>
  );
}
