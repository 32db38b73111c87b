/**
 * The list view's state lives in the address bar (`?search&status&grade|kind|usable&sort&dir&page&pageSize`),
 * so a filtered view can be bookmarked or sent to a colleague. The same names go to the API unchanged.
 */
export const PAGE_SIZES = [10, 25, 50, 100, 200] as const;
export const DEFAULT_PAGE_SIZE = 25;

export type SortDir = 'asc' | 'desc';

export interface ListParams {
  search: string;
  status: string;
  /** the register's one extra filter (grade / kind / usable); '' when off */
  extra: string;
  sort: string;
  dir: SortDir;
  page: number;
  pageSize: number;
}

export interface ListDefaults {
  /** query name of the extra filter, e.g. "grade"; undefined when the register has none */
  extraParam?: string;
  sort: string;
  dir?: SortDir;
  /** sort keys the server accepts; anything else in the URL falls back to the default */
  sortKeys: readonly string[];
}

function positiveInt(raw: string | null, fallback: number): number {
  if (raw === null || !/^\d{1,6}$/.test(raw)) return fallback;
  const n = Number(raw);
  return n >= 1 ? n : fallback;
}

export function readListParams(sp: URLSearchParams, d: ListDefaults): ListParams {
  const sort = sp.get('sort');
  const dir = sp.get('dir');
  const size = positiveInt(sp.get('pageSize'), DEFAULT_PAGE_SIZE);
  return {
    search: sp.get('search') ?? '',
    status: sp.get('status') ?? '',
    extra: d.extraParam ? (sp.get(d.extraParam) ?? '') : '',
    sort: sort && d.sortKeys.includes(sort) ? sort : d.sort,
    dir: dir === 'asc' || dir === 'desc' ? dir : (d.dir ?? 'asc'),
    page: positiveInt(sp.get('page'), 1),
    pageSize: (PAGE_SIZES as readonly number[]).includes(size) ? size : DEFAULT_PAGE_SIZE,
  };
}

/** Address-bar form: defaults are left out so a plain list has a plain URL. */
export function writeListParams(p: ListParams, d: ListDefaults): URLSearchParams {
  const sp = new URLSearchParams();
  if (p.search.trim()) sp.set('search', p.search.trim());
  if (p.status) sp.set('status', p.status);
  if (d.extraParam && p.extra) sp.set(d.extraParam, p.extra);
  if (p.sort !== d.sort || p.dir !== (d.dir ?? 'asc')) {
    sp.set('sort', p.sort);
    sp.set('dir', p.dir);
  }
  if (p.page > 1) sp.set('page', String(p.page));
  if (p.pageSize !== DEFAULT_PAGE_SIZE) sp.set('pageSize', String(p.pageSize));
  return sp;
}

/** API form: every parameter explicit, so the server never has to guess. */
export function apiListQuery(p: ListParams, d: ListDefaults): string {
  const sp = new URLSearchParams();
  if (p.search.trim()) sp.set('search', p.search.trim());
  if (p.status) sp.set('status', p.status);
  if (d.extraParam && p.extra) sp.set(d.extraParam, p.extra);
  sp.set('sort', p.sort);
  sp.set('dir', p.dir);
  sp.set('page', String(p.page));
  sp.set('pageSize', String(p.pageSize));
  return sp.toString();
}
