import type { ReactNode } from 'react';

export type DetailRow = { label: string; value: ReactNode; numeric?: boolean; testId?: string };

/** Every field of a record, label above value, in two or three columns as the width allows. */
export function DetailList({ rows }: { rows: DetailRow[] }) {
  return (
    <dl className="grid gap-x-6 gap-y-4 sm:grid-cols-2 xl:grid-cols-3">
      {rows.map((r) => (
        <div key={r.label} className="min-w-0">
          <dt className="text-sm font-semibold text-ink-soft">{r.label}</dt>
          <dd className={`mt-0.5 text-lg [overflow-wrap:anywhere] ${r.numeric ? 'num' : ''}`} data-testid={r.testId}>
            {r.value === null || r.value === undefined || r.value === '' ? <span className="text-ink-soft">—</span> : r.value}
          </dd>
        </div>
      ))}
    </dl>
  );
}

/** A value with its unit, the value exactly as sent. */
export function withUnit(value: string | null | undefined, unit: string): ReactNode {
  if (value === null || value === undefined || value === '') return null;
  return (
    <>
      {value} <span className="font-sans text-base text-ink-soft">{unit}</span>
    </>
  );
}
