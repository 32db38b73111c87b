import { useQuery } from '@tanstack/react-query';
import { useSearchParams } from 'react-router';
import { AUDIT_PAGE_SIZES } from '../../../shared/schemas/audit.ts';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import { ApiError } from '../../lib/api-client.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { auditQueries } from './api/audit-queries.ts';
import { AuditFilters, FILTER_KEYS, type FilterKey } from './components/audit-filters.tsx';
import { AuditTable } from './components/audit-table.tsx';
import { ChainCheck } from './components/chain-check.tsx';

const DEFAULT_PAGE_SIZE = 50;

/** /audit (QA and admin): the whole trail, filtered, paged, exportable, with the chain check. */
export function AuditPage() {
  const [params, setParams] = useSearchParams();
  const settings = useQuery(settingsQueries.detail());
  const timeZone = settings.data?.timeZone ?? 'UTC';

  const filters: Partial<Record<FilterKey, string>> = {};
  for (const key of FILTER_KEYS) {
    const v = params.get(key);
    if (v) filters[key] = v;
  }
  const page = Math.max(1, Number.parseInt(params.get('page') ?? '1', 10) || 1);
  const pageSize = Number(params.get('pageSize')) || DEFAULT_PAGE_SIZE;

  const filterQuery = new URLSearchParams(filters as Record<string, string>).toString();
  const listQuery = new URLSearchParams({ ...(filters as Record<string, string>), page: String(page), pageSize: String(pageSize) }).toString();
  const list = useQuery(auditQueries.list(listQuery));

  const go = (next: Partial<Record<FilterKey, string>>, nextPage = 1, nextSize = pageSize) => {
    const p = new URLSearchParams(next as Record<string, string>);
    if (nextPage > 1) p.set('page', String(nextPage));
    if (nextSize !== DEFAULT_PAGE_SIZE) p.set('pageSize', String(nextSize));
    setParams(p);
  };

  const fieldErrors = list.error instanceof ApiError ? list.error.fields : {};
  const data = list.data;
  const pages = data ? Math.max(1, Math.ceil(data.total / data.pageSize)) : 1;

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Audit trail">
        Every change, sign-in and setting is recorded here by the server, who and when included, and can never be edited or
        deleted. Each entry carries the hash of the one before it, so any change made outside Tarebook shows up when you
        check the chain. Times are shown in the lab time zone, {timeZone}; the stored time is UTC.
      </PageHeader>

      <Panel title="Integrity" id="audit-integrity">
        <ChainCheck />
      </Panel>

      <Panel title="Find entries" id="audit-filter">
        <AuditFilters values={filters} errors={fieldErrors} onApply={(next) => go(next)} />
      </Panel>

      <section aria-labelledby="audit-results-title" className="flex flex-col gap-3">
        <div className="flex flex-wrap items-center justify-between gap-3">
          <h2 id="audit-results-title" className="text-xl font-bold tabular-nums" data-testid="audit-total">
            {data ? `${data.total} ${data.total === 1 ? 'entry' : 'entries'}, newest first` : 'Entries'}
          </h2>
          <a
            href={`/api/audit/export.csv${filterQuery ? `?${filterQuery}` : ''}`}
            download
            data-testid="audit-export"
            className="inline-flex min-h-12 items-center justify-center rounded-lg border-2 border-slate-700 bg-card px-5 py-2 font-semibold text-ink hover:bg-slate-100"
          >
            Export CSV
          </a>
        </div>

        {list.isPending ? <Spinner label="Loading the audit trail…" /> : null}
        {list.isError ? (
          <Banner title="Could not load the audit trail">{list.error.message}</Banner>
        ) : null}
        {data && data.items.length === 0 ? <Banner tone="info">No entries match these filters.</Banner> : null}
        {data && data.items.length > 0 ? (
          <AuditTable entries={data.items} timeZone={timeZone} caption="Audit trail entries, newest first" />
        ) : null}

        {data && data.total > 0 ? (
          <nav aria-label="Pages" className="flex flex-wrap items-center gap-3">
            <Button variant="secondary" disabled={page <= 1} onClick={() => go(filters, page - 1)} data-testid="audit-prev">
              Newer
            </Button>
            <span className="tabular-nums" data-testid="audit-page">
              Page {data.page} of {pages}
            </span>
            <Button variant="secondary" disabled={page >= pages} onClick={() => go(filters, page + 1)} data-testid="audit-next">
              Older
            </Button>
            <label htmlFor="audit-page-size" className="ml-auto text-sm font-semibold">
              Per page
            </label>
            <select
              id="audit-page-size"
              value={String(pageSize)}
              onChange={(e) => go(filters, 1, Number(e.target.value))}
              className="field-input w-28"
            >
              {AUDIT_PAGE_SIZES.map((n) => (
                <option key={n} value={n}>{n}</option>
              ))}
            </select>
          </nav>
        ) : null}
      </section>
    </div>
  );
}
