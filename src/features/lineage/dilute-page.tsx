/**
 * Make a working standard from a verified stock by volumetric dilution (METROLOGY.md §5.5): pick the target,
 * a pipette and a flask (in-service ware only), see the expected concentration and its uncertainty live,
 * and create the new record. The server recomputes everything and refuses a parent that is not verified
 * and in date; this page explains that before the form is shown.
 */
import { useMemo, useState, type FormEvent, type ReactNode } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link, useNavigate, useParams } from 'react-router';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import type { ApiError } from '../../lib/api-client.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { preparationQueries } from '../preparations/api/preparation-queries.ts';
import { percent, qty } from '../preparations/format.ts';
import { lineageQueries, useCreateDilution } from './api/lineage-api.ts';
import { aliquotFor, expectedDilution } from './expected-dilution.ts';
import { labToday, parentConcentration, parentRefusal } from './parent-check.ts';
import { D } from '../../../shared/calc/decimal.ts';
import { shownEstimate } from '../../../shared/calc/rounding.ts';
import type { VolumetricWare } from '../../../shared/schemas/inventory.ts';
import type { DilutionMethod } from '../../../shared/schemas/lineage.ts';
import { GravimetricForm } from './components/gravimetric-form.tsx';

export function wareLabel(w: Pick<VolumetricWare, 'identifier' | 'nominalVolumeMl' | 'class' | 'toleranceMl' | 'kind'> & { holds?: string | null }): string {
  const kind = w.kind === 'volumetric_flask' ? 'flask' : w.kind.replace(/_/g, ' ');
  return `${w.identifier} — ${w.nominalVolumeMl} mL ${kind}, class ${w.class}${w.toleranceMl ? ` ± ${w.toleranceMl} mL` : ''}${occupiedNote(w)}`;
}

/** A flask that still holds an open preparation's solution is marked (one flask, one open solution). */
export function occupiedNote(w: { holds?: string | null }): string {
  return w.holds ? ` — occupied: still holds ${w.holds}` : '';
}

