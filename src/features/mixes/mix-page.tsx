/**
 * Make a mix (chemists, /mixes/new, optional ?from=<identifier> to start with that standard): pick two or more
 * verified, in-date standards with different analytes, a pipette for each and one volumetric flask; see every
 * analyte's expected concentration ± U live (METROLOGY §5.5, the dilution page's calculation); create the record.
 * The server checks everything again and its field messages land at the fields. Parent standards only: a mix
 * weighed from several solid reference materials is not offered.
 */
import { useMemo, useState, type FormEvent, type ReactNode } from 'react';
import { useQueries, useQuery } from '@tanstack/react-query';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { Button } from '../../components/ui/button.tsx';
import { Banner, CautionBox, PageHeader, Panel } from '../../components/ui/feedback.tsx';
import type { ApiError } from '../../lib/api-client.ts';
import { useDebouncedValue } from '../../hooks/use-debounced-value.ts';
import { D } from '../../../shared/calc/decimal.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { preparationQueries } from '../preparations/api/preparation-queries.ts';
import { percent } from '../preparations/format.ts';
import type { PreparationDetail } from '../preparations/types.ts';
import { lineageQueries } from '../lineage/api/lineage-api.ts';
import { usePipettes, wareLabel } from '../lineage/dilute-page.tsx';
import { labToday } from '../lineage/parent-check.ts';
import { mixQueries, useCreateMix } from './api/mix-api.ts';
import { MAX_COMPONENTS, expectedMix, mixFieldErrors, mixParentRefusal, parentConcentration, toMixInput, type ComponentRow } from './mix-form.ts';

