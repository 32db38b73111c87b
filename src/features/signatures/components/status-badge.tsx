import type { PreparationDetail } from '../../../../shared/schemas/preparations.ts';
import { statusText } from '../format.ts';
import { labDateTime } from '../../../../shared/prep/lab-time.ts';

/** Tone plus an icon-free word: the status is always written out, never shown by colour alone. */
const TONES: Record<string, string> = {
  planned: 'border-slate-700 bg-card text-ink',
  prepared: 'border-brass-600 bg-brass-100 text-ink',
  verified: 'border-ok-700 bg-ok-50 text-ok-700',
  returned: 'border-bad-700 bg-bad-50 text-bad-700',
  discarded: 'border-ink-soft bg-slate-100 text-ink-soft',
  expired: 'border-caution-700 bg-caution-50 text-caution-700',
  seal_broken: 'border-bad-700 bg-bad-700 text-white',
};

/**
 * Our own status mark, drawn beside the word (never instead of it): two signature slots, the preparer's and the
 * verifier's. Planned: both open. Prepared: the first filled. Verified: both filled. Returned: the first slot
 * open again with a back stroke. Discarded: both crossed out. Expired: both slots dashed.
 * Seal broken: both slots split by a crack. Readable without colour.
 */
export function StatusMark({ status }: { status: string }) {
  const filled = status === 'verified' ? 2 : status === 'prepared' ? 1 : 0;
  const dashed = status === 'expired' ? '2 1.5' : undefined;
  const slot = (x: number, on: boolean) => <rect x={x} y={1.5} width={7} height={11} rx={1.5} fill={on ? 'currentColor' : 'none'} stroke="currentColor" strokeWidth={1.5} strokeDasharray={dashed} />;
  return (
    <svg viewBox="0 0 19 14" width={19} height={14} aria-hidden="true" focusable="false" data-testid="status-mark" data-mark={status} className="shrink-0">
      {slot(1, filled >= 1)}
      {slot(11, filled >= 2)}
      {status === 'returned' ? <path d="M7 7 H2.5 M4.5 4.5 L2 7 L4.5 9.5" fill="none" stroke="currentColor" strokeWidth={1.5} strokeLinecap="round" /> : null}
      {status === 'seal_broken' ? <path d="M9.5 0.5 L7 5 L12 8 L9.5 13.5" fill="none" stroke="currentColor" strokeWidth={1.5} strokeLinejoin="round" /> : null}
      {status === 'discarded' ? <path d="M0.5 13 L18.5 1" stroke="currentColor" strokeWidth={1.5} strokeLinecap="round" /> : null}
    </svg>
  );
}

export function StatusBadge({ status, testId, withHint = false }: { status: string; testId?: string; withHint?: boolean }) {
  const t = statusText(status);
  return (
    <span
      data-testid={testId}
      data-status={status}
      title={t.hint || undefined}
      className={`inline-flex items-center gap-1.5 whitespace-nowrap rounded-full border-2 px-3 py-0.5 text-sm font-semibold ${TONES[status] ?? TONES.planned}`}
    >
      <StatusMark status={status} />
      <span>
        {t.label}
        {withHint && t.hint ? <span className="font-normal"> · {t.hint}</span> : null}
      </span>
    </span>
  );
}

/** "Amended from v 1": the record changed after signing; the earlier signatures no longer apply. */
export function AmendedMarker({ d, testId = 'amended-marker' }: { d: Pick<PreparationDetail, 'amendedFromVersion' | 'version'>; testId?: string }) {
  if (!d.amendedFromVersion) return null;
  return (
    <span
      data-testid={testId}
      className="inline-flex items-center whitespace-nowrap rounded-full border-2 border-dashed border-caution-700 bg-caution-50 px-3 py-0.5 text-sm font-semibold text-caution-700"
    >
      Amended from v {d.amendedFromVersion} · now v {d.version}
    </span>
  );
}

/** The record version, shown beside the status. */
export function VersionTag({ version }: { version: number | undefined }) {
  if (!version) return null;
  return (
    <span className="num inline-flex items-center whitespace-nowrap rounded-full border-2 border-line px-3 py-0.5 text-sm font-semibold text-ink-soft" data-testid="record-version">
      v {version}
    </span>
  );
}

