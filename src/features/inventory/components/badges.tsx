import type { ReactNode } from 'react';
import { calibrationState, expiryState, formatDate, label, STATUS_LABELS } from '../format.ts';

type Tone = 'ok' | 'bad' | 'caution' | 'muted';

const TONES: Record<Tone, string> = {
  ok: 'bg-ok-50 text-ok-700 border-ok-700/40',
  bad: 'bg-bad-50 text-bad-700 border-bad-700',
  caution: 'bg-caution-50 text-caution-700 border-caution-700/50',
  muted: 'bg-slate-100 text-ink-soft border-line',
};

export function Badge({ tone, children, testId }: { tone: Tone; children: ReactNode; testId?: string }) {
  return (
    <span data-testid={testId} className={`inline-flex items-center whitespace-nowrap rounded-full border px-3 py-0.5 text-sm font-semibold ${TONES[tone]}`}>
      {children}
    </span>
  );
}

const STATUS_TONES: Record<string, Tone> = {
  accepted: 'ok',
  in_service: 'ok',
  quarantined: 'caution',
  out_of_service: 'caution',
  retired: 'muted',
};

export function StatusBadge({ status }: { status: string }) {
  return (
    <Badge tone={STATUS_TONES[status] ?? 'muted'} testId="status-badge">
      {label(STATUS_LABELS, status)}
    </Badge>
  );
}

/** The expiry date with a red "expired" badge once the day has passed. */
export function ExpiryCell({ expiresOn }: { expiresOn: string | null }) {
  const state = expiryState(expiresOn);
  if (state === 'none') return <span className="text-ink-soft">{expiresOn ? expiresOn : 'none set'}</span>;
  return (
    <span className="inline-flex flex-col items-start gap-1">
      <span className="whitespace-nowrap">{formatDate(expiresOn)}</span>
      {state === 'expired' ? (
        <Badge tone="bad" testId="expired-badge">
          expired
        </Badge>
      ) : null}
    </span>
  );
}

export function CalibrationDueCell({ dueOn }: { dueOn: string | null }) {
  const state = calibrationState(dueOn);
  if (state === 'unknown') return <Badge tone="bad">no due date</Badge>;
  return (
    <span className="inline-flex flex-col items-start gap-1">
      <span className="whitespace-nowrap">{formatDate(dueOn)}</span>
      {state === 'overdue' ? (
        <Badge tone="bad" testId="overdue-badge">
          overdue
        </Badge>
      ) : null}
      {state === 'due_soon' ? (
        <Badge tone="caution" testId="due-soon-badge">
          due soon
        </Badge>
      ) : null}
    </span>
  );
}
