import type { ReferenceMaterial } from '../../../../shared/schemas/inventory.ts';

/** What the chemist checks before planning: lot, purity (with its uncertainty), density, expiry. */
export function MaterialCard({ material }: { material: ReferenceMaterial }) {
  const p = material.purity;
  const u = p.expandedUncertainty ? `± ${p.expandedUncertainty} (k = ${p.k ?? '2'})` : p.standardUncertainty ? `u = ${p.standardUncertainty}` : '';
  return (
    <dl data-testid="material-card" className="grid gap-x-6 gap-y-1 rounded-lg border-2 border-line bg-slate-100/60 px-4 py-3 text-[0.95rem] sm:grid-cols-2">
      <div>
        <dt className="inline font-semibold">Formula: </dt>
        <dd className="inline num">{material.formula}</dd>
      </div>
      <div>
        <dt className="inline font-semibold">Lot: </dt>
        <dd className="inline num">{material.lot}</dd>
      </div>
      <div>
        <dt className="inline font-semibold">Purity: </dt>
        <dd className="inline num">
          {p.value} {u} <span className="font-sans text-ink-soft">({p.basis})</span>
        </dd>
      </div>
      <div>
        <dt className="inline font-semibold">Expires: </dt>
        <dd className="inline num">{material.expiresOn ?? 'not recorded'}</dd>
      </div>
      <div>
        <dt className="inline font-semibold">Density: </dt>
        <dd className="inline num">{material.densityGPerMl ? `${material.densityGPerMl} g/mL` : 'not recorded'}</dd>
      </div>
      <div>
        <dt className="inline font-semibold">Producer: </dt>
        <dd className="inline">
          {material.producer} {material.grade}
        </dd>
      </div>
    </dl>
  );
}