/** Banner for a record made from one that changed after signing (set by the lineage feature). */
export function ReviewFlagBanner({ d, timeZone }: { d: Pick<PreparationDetail, 'reviewFlag'>; timeZone?: string }) {
  if (!d.reviewFlag) return null;
  const when = new Date(d.reviewFlag.flaggedAt);
  const at = Number.isNaN(when.getTime())
    ? d.reviewFlag.flaggedAt
    : labDateTime(when, timeZone ?? 'UTC');
  return (
    <div role="alert" data-testid="review-flag" className="rounded-lg border-2 border-l-8 border-caution-700 bg-caution-50 px-4 py-3 text-caution-700">
      <p className="font-bold">Needs review: a record this one was made from has changed</p>
      <p className="text-ink">
        {d.reviewFlag.reason} <span className="text-ink-soft">(flagged {at})</span>
      </p>
    </div>
  );
}

/**
 * A signed record whose stored data no longer match its signatures (server/services/record-integrity.ts): what
 * differs, and what to do. Shown on the record and the bench view; the list and the trace show the badge.
 */
export function SealBrokenBanner({ d }: { d: Pick<PreparationDetail, 'sealBroken'> }) {
  if (!d.sealBroken) return null;
  return (
    <div role="alert" data-testid="seal-broken" className="rounded-lg border-2 border-l-8 border-bad-700 bg-bad-50 px-4 py-3 text-bad-700">
      <p className="text-lg font-bold">Seal broken: this record no longer matches what was signed</p>
      <p className="text-ink">
        Stored as {statusText(d.sealBroken.storedStatus).label.toLowerCase()}, but its data were changed outside Tarebook. Do not use this standard or
        print its labels; QA has been told and must investigate.
      </p>
      <ul className="mt-1 list-disc pl-6 text-ink" data-testid="seal-broken-problems">
        {d.sealBroken.problems.map((p) => (
          <li key={p}>{p}</li>
        ))}
      </ul>
    </div>
  );
}

/** One-line explanation of what the status means for the reader, with the amendment note. */
export function StatusExplainer({ d }: { d: Pick<PreparationDetail, 'status' | 'amendedFromVersion' | 'version'> & Partial<Pick<PreparationDetail, 'statusBeforeExpiry'>> }) {
  const t = statusText(d.status);
  return (
    <p data-testid="status-explainer">
      <span className="font-semibold text-ink">{t.label}</span>
      {t.hint ? `: ${t.hint}.` : '.'}
      {d.statusBeforeExpiry ? ` Stored status before it expired: ${statusText(d.statusBeforeExpiry).label.toLowerCase()}.` : ''}
      {d.amendedFromVersion ? ` Changed after signing (v ${d.amendedFromVersion} → v ${d.version}): the earlier signatures no longer apply; it must be signed as prepared and verified again.` : ''}
    </p>
  );
}

/** A returned or discarded record says why, where the preparer looks first (REQUIREMENTS RV-06, CO-05). */
export function StatusReasonBanner({ d }: { d: Pick<PreparationDetail, 'status' | 'signatures'> }) {
  if (d.status !== 'returned' && d.status !== 'discarded') return null;
  const sig = [...(d.signatures ?? [])].reverse().find((s) => s.meaning === d.status);
  if (!sig) return null;
  return (
    <div
      role="status"
      data-testid="status-reason"
      className={`rounded-lg border-2 border-l-8 px-4 py-3 ${d.status === 'returned' ? 'border-bad-700 bg-bad-50' : 'border-ink-soft bg-slate-100'}`}
    >
      <p className="font-bold">
        {d.status === 'returned' ? `Returned to the preparer by ${sig.signer.fullName}` : `Discarded by ${sig.signer.fullName}`}
      </p>
      <p>{sig.reason}</p>
      {d.status === 'returned' ? <p className="mt-1 text-sm text-ink-soft">Make the changes on the bench view (each with its reason), then sign as prepared again.</p> : null}
    </div>
  );
}
