/**
 * Trace (REQUIREMENTS W1 backward, W2 forward, TR-04): scan or type any identifier (a preparation, a
 * reference-material lot, a balance, a piece of volumetric ware or a solvent lot), see what it was made from
 * and what was made from it, limit the forward set by lab dates, download the report, and (QA) flag
 * everything it reached for review with a reason.
 */
import { useEffect, useRef, useState, type FormEvent } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link, useSearchParams } from 'react-router';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { useAuth } from '../auth/use-auth.ts';
import { forwardReportUrl, reportUrl, traceQueries, useFlagForReview, type TraceRange } from './api/trace-api.ts';
import { GraphLegend, LineageGraph, LineageList, mergeGraphs, nodeLook } from './components/lineage-graph.tsx';
import { subjectNodeId, type ReviewFlagsCreated, type TraceResponse } from './types.ts';
import { ISO_DATE_INPUT } from '../../lib/format.ts';

type View = 'backward' | 'forward';

function FlagForReview({ trace, range }: { trace: TraceResponse; range: TraceRange }) {
  const flag = useFlagForReview(trace.subject.identifier);
  const [reason, setReason] = useState('');
  const [confirming, setConfirming] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<ReviewFlagsCreated | null>(null);
  const targets = trace.forwardPreparations ?? [];

  const ask = (e: FormEvent) => {
    e.preventDefault();
    setDone(null);
    if (reason.trim().length < 3) {
      setError('Say why these records need review (at least 3 characters).');
      return;
    }
    setError(null);
    setConfirming(true);
  };

  const confirm = () =>
    flag.mutate(
      { reason: reason.trim(), ...(range.from ? { from: range.from } : {}), ...(range.to ? { to: range.to } : {}) },
      {
        onSuccess: (r) => {
          setDone(r as ReviewFlagsCreated);
          setConfirming(false);
          setReason('');
        },
        onError: (err) => {
          setConfirming(false);
          setError((err as { fields?: Record<string, string> }).fields?.reason ?? err.message);
        },
      },
    );

  return (
    <Panel title="Flag all for review" id="trace-flag">
      <form onSubmit={ask} className="flex flex-col gap-3" noValidate>
        <p className="text-ink-soft">
          Marks every preparation in the forward trace{range.from || range.to ? ' within the dates above' : ''} as needing review ({targets.length}{' '}
          {targets.length === 1 ? 'record' : 'records'}). Each record shows the flag and the reason until it is cleared.
        </p>
        <div>
          <label htmlFor="flag-reason" className="mb-1 block text-sm font-semibold">
            Reason (required)
          </label>
          <textarea
            id="flag-reason"
            data-testid="flag-reason"
            value={reason}
            onChange={(e) => setReason(e.target.value)}
            rows={2}
            aria-invalid={error ? true : undefined}
            aria-describedby={error ? 'flag-reason-error' : undefined}
            className="field-input"
            placeholder="e.g. producer recall notice for this lot, deviation D-123"
          />
          {error ? (
            <p id="flag-reason-error" role="alert" className="mt-1 text-sm font-semibold text-bad-700">
              {error}
            </p>
          ) : null}
        </div>
        {!confirming ? (
          <div>
            <Button type="submit" variant="danger" data-testid="flag-start" disabled={targets.length === 0}>
              Flag all for review…
            </Button>
          </div>
        ) : (
          <div role="alertdialog" aria-labelledby="flag-confirm-title" className="rounded-lg border-2 border-l-8 border-bad-700 bg-bad-50 p-4" data-testid="flag-confirm">
            <p id="flag-confirm-title" className="font-bold text-bad-700">
              Flag {targets.length} {targets.length === 1 ? 'record' : 'records'} for review?
            </p>
            <p className="num mt-1 text-sm">{targets.join(', ')}</p>
            <p className="mt-1">Reason: {reason.trim()}</p>
            <div className="mt-3 flex flex-wrap gap-3">
              <Button variant="danger" busy={flag.isPending} onClick={confirm} data-testid="flag-confirm-yes">
                Yes, flag them
              </Button>
              <Button variant="secondary" onClick={() => setConfirming(false)} data-testid="flag-confirm-no">
                Cancel
              </Button>
            </div>
          </div>
        )}
        {done ? (
          <Banner tone="ok" title={`${done.flagged} ${done.flagged === 1 ? 'record' : 'records'} flagged for review`} testId="flag-done">
            <span className="num">{done.identifiers.join(', ')}</span>
          </Banner>
        ) : null}
      </form>
    </Panel>
  );
}

