import type { AuditChange } from '../../../../shared/schemas/audit.ts';
import { fieldLabel, formatValue } from '../format-audit.ts';

/** Field, old value, new value for one entry; values exactly as recorded. */
export function ChangeList({ changes }: { changes: AuditChange[] }) {
  if (changes.length === 0) return <span className="text-ink-soft">—</span>;
  return (
    <dl className="grid grid-cols-[minmax(6rem,auto)_1fr] gap-x-3 gap-y-1 text-sm" data-testid="audit-changes">
      {changes.map((c, i) => (
        <div key={`${c.field}-${i}`} className="contents">
          <dt className="font-semibold [overflow-wrap:anywhere]" title={c.field}>
            {fieldLabel(c.field)}
          </dt>
          <dd className="num [overflow-wrap:anywhere]">
            <span className="text-ink-soft line-through decoration-1" aria-label={`old value ${formatValue(c.oldValue)}`}>
              {formatValue(c.oldValue)}
            </span>
            <span aria-hidden="true" className="mx-1 text-ink-soft">→</span>
            <span className="font-semibold" aria-label={`new value ${formatValue(c.newValue)}`}>
              {formatValue(c.newValue)}
            </span>
          </dd>
        </div>
      ))}
    </dl>
  );
}
