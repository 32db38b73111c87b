/**
 * Calibration series, newest first (issue: "N levels from one parent … a printed series sheet lists them").
 * Any signed-in role. Filter by parent (identifier or scan); a series identifier typed or scanned opens it.
 */
import { useState, type FormEvent } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Spinner } from '../../components/ui/feedback.tsx';
import type { ApiError } from '../../lib/api-client.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { formatLabTime } from '../preparations/format.ts';
import { seriesQueries, seriesUrls } from './api/series-api.ts';
import { isSeriesIdentifier, statusCounts, targetRange, verifiedProgress } from './format.ts';

const PAGE_SIZE = 25;

export function SeriesListPage() {
  const navigate = useNavigate();
  const [params, setParams] = useSearchParams();
  const parent = params.get('parent') ?? '';
  const page = Math.max(1, Number(params.get('page') ?? '1') || 1);
  const [text, setText] = useState(parent);
  const settings = useQuery(settingsQueries.detail());
  const tz = settings.data?.timeZone;
  const list = useQuery(seriesQueries.list({ parent: parent || undefined, page, pageSize: PAGE_SIZE }));
  const err = list.error as ApiError | null;
  const parentError = err?.fields?.parent;

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const v = text.trim().toUpperCase();
    if (isSeriesIdentifier(v)) {
      navigate(seriesUrls.page(v));
      return;
    }
    const p = new URLSearchParams(params);
    if (v) p.set('parent', v);
    else p.delete('parent');
    p.delete('page');
    setParams(p, { replace: true });
  };

  const total = list.data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / (list.data?.pageSize ?? PAGE_SIZE)));
  const goPage = (n: number) => {
    const p = new URLSearchParams(params);
    if (n > 1) p.set('page', String(n));
    else p.delete('page');
    setParams(p, { replace: true });
  };

  return (
    <div className="flex flex-col gap-5">
      <PageHeader title="Calibration series">
        Each series is a set of levels diluted from one verified parent; every level is its own record. Scan a series identifier to open it, or a parent's
        identifier to see the series made from it.
      </PageHeader>

      <form role="search" onSubmit={onSubmit} className="flex flex-col gap-3 sm:flex-row sm:items-start" aria-label="Find a series">
        <div className="flex-1">
          <label htmlFor="series-filter" className="mb-1 block text-sm font-semibold">
            Series or parent identifier
          </label>
          <input
            id="series-filter"
            data-testid="series-filter"
            type="search"
            autoComplete="off"
            spellCheck={false}
            value={text}
            onChange={(e) => setText(e.target.value)}
            placeholder="HWL-2026-S001 or HWL-2026-0001"
            aria-invalid={parentError ? true : undefined}
            aria-describedby={parentError ? 'series-filter-error' : undefined}
            className="field-input num min-h-14 text-xl"
          />
          {parentError ? (
            <p id="series-filter-error" role="alert" className="mt-1 text-sm font-semibold text-bad-700">
              {parentError}
            </p>
          ) : null}
        </div>
        <Button type="submit" className="min-h-14 px-8 text-lg sm:mt-6" data-testid="series-filter-go">
          Open / filter
        </Button>
        {parent ? (
          <Button
            variant="secondary"
            className="min-h-14 sm:mt-6"
            onClick={() => {
              setText('');
              setParams(new URLSearchParams(), { replace: true });
            }}
          >
            Show all
          </Button>
        ) : null}
      </form>

      {list.data ? (
        <p className="text-ink-soft" data-testid="series-count">
          {total} series{parent ? ` made from ${parent}` : ''}
          {tz ? ` · times in ${tz}` : ''}
        </p>
      ) : null}

      {list.isPending ? (
        <Spinner label="Loading the series…" />
      ) : list.isError ? (
        parentError ? null : <Banner title="The list could not be loaded">{list.error.message}</Banner>
      ) : list.data.items.length === 0 ? (
        <p data-testid="series-empty" className="rounded-xl border-2 border-dashed border-line bg-card px-5 py-8 text-center text-lg text-ink-soft">
          {parent ? `No series has been made from ${parent}.` : 'No calibration series yet. A chemist makes one from a verified stock: open the stock and choose "Make a calibration series".'}
        </p>
      ) : (
        <ul className="flex flex-col gap-3" data-testid="series-list" aria-label="Calibration series">
          {list.data.items.map((s) => (
            <li key={s.id}>
              <Link
                to={seriesUrls.page(s.identifier)}
                data-testid="series-row"
                className="grid min-h-16 gap-x-6 gap-y-1 rounded-xl border-2 border-line bg-card px-5 py-3 hover:border-slate-700 md:grid-cols-[minmax(0,12rem)_minmax(0,1fr)_auto]"
              >
                <span className="num text-xl font-bold" data-testid="series-row-id">
                  {s.identifier}
                </span>
                <span className="min-w-0">
                  <span className="block text-lg font-semibold">
                    <span className="num">{s.analyteFormula}</span>, <span className="num">{targetRange(s.levels)}</span>{' '}
                    <span className="font-normal text-ink-soft">
                      · {s.levels.length} levels from <span className="num text-ink">{s.parent.identifier}</span>
                    </span>
                  </span>
                  <span className="block text-ink-soft" data-testid="series-row-status">
                    {verifiedProgress(s.levels)} · {statusCounts(s.levels)}
                  </span>
                </span>
                <span className="text-left text-sm text-ink-soft md:text-right">
                  <span className="block font-semibold text-ink">{s.createdBy.fullName}</span>
                  <span className="block">{formatLabTime(s.createdAt, tz)}</span>
                </span>
              </Link>
            </li>
          ))}
        </ul>
      )}

      {pages > 1 ? (
        <nav aria-label="Pages" className="flex items-center justify-center gap-3">
          <Button variant="secondary" disabled={page <= 1} onClick={() => goPage(page - 1)}>
            Previous
          </Button>
          <span className="num">
            Page {page} of {pages}
          </span>
          <Button variant="secondary" disabled={page >= pages} onClick={() => goPage(page + 1)}>
            Next
          </Button>
        </nav>
      ) : null}
    </div>
  );
}
