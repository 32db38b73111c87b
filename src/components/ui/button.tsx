import type { ButtonHTMLAttributes } from 'react';

type Variant = 'primary' | 'secondary' | 'danger' | 'ghost';

const VARIANTS: Record<Variant, string> = {
  primary: 'bg-slate-700 text-white border-slate-700 hover:bg-slate-900 disabled:bg-slate-700/60',
  secondary: 'bg-card text-ink border-slate-700 hover:bg-slate-100',
  danger: 'bg-card text-bad-700 border-bad-700 hover:bg-bad-50',
  ghost: 'bg-transparent text-inherit border-transparent hover:bg-white/10',
};

export type ButtonProps = ButtonHTMLAttributes<HTMLButtonElement> & { variant?: Variant; busy?: boolean };

/** Every button is at least 48 px tall: gloved fingers on a bench tablet. */
export function Button({ variant = 'primary', busy = false, className = '', children, disabled, ...rest }: ButtonProps) {
  return (
    <button
      type="button"
      {...rest}
      disabled={disabled || busy}
      aria-busy={busy || undefined}
      className={`inline-flex min-h-12 items-center justify-center gap-2 rounded-lg border-2 px-5 py-2 text-base font-semibold transition-colors disabled:cursor-not-allowed disabled:opacity-70 ${VARIANTS[variant]} ${className}`}
    >
      {busy ? <span aria-hidden="true" className="size-4 animate-spin rounded-full border-2 border-current border-t-transparent" /> : null}
      {children}
    </button>
  );
}
