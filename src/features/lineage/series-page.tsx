/**
 * Calibration series from one verified parent, "all from stock" (REQUIREMENTS, calibration-level series):
 * 5–8 levels, a target per level, the server proposes a pipette/flask pair per level (METROLOGY §5.5 with the
 * §4.4 tolerances), the chemist may change any pair, and "Create series" makes one planned record per level,
 * each with its own identifier, label and expiry.
 */
import { useMemo, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link, useParams } from 'react-router';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import type { ApiError } from '../../lib/api-client.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { preparationQueries } from '../preparations/api/preparation-queries.ts';
import { percent } from '../preparations/format.ts';
import { D } from '../../../shared/calc/decimal.ts';
import { lineageQueries, useCreateSeries, useSeriesProposal } from './api/lineage-api.ts';
import { usePipettes, wareLabel } from './dilute-page.tsx';
import { expectedDilution } from './expected-dilution.ts';
import { labToday, parentConcentration, parentRefusal } from './parent-check.ts';
import type { SeriesCreated } from './types.ts';

const MIN_LEVELS = 5;
const MAX_LEVELS = 8;

/** Evenly spread default targets: 2, 4, 6, … % of the parent (a common linear calibration layout). */
function defaultTargets(n: number, parent: string | undefined): string[] {
  if (!parent) return Array.from({ length: n }, () => '');
  const top = new D(parent).div(10);
  return Array.from({ length: n }, (_, i) => top.times(i + 1).div(n).toSignificantDigits(3).toString());
}

type Row = { pipetteId: string; flaskId: string; aliquotMl?: string; message?: string };