function Field({ id, label, error, hint, children }: { id: string; label: string; error?: string; hint?: string; children: ReactNode }) {
  return (
    <div>
      <label htmlFor={id} className="mb-1 block text-sm font-semibold">
        {label}
      </label>
      {children}
      {hint ? <p className="mt-1 text-sm text-ink-soft">{hint}</p> : null}
      {error ? (
        <p id={`${id}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** The usable pipettes of every kind a volumetric dilution can use, smallest first. */
export function usePipettes() {
  const bulb = useQuery(lineageQueries.ware('bulb_pipette'));
  const piston = useQuery(lineageQueries.ware('piston_pipette'));
  const data = useMemo(() => [...(bulb.data ?? []), ...(piston.data ?? [])], [bulb.data, piston.data]);
  return { data, isPending: bulb.isPending || piston.isPending, error: bulb.error ?? piston.error };
}

export function DilutePage() {
  const { identifier = '' } = useParams();
  const navigate = useNavigate();
  const parent = useQuery(preparationQueries.detail(identifier));
  const settings = useQuery(settingsQueries.detail());
  const pipettes = usePipettes();
  const flasks = useQuery(lineageQueries.ware('volumetric_flask'));
  const create = useCreateDilution(identifier);
  const [target, setTarget] = useState('');
  const [pipetteId, setPipetteId] = useState('');
  const [flaskId, setFlaskId] = useState('');
  const [local, setLocal] = useState<Record<string, string>>({});
  const [method, setMethod] = useState<DilutionMethod>('volumetric'); // by volume or by mass (gravimetric-form.tsx)

  const pipette = pipettes.data.find((w) => String(w.id) === pipetteId);
  const flask = flasks.data?.find((w) => String(w.id) === flaskId);
  const conc = parent.data ? parentConcentration(parent.data) : null;
  const aliquot = conc && flask && target ? aliquotFor(target, conc.value, flask.nominalVolumeMl) : null;
  // A piston pipette is set to the aliquot the target needs (within its range); a bulb pipette delivers its nominal volume.
  const pistonSet = pipette?.kind === 'piston_pipette' && aliquot && new D(aliquot).lte(pipette.nominalVolumeMl) && new D(aliquot).gte(new D(pipette.nominalVolumeMl).times('0.1')) ? new D(aliquot).toSignificantDigits(4).toString() : null;
  const delivered = pipette ? { ...pipette, nominalVolumeMl: pistonSet ?? pipette.nominalVolumeMl } : null;
  const expected = conc && delivered && flask ? expectedDilution({ parent: conc, pipette: delivered, flask }) : null;

  if (parent.isPending) return <Spinner label="Loading the parent standard…" />;
  if (parent.isError) {
    return (
      <Banner title={parent.error.status === 404 ? `No preparation ${identifier}` : 'The parent could not be loaded'}>
        {parent.error.message}
      </Banner>
    );
  }
  const p = parent.data;
  const refusal = parentRefusal(p, labToday(settings.data?.timeZone));
  const apiErr = create.error as ApiError | null;
  const fields = { ...(apiErr?.fields ?? {}), ...local };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const errs: Record<string, string> = {};
    let t: InstanceType<typeof D> | null = null;
    try {
      t = target.trim() ? new D(target.trim()) : null;
    } catch {
      t = null;
    }
    if (!t || !t.isFinite() || t.lte(0)) errs['target.value'] = 'Enter the target concentration as a positive number';
    else if (conc && t.gte(new D(conc.value))) errs['target.value'] = `The target must be below the parent's ${shownEstimate(conc.value, conc.standardUncertainty)} ${conc.unit}`;
    if (!pipette) errs.pipetteId = 'Choose a pipette';
    if (!flask) errs.flaskId = 'Choose a volumetric flask';
    else if (pipette && new D(pipette.nominalVolumeMl).gte(new D(flask.nominalVolumeMl))) errs.flaskId = 'The flask must be larger than the pipette';
    setLocal(errs);
    if (Object.keys(errs).length || !pipette || !flask || !conc) return;
    create.mutate(
      { method: 'volumetric', target: { value: target.trim(), unit: conc.unit }, pipetteId: pipette.id, flaskId: flask.id, ...(pistonSet ? { aliquotMl: pistonSet } : {}) },
      { onSuccess: (d) => void navigate(`/preparations/${encodeURIComponent(d.identifier)}`) },
    );
  };

  const off =
    expected && target && !local['target.value']
      ? (() => {
          try {
            const t = new D(target.trim());
            return t.gt(0) ? new D(expected.value).minus(t).div(t).abs() : null;
          } catch {
            return null;
          }
        })()
      : null;

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title={<span>Make a dilution of <span className="num">{p.identifier}</span></span>}>
        <p>
          {p.materialName} as <span className="num">{p.analyteFormula}</span>
          {conc ? (
            <>
              {' '}
              · parent <span className="num font-semibold text-ink" data-testid="dilute-parent-conc">{conc.display}</span>
            </>
          ) : null}{' '}
          · expires <span className="num">{p.expiry.expiresOn}</span>
        </p>
      </PageHeader>

      {refusal ? (
        <Banner title="A dilution cannot be made from this record" testId="dilute-refused">
          <p>{refusal}</p>
          <Link to={`/preparations/${encodeURIComponent(p.identifier)}`} className="font-semibold underline">
            Back to {p.identifier}
          </Link>
        </Banner>
      ) : (
        <>
        <fieldset className="flex flex-wrap gap-3" data-testid="dilute-method">
          <legend className="mb-2 text-sm font-semibold">How is it diluted?</legend>
          {([['volumetric', 'By volume (pipette and flask)'], ['gravimetric', 'By mass (weigh aliquot and final solution)']] as const).map(([m, label]) => (
            <label key={m} className={`flex min-h-14 cursor-pointer items-center gap-3 rounded-lg border-2 px-5 text-lg font-semibold ${method === m ? 'border-slate-700 bg-slate-700 text-white' : 'border-slate-700 bg-card'}`}>
              <input type="radio" name="dilute-method" value={m} checked={method === m} onChange={() => setMethod(m)} className="size-5" data-testid={`dilute-method-${m}`} />
              {label}
            </label>
          ))}
        </fieldset>
        {method === 'gravimetric' ? <GravimetricForm parent={p} /> : (
        <form onSubmit={submit} noValidate className="flex flex-col gap-6" data-testid="dilute-form">
          {p.reviewFlag ? (
            <Banner tone="info" title="This parent is flagged for review">
              {p.reviewFlag.reason}
            </Banner>
          ) : null}
          <Panel title="Target and glassware" id="dilute-inputs">
            <div className="grid gap-5 md:grid-cols-3">
              <Field id="dilute-target" label={`Target concentration (${conc?.unit ?? ''})`} error={fields['target.value'] ?? fields.target}
                hint={aliquot && flask ? `Needs ${new D(aliquot).toSignificantDigits(4).toString()} mL into the ${flask.nominalVolumeMl} mL flask` : undefined}>
                <input
                  id="dilute-target"
                  data-testid="dilute-target"
                  inputMode="decimal"
                  value={target}
                  onChange={(e) => setTarget(e.target.value)}
                  aria-invalid={fields['target.value'] ? true : undefined}
                  className="field-input num"
                  autoComplete="off"
                />
              </Field>
              <Field id="dilute-pipette" label="Pipette" error={fields.pipetteId}>
                <select id="dilute-pipette" data-testid="dilute-pipette" value={pipetteId} onChange={(e) => setPipetteId(e.target.value)} className="field-input" aria-invalid={fields.pipetteId ? true : undefined}>
                  <option value="">{pipettes.isPending ? 'Loading…' : 'Choose a pipette'}</option>
                  {pipettes.data.map((w) => (
                    <option key={w.id} value={w.id}>
                      {wareLabel(w)}
                    </option>
                  ))}
                </select>
              </Field>
              <Field id="dilute-flask" label="Volumetric flask" error={fields.flaskId}>
                <select id="dilute-flask" data-testid="dilute-flask" value={flaskId} onChange={(e) => setFlaskId(e.target.value)} className="field-input" aria-invalid={fields.flaskId ? true : undefined}>
                  <option value="">{flasks.isPending ? 'Loading…' : 'Choose a flask'}</option>
                  {(flasks.data ?? []).map((w) => (
                    <option key={w.id} value={w.id} disabled={Boolean(w.holds)}>
                      {wareLabel(w)}
                    </option>
                  ))}
                </select>
              </Field>
            </div>
            {pipettes.error || flasks.error ? <p className="mt-3 text-bad-700">The glassware list could not be loaded: {(pipettes.error ?? flasks.error)?.message}</p> : null}
          </Panel>

          <Panel title="Expected result" id="dilute-expected">
            {expected ? (
              <div className="flex flex-col gap-2" aria-live="polite">
                <p className="num text-2xl font-semibold" data-testid="dilute-expected">
                  {expected.display}
                </p>
                <p className="text-ink-soft">
                  Dilution 1 : <span className="num">{new D(expected.dilutionFactor).toSignificantDigits(6).toString()}</span> ({qty({ value: delivered!.nominalVolumeMl, unit: 'mL' })} into{' '}
                  {qty({ value: flask!.nominalVolumeMl, unit: 'mL' })}); relative standard uncertainty{' '}
                  <span className="num" data-testid="dilute-expected-relative">{percent(expected.relative, 2)}</span> from the parent and the two tolerances.
                </p>
                {off && off.gt('0.05') ? (
                  <p className="font-semibold text-caution-700" data-testid="dilute-target-mismatch">
                    This glassware gives {new D(expected.value).toSignificantDigits(4).toString()} {expected.unit}, {percent(off.toString(), 0)} away from the target.
                  </p>
                ) : null}
              </div>
            ) : (
              <p className="text-ink-soft">Choose a pipette and a flask to see the expected concentration and its uncertainty.</p>
            )}
          </Panel>

          {apiErr && Object.keys(apiErr.fields).length === 0 ? <Banner title="The dilution was not created">{apiErr.message}</Banner> : null}
          <div className="flex flex-wrap gap-3">
            <Button type="submit" busy={create.isPending} data-testid="dilute-submit" className="min-h-14 px-8 text-lg">
              Create the dilution
            </Button>
            <Link to={`/preparations/${encodeURIComponent(p.identifier)}/series`} className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-card px-6 font-semibold hover:bg-slate-100">
              Make a calibration series instead
            </Link>
          </div>
        </form>
        )}
        </>
      )}
    </div>
  );
}
