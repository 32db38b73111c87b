import { useQuery } from '@tanstack/react-query';
import type { FormEvent } from 'react';
import { AUDIT_ACTION_LABELS, AUDIT_ENTITY_LABELS } from '../../../../shared/schemas/audit.ts';
import { Button } from '../../../components/ui/button.tsx';
import { auditQueries } from '../api/audit-queries.ts';
import { ISO_DATE_INPUT } from '../../../lib/format.ts';

export const FILTER_KEYS = ['entity', 'entityId', 'actorId', 'action', 'from', 'to', 'search'] as const;
export type FilterKey = (typeof FILTER_KEYS)[number];

const label = 'mb-1 block text-sm font-semibold';

function ErrorText({ id, text }: { id: string; text?: string }) {
  return text ? (
    <p id={id} role="alert" className="mt-1 text-sm font-semibold text-bad-700">
      {text}
    </p>
  ) : null;
}

/**
 * Filters live in the URL (shareable, and the CSV link uses the same query). Submitting replaces them
 * and goes back to page 1. `errors` are the server's field messages for a refused filter.
 */
export function AuditFilters({
  values,
  errors,
  onApply,
}: {
  values: Partial<Record<FilterKey, string>>;
  errors: Record<string, string>;
  onApply: (next: Partial<Record<FilterKey, string>>) => void;
}) {
  const actors = useQuery(auditQueries.actors());

  const submit = (e: FormEvent<HTMLFormElement>) => {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    const next: Partial<Record<FilterKey, string>> = {};
    for (const key of FILTER_KEYS) {
      const v = String(data.get(key) ?? '').trim();
      if (v) next[key] = v;
    }
    onApply(next);
  };

  const input = (key: FilterKey) => ({
    id: `audit-${key}`,
    name: key,
    defaultValue: values[key] ?? '',
    'aria-invalid': errors[key] ? true : undefined,
    'aria-describedby': errors[key] ? `audit-${key}-error` : undefined,
    className: 'field-input',
  });

  return (
    // key: a new URL resets the uncontrolled inputs to it (back/forward buttons).
    <form key={JSON.stringify(values)} onSubmit={submit} aria-label="Audit trail filters" className="flex flex-col gap-4" data-testid="audit-filters">
      <div className="grid gap-4 sm:grid-cols-2 xl:grid-cols-4">
        <div>
          <label htmlFor="audit-entity" className={label}>Record type</label>
          <select {...input('entity')}>
            <option value="">Any record type</option>
            {Object.entries(AUDIT_ENTITY_LABELS).map(([value, text]) => (
              <option key={value} value={value}>{text}</option>
            ))}
          </select>
          <ErrorText id="audit-entity-error" text={errors.entity} />
        </div>
        <div>
          <label htmlFor="audit-entityId" className={label}>Record ID</label>
          <input {...input('entityId')} type="text" autoComplete="off" spellCheck={false} placeholder="e.g. HWL-…" />
          <ErrorText id="audit-entityId-error" text={errors.entityId} />
        </div>
        <div>
          <label htmlFor="audit-actorId" className={label}>User</label>
          <select {...input('actorId')}>
            <option value="">Anyone</option>
            {(actors.data ?? []).map((a) => (
              <option key={a.id} value={String(a.id)}>{a.name} (#{a.id})</option>
            ))}
            {values.actorId && !(actors.data ?? []).some((a) => String(a.id) === values.actorId) ? (
              <option value={values.actorId}>User #{values.actorId}</option>
            ) : null}
          </select>
          <ErrorText id="audit-actorId-error" text={errors.actorId} />
        </div>
        <div>
          <label htmlFor="audit-action" className={label}>Action</label>
          <select {...input('action')}>
            <option value="">Any action</option>
            {Object.entries(AUDIT_ACTION_LABELS).map(([value, text]) => (
              <option key={value} value={value}>{text}</option>
            ))}
          </select>
          <ErrorText id="audit-action-error" text={errors.action} />
        </div>
        <div>
          <label htmlFor="audit-from" className={label}>From (lab day, YYYY-MM-DD)</label>
          <input {...input('from')} {...ISO_DATE_INPUT} />
          <ErrorText id="audit-from-error" text={errors.from} />
        </div>
        <div>
          <label htmlFor="audit-to" className={label}>To (lab day, included)</label>
          <input {...input('to')} {...ISO_DATE_INPUT} />
          <ErrorText id="audit-to-error" text={errors.to} />
        </div>
        <div className="sm:col-span-2">
          <label htmlFor="audit-search" className={label}>Search names, values and reasons</label>
          <input {...input('search')} type="search" autoComplete="off" spellCheck={false} />
          <ErrorText id="audit-search-error" text={errors.search} />
        </div>
      </div>
      <div className="flex flex-wrap gap-3">
        <Button type="submit" data-testid="audit-apply">Show entries</Button>
        <Button variant="secondary" onClick={() => onApply({})} data-testid="audit-clear">Clear filters</Button>
      </div>
    </form>
  );
}
