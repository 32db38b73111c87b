import type { InputHTMLAttributes, ReactNode, SelectHTMLAttributes } from 'react';
import type { UseFormRegisterReturn } from 'react-hook-form';

/** `target.value` → `target-value`: ids without dots are easy to select in CSS and tests. */
export function fieldId(name: string): string {
  return name.replace(/\./g, '-');
}

type Common = {
  label: ReactNode;
  registration: UseFormRegisterReturn;
  error?: string;
  hint?: ReactNode;
  className?: string;
  suffix?: ReactNode;
};

function Messages({ id, error, hint }: { id: string; error?: string; hint?: ReactNode }) {
  return (
    <>
      {hint ? (
        <p id={`${id}-hint`} className="mt-1 text-sm text-ink-soft">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${id}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700">
          {error}
        </p>
      ) : null}
    </>
  );
}

function describedBy(id: string, error?: string, hint?: ReactNode) {
  const ids = [hint ? `${id}-hint` : null, error ? `${id}-error` : null].filter(Boolean);
  return ids.length ? ids.join(' ') : undefined;
}

export function TextField({
  label,
  registration,
  error,
  hint,
  className = '',
  suffix,
  numeric = false,
  ...input
}: Common & { numeric?: boolean } & Omit<InputHTMLAttributes<HTMLInputElement>, 'name' | 'id'>) {
  const id = fieldId(registration.name);
  return (
    <div className={className}>
      <label htmlFor={id} className="mb-1 block text-sm font-semibold">
        {label}
      </label>
      <div className="flex items-center gap-2">
        <input
          id={id}
          type="text"
          autoComplete="off"
          spellCheck={false}
          {...input}
          {...registration}
          aria-invalid={error ? true : undefined}
          aria-describedby={describedBy(id, error, hint)}
          className={`field-input ${numeric ? 'num' : ''}`}
        />
        {suffix ? <span className="shrink-0 text-base text-ink-soft">{suffix}</span> : null}
      </div>
      <Messages id={id} error={error} hint={hint} />
    </div>
  );
}

export function SelectField({
  label,
  registration,
  error,
  hint,
  className = '',
  options,
  ...select
}: Common & { options: readonly { value: string; label: string }[] } & Omit<
    SelectHTMLAttributes<HTMLSelectElement>,
    'name' | 'id'
  >) {
  const id = fieldId(registration.name);
  return (
    <div className={className}>
      <label htmlFor={id} className="mb-1 block text-sm font-semibold">
        {label}
      </label>
      <select
        id={id}
        {...select}
        {...registration}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(id, error, hint)}
        className="field-input"
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      <Messages id={id} error={error} hint={hint} />
    </div>
  );
}

/** A large checkbox / radio row: the whole row is the touch target. */
export function ChoiceField({
  label,
  registration,
  type = 'checkbox',
  value,
  hint,
}: {
  label: ReactNode;
  registration: UseFormRegisterReturn;
  type?: 'checkbox' | 'radio';
  value?: string;
  hint?: ReactNode;
}) {
  const id = fieldId(registration.name) + (value ? `-${value}` : '');
  return (
    <label
      htmlFor={id}
      className="flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border-2 border-line bg-card px-3 py-2 has-[:checked]:border-slate-700 has-[:checked]:bg-slate-100"
    >
      <input id={id} type={type} value={value} {...registration} className="size-6 shrink-0 accent-slate-700" />
      <span>
        <span className="font-semibold">{label}</span>
        {hint ? <span className="block text-sm text-ink-soft">{hint}</span> : null}
      </span>
    </label>
  );
}
