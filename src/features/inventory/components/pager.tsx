import { PAGE_SIZES } from '../list-params.ts';

const btn =
  'inline-flex min-h-12 min-w-12 items-center justify-center rounded-lg border-2 border-slate-700 bg-card px-4 font-semibold hover:bg-slate-100 disabled:cursor-not-allowed disabled:border-line disabled:text-ink-soft disabled:hover:bg-card';

/** Row count, page size and page buttons. Page numbers are 1-based, as in the URL and the API. */
export function Pager({
  page,
  pageSize,
  total,
  onPage,
  onPageSize,
}: {
  page: number;
  pageSize: number;
  total: number;
  onPage: (page: number) => void;
  onPageSize: (size: number) => void;
}) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const first = total === 0 ? 0 : (page - 1) * pageSize + 1;
  const last = Math.min(total, page * pageSize);
  return (
    <nav aria-label="Pages" className="flex flex-wrap items-center justify-between gap-3" data-testid="pager">
      <p className="text-base" aria-live="polite" data-testid="row-count">
        {total === 0 ? (
          'No rows'
        ) : (
          <>
            Rows <span className="num font-semibold">{first}</span>–<span className="num font-semibold">{last}</span> of{' '}
            <span className="num font-semibold">{total}</span>
          </>
        )}
      </p>
      <div className="flex flex-wrap items-center gap-2">
        <label htmlFor="page-size" className="text-sm font-semibold">
          Rows per page
        </label>
        <select
          id="page-size"
          name="pageSize"
          value={pageSize}
          onChange={(e) => onPageSize(Number(e.target.value))}
          className="field-input w-auto min-w-24"
        >
          {PAGE_SIZES.map((n) => (
            <option key={n} value={n}>
              {n}
            </option>
          ))}
        </select>
        <button type="button" className={btn} onClick={() => onPage(1)} disabled={page <= 1} aria-label="First page" data-testid="page-first">
          «
        </button>
        <button type="button" className={btn} onClick={() => onPage(page - 1)} disabled={page <= 1} data-testid="page-prev">
          Previous
        </button>
        <span className="px-2 text-base" data-testid="page-of">
          Page <span className="num font-semibold">{page}</span> of <span className="num font-semibold">{pages}</span>
        </span>
        <button type="button" className={btn} onClick={() => onPage(page + 1)} disabled={page >= pages} data-testid="page-next">
          Next
        </button>
        <button type="button" className={btn} onClick={() => onPage(pages)} disabled={page >= pages} aria-label="Last page" data-testid="page-last">
          »
        </button>
      </div>
    </nav>
  );
}