function FieldError({ id, error }: { id: string; error?: string }) {
  return error ? (
    <p id={`${id}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700" data-testid={`${id}-error`}>
      {error}
    </p>
  ) : null;
}

function Labelled({ id, label, error, hint, children }: { id: string; label: string; error?: string; hint?: string; children: ReactNode }) {
  return (
    <div>
      <label htmlFor={id} className="mb-1 block text-sm font-semibold">
        {label}
      </label>
      {children}
      {hint ? <p className="mt-1 text-sm text-ink-soft">{hint}</p> : null}
      <FieldError id={id} error={error} />
    </div>
  );
}

export function MixPage() {
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const from = params.get('from');
  const settings = useQuery(settingsQueries.detail());
  const today = labToday(settings.data?.timeZone);
  const pipettes = usePipettes();
  const flasks = useQuery(lineageQueries.ware('volumetric_flask'));
  const create = useCreateMix();
  const [rows, setRows] = useState<ComponentRow[]>(() => (from ? [{ parentKey: from, pipetteId: '', aliquotMl: '' }] : []));
  const [flaskId, setFlaskId] = useState('');
  const [notes, setNotes] = useState('');
  const [search, setSearch] = useState('');
  const [local, setLocal] = useState<Record<string, string>>({});
  const debounced = useDebouncedValue(search, 250);
  const candidates = useQuery(mixQueries.parents(debounced));
  const details = useQueries({ queries: rows.map((r) => preparationQueries.detail(r.parentKey)) });
  const parents = useMemo(() => {
    const m = new Map<string, PreparationDetail>();
    details.forEach((q, i) => {
      if (q.data) m.set(rows[i]!.parentKey, q.data);
    });
    return m;
  }, [details, rows]);

  const flask = flasks.data?.find((w) => String(w.id) === flaskId);
  const expected = expectedMix(rows, parents, pipettes.data, flask);
  const apiErr = create.error as ApiError | null;
  const fields: Record<string, string> = { ...(apiErr?.fields ?? {}), ...local };
  const chosenAnalytes = new Set(rows.map((r) => parents.get(r.parentKey)?.analyteFormula).filter(Boolean));

  const update = (i: number, patch: Partial<ComponentRow>) => setRows((rs) => rs.map((r, j) => (j === i ? { ...r, ...patch } : r)));
  const add = (identifier: string) => {
    setRows((rs) => (rs.some((r) => r.parentKey === identifier) || rs.length >= MAX_COMPONENTS ? rs : [...rs, { parentKey: identifier, pipetteId: '', aliquotMl: '' }]));
    setLocal((l) => {
      const { components: _c, ...rest } = l;
      return rest;
    });
  };
  const remove = (i: number) => {
    setRows((rs) => rs.filter((_, j) => j !== i));
    setLocal({});
  };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const errs = mixFieldErrors(rows, parents, pipettes.data, flask, today);
    setLocal(errs);
    if (Object.keys(errs).length || !flask) return;
    create.mutate(toMixInput(rows, pipettes.data, flask.id, notes), { onSuccess: (d) => void navigate(`/preparations/${encodeURIComponent(d.identifier)}`) });
  };

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Make a mix">
        <p>Two or more verified standards with different analytes, each pipetted into one flask and made up to volume. Every analyte gets its own concentration and uncertainty.</p>
      </PageHeader>

      <form onSubmit={submit} noValidate className="flex flex-col gap-6" data-testid="mix-form">
        <Panel title="Standards in the mix" id="mix-components">
          <div className="flex flex-col gap-4">
            {rows.length === 0 ? <p className="text-ink-soft">No standard chosen yet: add at least two below.</p> : null}
            <ol className="flex flex-col gap-4" data-testid="mix-component-list">
              {rows.map((r, i) => {
                const q = details[i];
                const p = q?.data;
                const conc = p ? parentConcentration(p) : null;
                const pipette = pipettes.data.find((w) => String(w.id) === r.pipetteId);
                const exp = expected.components[i]?.expected;
                const pre = `mix-component-${i}`;
                return (
                  <li key={r.parentKey} className="rounded-xl border-2 border-line bg-card p-4" data-testid={pre}>
                    <div className="flex flex-wrap items-start justify-between gap-3">
                      <div className="min-w-0">
                        <p className="text-lg font-bold">
                          <span className="num">{r.parentKey}</span>
                          {p ? (
                            <>
                              {' '}
                              · <span className="num">{p.analyteFormula}</span> · {p.materialName}
                            </>
                          ) : null}
                        </p>
                        {q?.isPending ? <p className="text-ink-soft">Loading…</p> : null}
                        {q?.isError ? <p className="text-bad-700">{q.error.message}</p> : null}
                        {p ? (
                          <p className="text-ink-soft">
                            {conc ? <span className="num font-semibold text-ink">{conc.display}</span> : 'no concentration'} · expires <span className="num">{p.expiry.expiresOn}</span>
                          </p>
                        ) : null}
                        <FieldError id={`${pre}-parent`} error={fields[`components.${i}.parentKey`]} />
                      </div>
                      <Button variant="secondary" onClick={() => remove(i)} data-testid={`${pre}-remove`}>
                        Remove
                      </Button>
                    </div>
                    <div className="mt-3 grid gap-4 md:grid-cols-3">
                      <Labelled id={`${pre}-pipette`} label="Pipette" error={fields[`components.${i}.pipetteId`]}>
                        <select
                          id={`${pre}-pipette`}
                          data-testid={`${pre}-pipette`}
                          value={r.pipetteId}
                          onChange={(e) => update(i, { pipetteId: e.target.value, aliquotMl: '' })}
                          className="field-input"
                          aria-invalid={fields[`components.${i}.pipetteId`] ? true : undefined}
                        >
                          <option value="">{pipettes.isPending ? 'Loading…' : 'Choose a pipette'}</option>
                          {pipettes.data.map((w) => (
                            <option key={w.id} value={w.id}>
                              {wareLabel(w)}
                            </option>
                          ))}
                        </select>
                      </Labelled>
                      {pipette?.kind === 'piston_pipette' ? (
                        <Labelled
                          id={`${pre}-volume`}
                          label="Volume to set (mL)"
                          error={fields[`components.${i}.aliquotMl`]}
                          hint={`${new D(pipette.nominalVolumeMl).mul('0.1').toString()} to ${pipette.nominalVolumeMl} mL; empty = ${pipette.nominalVolumeMl} mL`}
                        >
                          <input
                            id={`${pre}-volume`}
                            data-testid={`${pre}-volume`}
                            inputMode="decimal"
                            value={r.aliquotMl}
                            onChange={(e) => update(i, { aliquotMl: e.target.value })}
                            className="field-input num"
                            autoComplete="off"
                            aria-invalid={fields[`components.${i}.aliquotMl`] ? true : undefined}
                          />
                        </Labelled>
                      ) : (
                        <div />
                      )}
                      <div aria-live="polite">
                        <p className="text-sm font-semibold text-ink-soft">Expected {p?.analyteFormula ?? ''}</p>
                        <p className="num text-xl font-semibold" data-testid={`${pre}-expected`}>
                          {exp ? exp.display : '—'}
                        </p>
                        {exp ? <p className="text-sm text-ink-soft">u<sub>r</sub> <span className="num">{percent(exp.relative, 2)}</span> from the parent and the two tolerances</p> : null}
                      </div>
                    </div>
                  </li>
                );
              })}
            </ol>
            <FieldError id="mix-components" error={fields.components} />

            {rows.length < MAX_COMPONENTS ? (
              <div className="rounded-xl border-2 border-dashed border-line p-4">
                <Labelled id="mix-search" label="Add a verified standard (search by identifier, analyte or material)">
                  <input id="mix-search" data-testid="mix-search" value={search} onChange={(e) => setSearch(e.target.value)} className="field-input" autoComplete="off" placeholder="e.g. Cd or HWL-2026-0001" />
                </Labelled>
                {candidates.isError ? <p className="mt-2 text-bad-700">The standards could not be loaded: {candidates.error.message}</p> : null}
                <ul className="mt-3 flex flex-col gap-2" data-testid="mix-candidates">
                  {(candidates.data?.items ?? []).map((c) => {
                    const chosen = rows.some((r) => r.parentKey === c.identifier);
                    const expired = c.expiresOn < today;
                    const sameAnalyte = !chosen && chosenAnalytes.has(c.analyteFormula);
                    const isMix = c.analyteFormula.includes('+');
                    const why = chosen ? 'in the mix' : expired ? `expired ${c.expiresOn}` : sameAnalyte ? `${c.analyteFormula} is already in the mix` : isMix ? 'a mix cannot be a parent' : null;
                    return (
                      <li key={c.id} className="flex flex-wrap items-center justify-between gap-3 rounded-lg border-2 border-line px-3 py-2">
                        <span>
                          <span className="num font-semibold">{c.identifier}</span> · <span className="num">{c.analyteFormula}</span> · {c.materialName}
                          {c.concentrationDisplay ? <span className="num"> · {c.concentrationDisplay}</span> : null} · expires <span className="num">{c.expiresOn}</span>
                        </span>
                        {why ? (
                          <span className="text-sm font-semibold text-ink-soft">{why}</span>
                        ) : (
                          <Button variant="secondary" onClick={() => add(c.identifier)} data-testid={`mix-add-${c.identifier}`}>
                            Add {c.analyteFormula}
                          </Button>
                        )}
                      </li>
                    );
                  })}
                  {candidates.data && candidates.data.items.length === 0 ? <li className="text-ink-soft">No verified standard matches.</li> : null}
                </ul>
              </div>
            ) : null}
          </div>
        </Panel>

        <Panel title="Flask" id="mix-flask-panel">
          <div className="grid gap-5 md:grid-cols-2">
            <Labelled id="mix-flask" label="Volumetric flask (one for the whole mix)" error={fields.flaskId}>
              <select id="mix-flask" data-testid="mix-flask" value={flaskId} onChange={(e) => setFlaskId(e.target.value)} className="field-input" aria-invalid={fields.flaskId ? true : undefined}>
                <option value="">{flasks.isPending ? 'Loading…' : 'Choose a flask'}</option>
                {(flasks.data ?? []).map((w) => (
                  <option key={w.id} value={w.id} disabled={Boolean(w.holds)}>
                    {wareLabel(w)}
                  </option>
                ))}
              </select>
            </Labelled>
            <div>
              <p className="text-sm font-semibold text-ink-soft">Aliquots together</p>
              <p className="num text-2xl font-semibold" data-testid="mix-total">
                {expected.totalMl} mL{flask ? ` of ${flask.nominalVolumeMl} mL` : ''}
              </p>
              {expected.fits === false ? <p className="font-semibold text-bad-700">Does not fit: leave room for the solvent.</p> : null}
            </div>
            <Labelled id="mix-notes" label="Notes (optional)" error={fields.notes}>
              <textarea id="mix-notes" value={notes} onChange={(e) => setNotes(e.target.value)} className="field-input min-h-20" />
            </Labelled>
          </div>
          {pipettes.error || flasks.error ? <p className="mt-3 text-bad-700">The glassware list could not be loaded: {(pipettes.error ?? flasks.error)?.message}</p> : null}
        </Panel>

        <CautionBox>
          <p>Metal standards are toxic and usually in acid: pipette with a filler (never by mouth), wear gloves and eye protection, and collect rinses as hazardous waste.</p>
          <p className="mt-1 font-semibold">Follow the SDS, local regulations and the laboratory&apos;s own procedures.</p>
        </CautionBox>

        {apiErr && Object.keys(apiErr.fields).length === 0 ? <Banner title="The mix was not created">{apiErr.message}</Banner> : null}
        {apiErr && Object.keys(apiErr.fields).length > 0 ? <Banner title="The mix was not created">Check the fields marked above.</Banner> : null}
        <div className="flex flex-wrap gap-3">
          <Button type="submit" busy={create.isPending} data-testid="mix-submit" className="min-h-14 px-8 text-lg">
            Create the mix
          </Button>
          <Link to="/preparations" className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-card px-6 font-semibold hover:bg-slate-100">
            Cancel
          </Link>
        </div>
      </form>
    </div>
  );
}