export function SeriesPage() {
  const { identifier = '' } = useParams();
  const parent = useQuery(preparationQueries.detail(identifier));
  const settings = useQuery(settingsQueries.detail());
  const pipettes = usePipettes();
  const flasks = useQuery(lineageQueries.ware('volumetric_flask'));
  const propose = useSeriesProposal();
  const create = useCreateSeries();
  const [count, setCount] = useState(MIN_LEVELS);
  const [targets, setTargets] = useState<string[] | null>(null);
  const [rows, setRows] = useState<Row[] | null>(null);
  const [created, setCreated] = useState<SeriesCreated | null>(null);
  const conc = parent.data ? parentConcentration(parent.data) : null;
  const shown = useMemo(() => targets ?? defaultTargets(count, conc?.value), [targets, count, conc?.value]);

  if (parent.isPending) return <Spinner label="Loading the parent standard…" />;
  if (parent.isError) return <Banner title={`No preparation ${identifier}`}>{parent.error.message}</Banner>;
  const p = parent.data;
  const refusal = parentRefusal(p, labToday(settings.data?.timeZone));
  const unit = conc?.unit ?? 'mg/L';
  const proposeErr = propose.error as ApiError | null;
  const createErr = create.error as ApiError | null;

  const setCountTo = (n: number) => {
    setCount(n);
    setTargets((t) => (t ? Array.from({ length: n }, (_, i) => t[i] ?? '') : null));
    setRows(null);
  };

  const doPropose = () => {
    setCreated(null);
    propose.mutate(
      { parentKey: p.identifier, levels: shown.map((v) => ({ value: v.trim(), unit })) },
      {
        onSuccess: (r) =>
          setRows(
            r.levels.map((l) => ({
              pipetteId: l.choice ? String(l.choice.pipette.id) : '',
              flaskId: l.choice ? String(l.choice.flask.id) : '',
              aliquotMl: l.choice?.pipette.kind === 'piston_pipette' ? l.choice.aliquotMl : undefined,
              message: l.message,
            })),
          ),
      },
    );
  };

  const doCreate = () => {
    if (!rows) return;
    create.mutate(
      {
        parentKey: p.identifier,
        levels: rows.map((r, i) => ({
          target: { value: shown[i]!.trim(), unit },
          pipetteId: Number(r.pipetteId),
          flaskId: Number(r.flaskId),
          ...(r.aliquotMl && pipettes.data.find((w) => String(w.id) === r.pipetteId)?.kind === 'piston_pipette' ? { aliquotMl: r.aliquotMl } : {}),
        })),
      },
      { onSuccess: setCreated },
    );
  };

  const fieldError = (err: ApiError | null, key: string) => err?.fields[key];

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title={<span>Calibration series from <span className="num">{p.identifier}</span></span>}>
        <p>
          {p.materialName} as <span className="num">{p.analyteFormula}</span>
          {conc ? <> · parent <span className="num font-semibold text-ink">{conc.display}</span></> : null} · every level is made
          directly from this parent.
        </p>
      </PageHeader>

      {refusal ? (
        <Banner title="A series cannot be made from this record" testId="series-refused">
          <p>{refusal}</p>
          <Link to={`/preparations/${encodeURIComponent(p.identifier)}`} className="font-semibold underline">
            Back to {p.identifier}
          </Link>
        </Banner>
      ) : created ? (
        <Panel title={`Series ${created.series.identifier} created`} id="series-created">
          <p className="mb-3">Each level is its own planned record: weigh nothing, pipette the aliquot, make up, sign and verify each one.</p>
          <p className="mb-3">
            <Link
              to={`/series/${encodeURIComponent(created.series.identifier)}`}
              data-testid="series-open"
              className="inline-flex min-h-12 items-center rounded-lg border-2 border-slate-700 bg-slate-700 px-5 font-semibold text-white hover:bg-slate-900"
            >
              Open series {created.series.identifier}
            </Link>
          </p>
          <ul className="flex flex-col gap-2" data-testid="series-created-list">
            {created.preparations.map((c) => (
              <li key={c.id}>
                <Link to={`/preparations/${encodeURIComponent(c.identifier)}`} className="num font-semibold text-brass-600 underline">
                  {c.identifier}
                </Link>{' '}
                — {c.target.value} {c.target.unit}, expires {c.expiresOn}{' '}
                <Link
                  to={`/preparations/${encodeURIComponent(c.identifier)}/bench`}
                  data-testid={`series-bench-${c.identifier}`}
                  className="ml-2 inline-flex min-h-12 items-center rounded-lg border-2 border-slate-700 bg-card px-4 font-semibold hover:bg-slate-100"
                >
                  Bench
                </Link>
              </li>
            ))}
          </ul>
        </Panel>
      ) : (
        <>
          <Panel title="Levels" id="series-levels">
            <div className="flex flex-col gap-4">
              <div>
                <label htmlFor="series-count" className="mb-1 block text-sm font-semibold">
                  Number of levels ({MIN_LEVELS}–{MAX_LEVELS})
                </label>
                <select id="series-count" data-testid="series-count" value={count} onChange={(e) => setCountTo(Number(e.target.value))} className="field-input w-32">
                  {Array.from({ length: MAX_LEVELS - MIN_LEVELS + 1 }, (_, i) => MIN_LEVELS + i).map((n) => (
                    <option key={n} value={n}>
                      {n}
                    </option>
                  ))}
                </select>
              </div>
              <div className="grid gap-3 sm:grid-cols-4">
                {shown.map((v, i) => (
                  <div key={i}>
                    <label htmlFor={`series-target-${i}`} className="mb-1 block text-sm font-semibold">
                      Level {i + 1} ({unit})
                    </label>
                    <input
                      id={`series-target-${i}`}
                      data-testid={`series-target-${i}`}
                      inputMode="decimal"
                      value={v}
                      onChange={(e) => {
                        const next = [...shown];
                        next[i] = e.target.value;
                        setTargets(next);
                        setRows(null);
                      }}
                      aria-invalid={fieldError(proposeErr, `levels.${i}.value`) ? true : undefined}
                      className="field-input num"
                    />
                    {fieldError(proposeErr, `levels.${i}.value`) ? <p className="mt-1 text-sm font-semibold text-bad-700">{fieldError(proposeErr, `levels.${i}.value`)}</p> : null}
                  </div>
                ))}
              </div>
              {proposeErr && Object.keys(proposeErr.fields).length === 0 ? <Banner title="No proposal">{proposeErr.message}</Banner> : null}
              <div>
                <Button onClick={doPropose} busy={propose.isPending} data-testid="series-propose">
                  Propose glassware
                </Button>
              </div>
              {rows && propose.data?.intermediate ? (
                <div role="note" data-testid="series-intermediate" className="rounded-xl border-4 border-brass-400 bg-brass-100 px-5 py-4">
                  <p className="text-lg font-bold">Intermediate dilution needed</p>
                  <p className="mt-1">{propose.data.intermediate.message}.</p>
                  <Link
                    to={`/preparations/${encodeURIComponent(p.identifier)}/dilute`}
                    data-testid="series-intermediate-plan"
                    className="mt-3 inline-flex min-h-12 items-center rounded-lg border-2 border-slate-700 bg-card px-4 font-semibold"
                  >
                    Plan the intermediate dilution ({propose.data.intermediate.target.value} {propose.data.intermediate.target.unit}) →
                  </Link>
                </div>
              ) : null}
            </div>
          </Panel>

          {rows ? (
            <Panel title="Proposed glassware per level" id="series-proposal">
              <div className="overflow-x-auto">
                <table className="w-full border-collapse text-left" data-testid="series-table">
                  <thead>
                    <tr className="border-b-2 border-line">
                      <th className="p-2">Level</th>
                      <th className="p-2">Target</th>
                      <th className="p-2">Pipette</th>
                      <th className="p-2">Flask</th>
                      <th className="p-2">Expected</th>
                    </tr>
                  </thead>
                  <tbody>
                    {rows.map((r, i) => {
                      const pip = pipettes.data.find((w) => String(w.id) === r.pipetteId);
                      const fl = flasks.data?.find((w) => String(w.id) === r.flaskId);
                      const delivered = pip ? { ...pip, nominalVolumeMl: pip.kind === 'piston_pipette' && r.aliquotMl ? r.aliquotMl : pip.nominalVolumeMl } : null;
                      const exp = conc && delivered && fl ? expectedDilution({ parent: conc, pipette: delivered, flask: fl }) : null;
                      const update = (patch: Partial<Row>) => setRows(rows.map((x, j) => (j === i ? { ...x, ...patch } : x)));
                      return (
                        <tr key={i} className="border-b border-line align-top" data-testid={`series-row-${i}`}>
                          <td className="p-2 font-semibold">{i + 1}</td>
                          <td className="num p-2">
                            {shown[i]} {unit}
                          </td>
                          <td className="p-2">
                            <label className="sr-only" htmlFor={`series-pipette-${i}`}>
                              Pipette for level {i + 1}
                            </label>
                            <select id={`series-pipette-${i}`} data-testid={`series-pipette-${i}`} value={r.pipetteId} onChange={(e) => update({ pipetteId: e.target.value, aliquotMl: undefined })} className="field-input">
                              <option value="">Choose a pipette</option>
                              {pipettes.data.map((w) => (
                                <option key={w.id} value={w.id}>
                                  {wareLabel(w)}
                                </option>
                              ))}
                            </select>
                            {fieldError(createErr, `levels.${i}.pipetteId`) ? <p className="mt-1 text-sm font-semibold text-bad-700">{fieldError(createErr, `levels.${i}.pipetteId`)}</p> : null}
                            {r.aliquotMl && pip?.kind === 'piston_pipette' ? <p className="text-sm text-ink-soft">set to {r.aliquotMl} mL</p> : null}
                          </td>
                          <td className="p-2">
                            <label className="sr-only" htmlFor={`series-flask-${i}`}>
                              Flask for level {i + 1}
                            </label>
                            <select id={`series-flask-${i}`} data-testid={`series-flask-${i}`} value={r.flaskId} onChange={(e) => update({ flaskId: e.target.value })} className="field-input">
                              <option value="">Choose a flask</option>
                              {(flasks.data ?? []).map((w) => (
                                <option key={w.id} value={w.id} disabled={Boolean(w.holds)}>
                                  {wareLabel(w)}
                                </option>
                              ))}
                            </select>
                            {fieldError(createErr, `levels.${i}.flaskId`) ? <p className="mt-1 text-sm font-semibold text-bad-700">{fieldError(createErr, `levels.${i}.flaskId`)}</p> : null}
                          </td>
                          <td className="num p-2" data-testid={`series-expected-${i}`}>
                            {exp ? (
                              <>
                                {exp.display}
                                <span className="block text-sm text-ink-soft">u_r {percent(exp.relative, 2)}</span>
                              </>
                            ) : (
                              <span className="font-sans text-bad-700">{r.message ?? 'Choose a pipette and a flask'}</span>
                            )}
                          </td>
                        </tr>
                      );
                    })}
                  </tbody>
                </table>
              </div>
              {createErr && Object.keys(createErr.fields).length === 0 ? <div className="mt-3"><Banner title="The series was not created">{createErr.message}</Banner></div> : null}
              <div className="mt-4">
                <Button onClick={doCreate} busy={create.isPending} disabled={rows.some((r) => !r.pipetteId || !r.flaskId)} data-testid="series-create" className="min-h-14 px-8 text-lg">
                  Create series ({rows.length} records)
                </Button>
              </div>
            </Panel>
          ) : null}
        </>
      )}
    </div>
  );
}