function TraceResult({ trace, range, view, setView }: { trace: TraceResponse; range: TraceRange; view: View; setView: (v: View) => void }) {
  const auth = useAuth();
  const isQa = auth.status === 'signed-in' && auth.user.role === 'qa';
  const subjectId = subjectNodeId(trace);
  const graph = view === 'backward' ? trace.backward : trace.forward;
  const empty = { nodes: [], edges: [] };
  const isPreparation = trace.subject.type === 'preparation';
  const subjectNode = mergeGraphs(trace.backward, trace.forward).nodes.find((n) => n.id === subjectId);
  const forwardPreps = trace.forwardPreparations ?? [];

  return (
    <div className="flex flex-col gap-6">
      <Panel>
        <div className="flex flex-wrap items-baseline justify-between gap-3">
          <h2 className="text-xl font-bold">
            <span className="text-base font-semibold text-ink-soft">{subjectNode ? nodeLook(subjectNode).label : trace.subject.type.replace(/_/g, ' ')}: </span>
            <span className="num" data-testid="trace-subject">
              {trace.subject.identifier}
            </span>
            {trace.subject.label && trace.subject.label !== trace.subject.identifier ? <span className="font-normal"> — {trace.subject.label}</span> : null}
          </h2>
          {isPreparation ? (
            <p className="flex flex-wrap gap-3">
              <a href={reportUrl(trace.subject.identifier, 'pdf', range)} className="font-semibold text-brass-600 underline" data-testid="trace-report-pdf">
                Traceability report (PDF)
              </a>
              <a href={reportUrl(trace.subject.identifier, 'csv', range)} className="font-semibold text-brass-600 underline" data-testid="trace-report-csv">
                Report as CSV
              </a>
            </p>
          ) : (
            <p className="text-sm text-ink-soft">The traceability report is made for a preparation; open one below.</p>
          )}
        </div>
        {trace.range && (trace.range.from || trace.range.to) ? (
          <p className="mt-2 text-ink-soft">
            Forward trace limited to uses from {trace.range.from ?? 'the start'} to {trace.range.to ?? 'today'} (lab dates).
          </p>
        ) : null}
        <div className="mt-4">
          <div className="mb-2 flex flex-wrap items-baseline justify-between gap-3">
            <h3 className="font-bold">Preparations made from it ({forwardPreps.length})</h3>
            <p className="flex flex-wrap gap-3">
              <a href={forwardReportUrl(trace.subject.identifier, 'pdf', range)} className="inline-flex min-h-12 items-center font-semibold text-brass-600 underline" data-testid="trace-forward-report-pdf">
                Forward report for a recall (PDF)
              </a>
              <a href={forwardReportUrl(trace.subject.identifier, 'csv', range)} className="inline-flex min-h-12 items-center font-semibold text-brass-600 underline" data-testid="trace-forward-report-csv">
                Forward report as CSV
              </a>
            </p>
          </div>
          {forwardPreps.length ? (
            <ul className="flex flex-wrap gap-2" data-testid="trace-forward-preparations">
              {forwardPreps.map((id) => (
                <li key={id}>
                  <Link to={`/preparations/${encodeURIComponent(id)}`} className="num inline-flex min-h-12 items-center rounded-lg border-2 border-line px-3 font-semibold hover:bg-slate-100">
                    {id}
                  </Link>
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-ink-soft" data-testid="trace-forward-preparations">
              None{range.from || range.to ? ' in these dates' : ''}.
            </p>
          )}
        </div>
      </Panel>

      <Panel>
        <div role="tablist" aria-label="Direction" className="mb-4 flex flex-wrap gap-2">
          {(
            [
              ['backward', `Backward: made from (${Math.max(0, trace.backward.nodes.length - 1)})`],
              ['forward', `Forward: used in (${forwardPreps.length})`], // the preparations listed above; label prints are shown, not counted
            ] as const
          ).map(([v, label]) => (
            <button
              key={v}
              type="button"
              role="tab"
              aria-selected={view === v}
              data-testid={`trace-view-${v}`}
              onClick={() => setView(v)}
              className={`min-h-12 rounded-lg border-2 px-4 font-semibold ${view === v ? 'border-slate-700 bg-slate-700 text-white' : 'border-line bg-card hover:bg-slate-100'}`}
            >
              {label}
            </button>
          ))}
        </div>
        <div className="flex flex-col gap-3" role="tabpanel">
          <GraphLegend graph={graph} />
          <LineageGraph
            backward={view === 'backward' ? trace.backward : empty}
            forward={view === 'forward' ? trace.forward : empty}
            subjectId={subjectId}
            testId={`trace-graph-${view}`}
          />
          <h3 className="mt-2 font-bold">{view === 'backward' ? 'Made from (as a list)' : 'Used in (as a list)'}</h3>
          {subjectId ? <LineageList graph={graph} subjectId={subjectId} direction={view} testId={`trace-list-${view}`} /> : <p>The subject is not in the graph.</p>}
        </div>
      </Panel>

      {isQa ? <FlagForReview trace={trace} range={range} /> : null}
    </div>
  );
}

export function TracePage() {
  const [params, setParams] = useSearchParams();
  const identifier = (params.get('id') ?? '').trim();
  const from = params.get('from') ?? '';
  const to = params.get('to') ?? '';
  const view: View = params.get('view') === 'forward' ? 'forward' : 'backward';
  const [text, setText] = useState(identifier);
  const [dates, setDates] = useState({ from, to });
  const input = useRef<HTMLInputElement>(null);
  const range: TraceRange = { ...(from ? { from } : {}), ...(to ? { to } : {}) };
  const trace = useQuery(traceQueries.detail(identifier, range));

  useEffect(() => setText(identifier), [identifier]);
  useEffect(() => input.current?.focus(), []);

  const update = (next: Record<string, string>) => {
    const p = new URLSearchParams(params);
    for (const [k, v] of Object.entries(next)) {
      if (v) p.set(k, v);
      else p.delete(k);
    }
    setParams(p);
  };

  const submit = (e: FormEvent) => {
    e.preventDefault();
    update({ id: text.trim(), from: dates.from, to: dates.to });
  };

  const fieldErrors = trace.error?.fields ?? {};

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Trace">
        <p>Scan or type a preparation, a reference-material lot, a balance, a flask or pipette, or a solvent lot, then press Enter.</p>
      </PageHeader>

      <form onSubmit={submit} className="flex flex-col gap-4 rounded-xl border-2 border-line bg-card p-5" role="search">
        <div>
          <label htmlFor="trace-search" className="mb-1 block text-lg font-semibold">
            Identifier
          </label>
          <div className="flex flex-wrap gap-3">
            <input
              id="trace-search"
              ref={input}
              data-testid="trace-search"
              value={text}
              onChange={(e) => setText(e.target.value)}
              autoComplete="off"
              spellCheck={false}
              placeholder="HWL-2026-0001 or NRM-24-0931"
              className="field-input num min-w-0 flex-1 text-2xl"
            />
            <Button type="submit" data-testid="trace-submit" className="min-h-14 px-8 text-lg">
              Trace
            </Button>
          </div>
        </div>
        <fieldset className="flex flex-wrap items-end gap-4">
          <legend className="mb-1 text-sm font-semibold">Forward trace: uses between (lab dates, both included)</legend>
          <div>
            <label htmlFor="trace-from" className="mb-1 block text-sm font-semibold">
              From
            </label>
            <input
              id="trace-from"
              {...ISO_DATE_INPUT}
              data-testid="trace-from"
              value={dates.from}
              onChange={(e) => setDates((d) => ({ ...d, from: e.target.value }))}
              aria-invalid={fieldErrors.from ? true : undefined}
              className="field-input num"
            />
            {fieldErrors.from ? <p className="mt-1 text-sm font-semibold text-bad-700">{fieldErrors.from}</p> : null}
          </div>
          <div>
            <label htmlFor="trace-to" className="mb-1 block text-sm font-semibold">
              To
            </label>
            <input
              id="trace-to"
              {...ISO_DATE_INPUT}
              data-testid="trace-to"
              value={dates.to}
              onChange={(e) => setDates((d) => ({ ...d, to: e.target.value }))}
              aria-invalid={fieldErrors.to ? true : undefined}
              className="field-input num"
            />
            {fieldErrors.to ? <p className="mt-1 text-sm font-semibold text-bad-700">{fieldErrors.to}</p> : null}
          </div>
          {from || to ? (
            <Button
              variant="secondary"
              onClick={() => {
                setDates({ from: '', to: '' });
                update({ from: '', to: '' });
              }}
            >
              Clear dates
            </Button>
          ) : null}
        </fieldset>
      </form>

      {!identifier ? null : trace.isPending ? (
        <Spinner label={`Tracing ${identifier}…`} />
      ) : trace.isError ? (
        <Banner title={trace.error.status === 404 ? `Nothing is recorded under ${identifier}` : 'The trace could not be made'} testId="trace-error">
          {trace.error.message}
        </Banner>
      ) : (
        <TraceResult trace={trace.data} range={range} view={view} setView={(v) => update({ view: v === 'forward' ? 'forward' : '' })} />
      )}
    </div>
  );
}
