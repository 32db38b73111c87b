import type { ReactNode } from 'react';
import { Link } from 'react-router';

/** The row's main name, as a link to its record (a full-height touch target). */
export function RecordLink({ to, children, sub }: { to: string; children: ReactNode; sub?: ReactNode }) {
  return (
    <Link to={to} className="group flex min-h-12 min-w-32 flex-col justify-center font-semibold text-ink" data-testid="record-link">
      <span className="underline decoration-line decoration-2 underline-offset-4 group-hover:decoration-slate-700">{children}</span>
      {sub ? <span className="text-sm font-normal text-ink-soft">{sub}</span> : null}
    </Link>
  );
}

/** A decimal string exactly as the server sent it, or a dash. */
export function Num({ value, unit }: { value: string | null | undefined; unit?: string }) {
  if (value === null || value === undefined || value === '') return <span className="text-ink-soft">—</span>;
  return (
    <span>
      {value}
      {unit ? <span className="ml-1 font-sans text-base text-ink-soft">{unit}</span> : null}
    </span>
  );
}
