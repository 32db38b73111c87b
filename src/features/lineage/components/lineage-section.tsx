/**
 * The lineage of one record on its detail page (REQUIREMENTS TR-04): what kind of standard it is, the parent
 * it was diluted from, the records made from it, and (for roles that may trace) the genealogy graph with its
 * list fallback. Also the chemist's "Make a dilution / series" action.
 */
import { MatrixWarningNote } from './matrix-warning.tsx';
import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router';
import { useAuth } from '../../auth/use-auth.ts';
import { Panel } from '../../../components/ui/feedback.tsx';
import { calcVersionName, percent, statusLabel } from '../../preparations/format.ts';
import type { PreparationDetail } from '../../preparations/types.ts';
import { traceQueries } from '../../trace/api/trace-api.ts';
import { GraphLegend, LineageGraph, LineageList, mergeGraphs } from '../../trace/components/lineage-graph.tsx';
import { subjectNodeId } from '../../trace/types.ts';
import type { LineageSection as Lineage } from '../types.ts';
import { BudgetTable } from '../../calculate/components/budget-table.tsx';
import { calibratedVolumeLine } from '../../../../shared/prep/calibrated-volume.ts';

const KIND_LABEL: Record<string, string> = { stock: 'Stock solution', dilution: 'Dilution', series_level: 'Series level', mix: 'Mix' };

const TRACE_ROLES = ['qa', 'admin', 'chemist'];

/** A record made by volumetric dilution (it has an aliquot and a make-up, no weighing). */
export function isDilution(d: PreparationDetail): boolean {
  return Boolean((d as PreparationDetail & Lineage).dilution);
}

/** The dilution's plan and, once the aliquot and make-up are recorded, its recomputed result (METROLOGY §5.5). */
export function DilutionPlanPanel({ d }: { d: PreparationDetail }) {
  const dil = (d as PreparationDetail & Lineage).dilution;
  if (!dil) return null;
  const r = dil.result;
  // the calibrated volumes the budget used (frozen in the aliquot's and the make-up's snapshots), else those planned
  const aliquot = r ? dil.aliquots.find((a) => a.id === r.basedOn.aliquotId) : undefined;
  const pipette = aliquot ? aliquot.pipette : dil.plannedAliquot.pipette;
  const flask = d.makeUp?.flask.snapshot ?? d.snapshot.flask;
  const calibrated: [string, string][] = [];
  if (pipette.snapshot.calibratedVolume) calibrated.push([r ? 'Pipette, calibrated' : 'Pipette, calibrated (plan)', calibratedVolumeLine(pipette.identifier, pipette.snapshot.calibratedVolume)]);
  if (flask?.calibratedVolume) calibrated.push([r ? 'Flask, calibrated' : 'Flask, calibrated (plan)', calibratedVolumeLine(flask.identifier, flask.calibratedVolume)]);
  return (
    <Panel title={r ? 'Result' : 'Expected result'} id="detail-dilution">
      <p className="num text-2xl font-semibold" data-testid="detail-dilution-expected">
        {r ? r.display : dil.planned.display}
      </p>
      <dl className="mt-3 grid gap-x-6 gap-y-2 sm:grid-cols-[auto_minmax(0,1fr)]" data-testid="detail-dilution-plan">
        <dt className="font-semibold text-ink-soft">Parent</dt>
        <dd>
          <span className="num">{dil.parent.identifier}</span>, {dil.parent.snapshot.concentration.display} (as used, version {dil.parent.snapshot.version})
        </dd>
        <dt className="font-semibold text-ink-soft">Aliquot</dt>
        <dd className="num">
          {dil.plannedAliquot.volumeMl} mL with {dil.plannedAliquot.pipette.identifier}
        </dd>
        <dt className="font-semibold text-ink-soft">Made up to</dt>
        <dd className="num">{dil.plannedFinalMl} mL</dd>
        <dt className="font-semibold text-ink-soft">Relative standard uncertainty</dt>
        <dd className="num">{percent((r ?? dil.planned).relative, 2)}</dd>
        <dt className="font-semibold text-ink-soft">Aliquots recorded</dt>
        <dd>{dil.aliquots.length ? dil.aliquots.map((a) => `${a.volumeMl} mL with ${a.pipette.identifier}${a.supersededById ? ' (superseded)' : ''}`).join('; ') : 'none yet'}</dd>
        {calibrated.map(([k, line]) => (
          <div key={k} className="contents">
            <dt className="font-semibold text-ink-soft">{k}</dt>
            <dd className="num" data-testid="dilution-calibrated-volume">
              {line}
            </dd>
          </div>
        ))}
      </dl>
      {r && r.budget.length ? (
        <div className="mt-4">
          <h3 className="mb-2 text-lg font-bold">Uncertainty budget</h3>
          <BudgetTable rows={r.budget.map((b) => ({ ...b, unit: b.input === 'parent' ? r.unit : b.input === 'temperature' ? '°C' : 'mL' }))} outputUnit={r.unit} />
        </div>
      ) : null}
      <p className="mt-3 text-ink-soft">
        {r ? `Recomputed from aliquot #${r.basedOn.aliquotId} and make-up #${r.basedOn.makeUpId} (${calcVersionName(r.calcVersion)}).` : 'The concentration is recomputed from the recorded aliquot and make-up.'}
      </p>
      {d.notes ? <p className="mt-3">Notes: {d.notes}</p> : null}
    </Panel>
  );
}

