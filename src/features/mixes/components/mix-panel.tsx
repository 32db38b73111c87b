/**
 * A mix on its detail page (METROLOGY §5.5 per component): each analyte's parent as used, its aliquot, the planned
 * concentration ± U and, once every aliquot and the make-up are recorded, the recomputed one. Also the "Make a mix"
 * link on a verified standard and the inputs of a mix (its parents) in place of the stock's material snapshot.
 */
import { Link } from 'react-router';
import { Panel } from '../../../components/ui/feedback.tsx';
import type { LineageSection, MixComponent } from '../../../../shared/schemas/lineage.ts';
import { useAuth } from '../../auth/use-auth.ts';
import { calcVersionName, percent } from '../../preparations/format.ts';
import type { PreparationDetail } from '../../preparations/types.ts';
import { mixParentRefusal } from '../mix-form.ts';

export function mixOf(d: PreparationDetail) {
  return (d as PreparationDetail & LineageSection).mix;
}

/** A record made by pipetting several parents into one flask. */
export function isMix(d: PreparationDetail): boolean {
  return Boolean(mixOf(d));
}

/** The aliquot that counts for a component: the newest one nothing supersedes. */
export function currentComponentAliquot(c: MixComponent) {
  return c.aliquots.filter((a) => !a.supersededById).at(-1);
}

export function MixPanel({ d }: { d: PreparationDetail }) {
  const mix = mixOf(d);
  if (!mix) return null;
  const done = mix.components.every((c) => c.result);
  return (
    <Panel title={done ? 'Result per analyte' : 'Expected result per analyte'} id="detail-mix">
      <div className="overflow-x-auto">
        <table className="w-full border-collapse text-left" data-testid="detail-mix-table">
          <thead>
            <tr className="border-b-2 border-line text-sm text-ink-soft">
              <th className="py-2 pr-4">Analyte</th>
              <th className="py-2 pr-4">Parent (as used)</th>
              <th className="py-2 pr-4">Aliquot</th>
              <th className="py-2 pr-4">Planned</th>
              <th className="py-2 pr-4">Recomputed</th>
            </tr>
          </thead>
          <tbody>
            {mix.components.map((c) => {
              const a = currentComponentAliquot(c);
              return (
                <tr key={c.linkId} className="border-b border-line align-top" data-testid={`detail-mix-row-${c.analyteFormula}`}>
                  <th scope="row" className="num py-3 pr-4 text-lg">
                    {c.analyteFormula}
                  </th>
                  <td className="py-3 pr-4">
                    <Link to={`/preparations/${encodeURIComponent(c.parent.identifier)}`} className="num font-semibold text-brass-600 underline">
                      {c.parent.identifier}
                    </Link>
                    <br />
                    <span className="num">{c.parent.snapshot.concentration.display}</span>, version {c.parent.snapshot.version}, expires <span className="num">{c.parent.snapshot.expiresOn}</span>
                  </td>
                  <td className="num py-3 pr-4">
                    planned {c.plannedAliquot.volumeMl} mL with {c.plannedAliquot.pipette.identifier}
                    <br />
                    {a ? `delivered ${a.volumeMl} mL with ${a.pipette.identifier}` : 'not recorded yet'}
                    {c.aliquots.length > 1 ? ` (${c.aliquots.length - 1} superseded)` : ''}
                  </td>
                  <td className="num py-3 pr-4">
                    {c.planned.display}
                    <br />
                    <span className="text-sm text-ink-soft">u<sub>r</sub> {percent(c.planned.relative, 2)}</span>
                  </td>
                  <td className="num py-3 pr-4 font-semibold" data-testid={`detail-mix-result-${c.analyteFormula}`}>
                    {c.result ? (
                      <>
                        {c.result.display}
                        <br />
                        <span className="text-sm font-normal text-ink-soft">u<sub>r</sub> {percent(c.result.relative, 2)}</span>
                      </>
                    ) : (
                      <span className="font-normal text-ink-soft">after the aliquot and the make-up</span>
                    )}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <p className="mt-3 text-ink-soft">
        Made up to <span className="num">{mix.plannedFinalMl} mL</span>. Each analyte: c = c<sub>parent</sub> × V<sub>aliquot</sub> / V<sub>flask</sub>, with the parent&apos;s uncertainty and both
        glassware tolerances in its budget.
        {done ? ` Recomputed from the current aliquots and make-up #${mix.components[0]!.result!.basedOn.makeUpId} (${calcVersionName(mix.components[0]!.result!.calcVersion)}).` : ''}
      </p>
      {d.notes ? <p className="mt-3">Notes: {d.notes}</p> : null}
    </Panel>
  );
}

/** A mix's inputs: its parents as frozen at planning (the mix has no reference material or balance of its own). */
export function MixInputs({ d }: { d: PreparationDetail }) {
  const mix = mixOf(d);
  if (!mix) return null;
  const f = d.snapshot.flask;
  return (
    <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[auto_minmax(0,1fr)]" data-testid="snapshot-mix">
      {mix.components.map((c) => (
        <div key={c.linkId} className="contents">
          <dt className="font-semibold text-ink-soft">{c.analyteFormula}</dt>
          <dd className="num min-w-0 break-words">
            {c.parent.identifier} v{c.parent.snapshot.version}, {c.parent.snapshot.status}, {c.parent.snapshot.concentration.display}, expires {c.parent.snapshot.expiresOn}
          </dd>
        </div>
      ))}
      <dt className="font-semibold text-ink-soft">Flask</dt>
      <dd className="num">{f ? `${f.identifier}, ${f.nominalVolumeMl} mL class ${f.class}${f.toleranceMl ? ` ± ${f.toleranceMl} mL` : ''}` : `${mix.plannedFinalMl} mL`}</dd>
      <dt className="font-semibold text-ink-soft">Materials</dt>
      <dd className="min-w-0 break-words">
        {d.snapshot.material.name.replace(/^Mix: /, '')} (lots <span className="num">{d.snapshot.material.lot}</span>)
      </dd>
    </dl>
  );
}

/** "Make a mix" from a verified standard's detail page (chemists only; the page checks expiry and analytes). */
export function MixAction({ d }: { d: PreparationDetail }) {
  const auth = useAuth();
  if (auth.status !== 'signed-in' || auth.user.role !== 'chemist') return null;
  if (mixParentRefusal(d, '0000-00-00')) return null;
  return (
    <div>
      <Link
        to={`/mixes/new?from=${encodeURIComponent(d.identifier)}`}
        data-testid="open-mix"
        className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-card px-6 text-lg font-semibold hover:bg-slate-100"
      >
        Make a mix with other standards
      </Link>
    </div>
  );
}
