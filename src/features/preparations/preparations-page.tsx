import { useState, type FormEvent } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link, useNavigate, useSearchParams } from 'react-router';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Spinner } from '../../components/ui/feedback.tsx';
import { useDebouncedValue } from '../../hooks/use-debounced-value.ts';
import { useAuth } from '../auth/use-auth.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { preparationQueries } from './api/preparation-queries.ts';
import { StageBadge } from './components/stage-badge.tsx';
import { formatLabTime, isPreparationIdentifier, qty, statusLabel } from './format.ts';
import { PREPARATION_STATUSES } from '../../../shared/schemas/preparations.ts';
import { StatusBadge } from '../signatures/components/status-badge.tsx';

type Tab = 'mine' | 'today' | 'all';
const TABS: { value: Tab; label: string }[] = [
  { value: 'mine', label: 'Mine' },
  { value: 'today', label: 'Today' },
  { value: 'all', label: 'All' },
];
const PAGE_SIZE = 25;

/** The bench list: my work, today's work or everything; a scanned identifier + Enter opens the record. */
export function PreparationsPage() {
  const auth = useAuth();
  const navigate = useNavigate();
  const [params, setParams] = useSearchParams();
  const tab = (params.get('tab') as Tab | null) ?? 'mine';
  const status = params.get('status') ?? '';
  const page = Math.max(1, Number(params.get('page') ?? '1') || 1);
  const [search, setSearch] = useState(params.get('search') ?? '');
  const searchDebounced = useDebouncedValue(search.trim(), 250);
  const settings = useQuery(settingsQueries.detail());
  const tz = settings.data?.timeZone;

  const list = useQuery(
    preparationQueries.list({
      mine: tab === 'mine',
      today: tab === 'today',
      status: status || undefined,
      search: searchDebounced || undefined,
      page,
      pageSize: PAGE_SIZE,
    }),
  );

  const update = (next: Record<string, string | null>) => {
    const p = new URLSearchParams(params);
    for (const [k, v] of Object.entries(next)) {
      if (v === null || v === '') p.delete(k);
      else p.set(k, v);
    }
    if (!('page' in next)) p.delete('page');
    setParams(p, { replace: true });
  };

  const onSearch = (e: FormEvent) => {
    e.preventDefault();
    const text = search.trim();
    if (isPreparationIdentifier(text)) {
      navigate(`/preparations/${encodeURIComponent(text.toUpperCase())}`);
      return;
    }
    update({ search: text || null });
  };

  const canPlan = auth.status === 'signed-in' && auth.user.role === 'chemist';
  const total = list.data?.total ?? 0;
  const pages = Math.max(1, Math.ceil(total / (list.data?.pageSize ?? PAGE_SIZE)));

  return (
    <div className="flex flex-col gap-5">
      <PageHeader title="Preparations">Scan or type an identifier and press Enter to open a record; anything else filters the list.</PageHeader>

      <form role="search" onSubmit={onSearch} className="flex flex-col gap-3 sm:flex-row" aria-label="Find a preparation">
        <label htmlFor="prep-search" className="sr-only">
          Identifier, material or analyte
        </label>
        <input
          id="prep-search"
          data-testid="prep-search"
          // A scanner types into the focused field, so the box takes focus on arrival.
          // eslint-disable-next-line jsx-a11y/no-autofocus
          autoFocus
          type="search"
          autoComplete="off"
          spellCheck={false}
          value={search}
          onChange={(e) => setSearch(e.target.value)}
          placeholder="HWL-2026-0042, lead, Pb…"
          className="field-input num min-h-16 flex-1 text-2xl"
        />
        <Button type="submit" className="min-h-16 px-8 text-lg" data-testid="prep-search-go">
          Open / search
        </Button>
        {canPlan ? (
          <Link
            to="/preparations/new"
            data-testid="plan-new"
            className="inline-flex min-h-16 items-center justify-center rounded-lg border-2 border-brass-600 bg-brass-100 px-6 text-lg font-semibold hover:bg-brass-400/40"
          >
            Plan a standard
          </Link>
        ) : null}
      </form>

      <div className="flex flex-wrap items-end gap-4">
        <div role="tablist" aria-label="Which preparations" className="flex gap-2">
          {TABS.map((t) => (
            <button
              key={t.value}
              type="button"
              role="tab"
              aria-selected={tab === t.value}
              data-testid={`tab-${t.value}`}
              onClick={() => update({ tab: t.value === 'mine' ? null : t.value })}
              className={`min-h-12 min-w-24 rounded-lg border-2 px-5 text-lg font-semibold ${
                tab === t.value ? 'border-slate-700 bg-slate-700 text-white' : 'border-line bg-card text-ink hover:border-slate-700'
              }`}
            >
              {t.label}
            </button>
          ))}
        </div>
        <div>
          <label htmlFor="prep-status" className="mb-1 block text-sm font-semibold">
            Status
          </label>
          <select id="prep-status" data-testid="prep-status" value={status} onChange={(e) => update({ status: e.target.value })} className="field-input min-w-56">
            <option value="">Any status</option>
            {PREPARATION_STATUSES.map((s) => (
              <option key={s} value={s}>
                {statusLabel(s)}
              </option>
            ))}
          </select>
        </div>
        {list.data ? (
          <p className="ml-auto text-ink-soft" data-testid="prep-count">
            {total} preparation{total === 1 ? '' : 's'}
            {tz ? ` · times in ${tz}` : ''}
          </p>
        ) : null}
      </div>

      {list.isPending ? (
        <Spinner label="Loading preparations…" />
      ) : list.isError ? (
        <Banner title="The list could not be loaded">{list.error.message}</Banner>
      ) : list.data.items.length === 0 ? (
        <p data-testid="prep-empty" className="rounded-xl border-2 border-dashed border-line bg-card px-5 py-8 text-center text-lg text-ink-soft">
          No preparations match.{canPlan ? ' Plan a standard to start one.' : ''}
        </p>
      ) : (
        <ul className="flex flex-col gap-3" data-testid="prep-list" aria-label="Preparations">
          {list.data.items.map((p) => (
            <li key={p.id}>
              <Link
                to={`/preparations/${encodeURIComponent(p.identifier)}`}
                data-testid="prep-row"
                className="grid min-h-16 gap-x-6 gap-y-1 rounded-xl border-2 border-line bg-card px-5 py-3 hover:border-slate-700 md:grid-cols-[minmax(0,11rem)_minmax(0,1fr)_auto]"
              >
                <span className="flex flex-col">
                  <span className="num text-xl font-bold" data-testid="prep-row-id">
                    {p.identifier}
                  </span>
                  <span className="mt-1 flex flex-wrap gap-1.5">
                    <StageBadge stage={p.stage} />
                    <StatusBadge status={p.status} testId="prep-row-status" />
                  </span>
                </span>
                <span className="min-w-0">
                  <span className="block truncate text-lg font-semibold">
                    {p.materialName} <span className="font-normal text-ink-soft">as</span> <span className="num">{p.analyteFormula}</span>
                  </span>
                  <span className="block text-ink-soft">
                    Target <span className="num text-ink">{qty(p.target)}</span> in <span className="num text-ink">{qty(p.volume)}</span>
                  </span>
                  {p.concentrationDisplay ? (
                    <span className="num block font-semibold" data-testid="prep-row-conc">
                      {p.concentrationDisplay}
                    </span>
                  ) : null}
                </span>
                <span className="text-left text-sm text-ink-soft md:text-right">
                  <span className="block font-semibold text-ink">{p.createdBy.fullName}</span>
                  <span className="block">{formatLabTime(p.createdAt, tz)}</span>
                  {p.expiresOn ? <span className="block">expires {p.expiresOn}</span> : null}
                </span>
              </Link>
            </li>
          ))}
        </ul>
      )}

      {pages > 1 ? (
        <nav aria-label="Pages" className="flex items-center justify-center gap-3">
          <Button variant="secondary" disabled={page <= 1} onClick={() => update({ page: String(page - 1) })}>
            Previous
          </Button>
          <span className="num">
            {page} / {pages}
          </span>
          <Button variant="secondary" disabled={page >= pages} onClick={() => update({ page: String(page + 1) })}>
            Next
          </Button>
        </nav>
      ) : null}
    </div>
  );
}