/** "Make a dilution" and "Make a calibration series" links for chemists (the pages explain a refusal). */
export function DilutionActions({ d }: { d: PreparationDetail }) {
  const auth = useAuth();
  if (auth.status !== 'signed-in' || auth.user.role !== 'chemist') return null;
  // a mix cannot be a parent yet (the server refuses it): no dilution or series actions on it
  if ((d as PreparationDetail & Lineage).kind === 'mix') return null;
  const key = encodeURIComponent(d.identifier);
  const ready = d.status === 'verified';
  return (
    <div className="flex flex-wrap items-center gap-3" data-testid="dilution-actions">
      <Link
        to={`/preparations/${key}/dilute`}
        data-testid="open-dilute"
        className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-card px-6 text-lg font-semibold hover:bg-slate-100"
      >
        Make a dilution
      </Link>
      <Link
        to={`/preparations/${key}/series`}
        data-testid="open-series"
        className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-card px-6 text-lg font-semibold hover:bg-slate-100"
      >
        Make a calibration series
      </Link>
      {!ready ? <span className="text-ink-soft">Only a verified, in-date standard can be diluted.</span> : null}
    </div>
  );
}

export function LineagePanel({ d }: { d: PreparationDetail }) {
  const auth = useAuth();
  const l = d as PreparationDetail & Lineage;
  const canTrace = auth.status === 'signed-in' && TRACE_ROLES.includes(auth.user.role);
  const trace = useQuery({ ...traceQueries.detail(d.identifier), enabled: canTrace });
  const children = l.children ?? [];
  const parent = l.dilution?.parent;

  return (
    <div className="flex flex-col gap-4" data-testid="lineage-section">
      <MatrixWarningNote warning={l.dilution?.matrixWarning} />
      <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[auto_minmax(0,1fr)]">
        <dt className="font-semibold text-ink-soft">Kind</dt>
        <dd data-testid="lineage-kind">{KIND_LABEL[l.kind ?? 'stock'] ?? statusLabel(l.kind ?? 'stock')}</dd>
        <dt className="font-semibold text-ink-soft">Made from</dt>
        <dd data-testid="lineage-parent">
          {parent ? (
            <>
              <Link to={`/preparations/${encodeURIComponent(parent.identifier)}`} className="num font-semibold text-brass-600 underline">
                {parent.identifier}
              </Link>{' '}
              ({parent.snapshot.concentration.display}, as used; {l.dilution!.plannedAliquot.volumeMl} mL with {l.dilution!.plannedAliquot.pipette.identifier} into {l.dilution!.plannedFinalMl} mL)
              {l.dilution?.series ? (
                <span>
                  {' '}
                  · series{' '}
                  <Link to={`/series/${encodeURIComponent(l.dilution.series.identifier)}`} data-testid="lineage-series" className="num font-semibold text-brass-600 underline">
                    {l.dilution.series.identifier}
                  </Link>
                </span>
              ) : null}
            </>
          ) : (
            <>
              {d.snapshot.material.name}, lot <span className="num">{d.snapshot.material.lot}</span>
            </>
          )}
        </dd>
        <dt className="font-semibold text-ink-soft">Made from it</dt>
        <dd data-testid="lineage-children">
          {children.length ? (
            <ul className="flex flex-wrap gap-x-4 gap-y-1">
              {children.map((c) => (
                <li key={c.id}>
                  <Link to={`/preparations/${encodeURIComponent(c.identifier)}`} className="num font-semibold text-brass-600 underline">
                    {c.identifier}
                  </Link>{' '}
                  ({KIND_LABEL[c.kind] ?? c.kind}, {statusLabel(c.status)})
                </li>
              ))}
            </ul>
          ) : (
            'nothing yet'
          )}
        </dd>
      </dl>

      {canTrace ? (
        trace.isPending ? (
          <p className="text-ink-soft">Loading the genealogy…</p>
        ) : trace.isError ? (
          <p className="text-ink-soft">The genealogy could not be loaded: {trace.error.message}</p>
        ) : (
          <>
            <GraphLegend graph={mergeGraphs(trace.data.backward, trace.data.forward)} />
            <LineageGraph backward={trace.data.backward} forward={trace.data.forward} subjectId={subjectNodeId(trace.data)} testId="detail-lineage-graph" />
            <div className="grid gap-4 md:grid-cols-2">
              <div>
                <h3 className="mb-2 font-bold">Made from (as a list)</h3>
                {subjectNodeId(trace.data) ? <LineageList graph={trace.data.backward} subjectId={subjectNodeId(trace.data)!} direction="backward" testId="detail-lineage-backward" /> : null}
              </div>
              <div>
                <h3 className="mb-2 font-bold">Used in (as a list)</h3>
                {subjectNodeId(trace.data) ? <LineageList graph={trace.data.forward} subjectId={subjectNodeId(trace.data)!} direction="forward" testId="detail-lineage-forward" /> : null}
              </div>
            </div>
            <p>
              <Link to={`/trace?id=${encodeURIComponent(d.identifier)}`} className="font-semibold text-brass-600 underline" data-testid="open-trace">
                Open in Trace
              </Link>
            </p>
          </>
        )
      ) : null}
    </div>
  );
}
