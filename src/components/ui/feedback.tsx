import type { ReactNode } from 'react';

export function Banner({ tone = 'error', title, children, testId }: { tone?: 'error' | 'ok' | 'info'; title?: ReactNode; children?: ReactNode; testId?: string }) {
  const tones = {
    error: 'border-bad-700 bg-bad-50 text-bad-700',
    ok: 'border-ok-700 bg-ok-50 text-ok-700',
    info: 'border-slate-700 bg-slate-100 text-ink',
  } as const;
  return (
    <div role={tone === 'error' ? 'alert' : 'status'} data-testid={testId} className={`rounded-lg border-l-8 border-2 px-4 py-3 ${tones[tone]}`}>
      {title ? <p className="font-bold">{title}</p> : null}
      {children ? <div className="text-base">{children}</div> : null}
    </div>
  );
}

export function CautionBox({ children }: { children: ReactNode }) {
  return (
    <aside
      aria-label="Caution"
      className="rounded-lg border-2 border-l-8 border-caution-700 bg-caution-50 px-4 py-3 text-caution-700"
    >
      <p className="flex items-center gap-2 font-bold">
        <svg aria-hidden="true" viewBox="0 0 24 24" className="size-5 fill-current">
          <path d="M12 2 1 21h22L12 2zm0 5.5 7.5 12.5h-15L12 7.5zM11 10v5h2v-5h-2zm0 6v2h2v-2h-2z" />
        </svg>
        Caution
      </p>
      <div className="mt-1 text-[0.95rem] text-ink">{children}</div>
    </aside>
  );
}

export function Spinner({ label = 'Loading…' }: { label?: string }) {
  return (
    <div role="status" className="flex min-h-40 items-center justify-center gap-3 text-ink-soft">
      <span aria-hidden="true" className="size-6 animate-spin rounded-full border-4 border-slate-700 border-t-transparent" />
      {label}
    </div>
  );
}

export function PageHeader({ title, children }: { title: ReactNode; children?: ReactNode }) {
  return (
    <header className="mb-6">
      <h1 className="text-3xl font-bold tracking-tight">{title}</h1>
      {children ? <div className="mt-2 max-w-3xl text-ink-soft">{children}</div> : null}
    </header>
  );
}

export function Panel({ title, children, className = '', id }: { title?: ReactNode; children: ReactNode; className?: string; id?: string }) {
  return (
    <section aria-labelledby={title && id ? `${id}-title` : undefined} className={`rounded-xl border-2 border-line bg-card p-5 ${className}`}>
      {title ? (
        <h2 id={id ? `${id}-title` : undefined} className="mb-4 text-xl font-bold">
          {title}
        </h2>
      ) : null}
      {children}
    </section>
  );
}
