import type { Signature } from '../../../../shared/schemas/preparations.ts';
import { shortHash, signatureTime } from '../format.ts';

const MEANING_WORD: Record<string, string> = {
  prepared: 'Prepared by',
  verified: 'Verified by',
  returned: 'Returned by',
  discarded: 'Discarded by',
  amended: 'Amended by',
};

/**
 * Signature manifestations (REQUIREMENTS ES-01, ES-03, TS-02): printed name, date and time in the lab's zone
 * with the zone named and in UTC, the meaning in words, the record version and a short form of the hash of
 * what was signed. A signature that no longer applies stays listed, marked "superseded: applied to v n".
 */
export function SignaturesPanel({ signatures, timeZone }: { signatures: Signature[] | undefined; timeZone?: string }) {
  const list = signatures ?? [];
  if (list.length === 0) {
    return (
      <p className="text-ink-soft" data-testid="no-signatures">
        Not signed yet. The preparer signs once the weighing and the make-up are recorded; a second chemist then verifies.
      </p>
    );
  }
  return (
    <ol className="flex flex-col gap-3" data-testid="signature-list">
      {list.map((s) => {
        const t = signatureTime(s.signedAt, timeZone);
        return (
          <li
            key={s.id}
            data-testid="signature-entry"
            data-meaning={s.meaning}
            data-valid={s.valid ? 'true' : 'false'}
            className={`rounded-xl border-2 px-4 py-3 ${s.valid ? 'border-slate-700 bg-card' : 'border-line bg-slate-100/60'}`}
          >
            <div className="grid items-start gap-3 sm:grid-cols-[minmax(0,1fr)_auto]">
              <div className={`min-w-0 ${s.valid ? '' : 'opacity-80'}`}>
                <p className="text-sm font-semibold uppercase tracking-wide text-ink-soft" data-testid="signature-meaning">
                  {MEANING_WORD[s.meaning] ?? s.meaning}
                </p>
                <p className="text-xl font-bold" data-testid="signature-name">
                  {s.signer.fullName}
                </p>
                <p className="mt-0.5">{s.meaningText}</p>
              </div>
              <div className="flex flex-wrap items-center gap-2 sm:flex-col sm:items-end">
                <span className="num rounded-full border-2 border-line px-3 py-0.5 text-sm font-semibold" data-testid="signature-version-tag">
                  v {s.recordVersion}
                </span>
                {s.valid ? (
                  <span className="rounded-full border-2 border-ok-700 bg-ok-50 px-3 py-0.5 text-sm font-semibold text-ok-700" data-testid="signature-valid">
                    applies to the current version
                  </span>
                ) : (
                  <span className="rounded-full border-2 border-caution-700 bg-caution-50 px-3 py-0.5 text-sm font-semibold text-caution-700" data-testid="signature-superseded">
                    superseded: applied to v {s.recordVersion}
                  </span>
                )}
              </div>
            </div>
            <dl className="mt-2 grid gap-x-6 gap-y-1 text-sm sm:grid-cols-2">
              <div>
                <dt className="inline font-semibold">Signed: </dt>
                <dd className="inline" data-testid="signature-time">
                  <span className="num">{t.local}</span> <span className="text-ink-soft">({t.zone})</span>
                </dd>
              </div>
              <div>
                <dt className="inline font-semibold">UTC: </dt>
                <dd className="num inline" data-testid="signature-utc">
                  {t.utc}
                </dd>
              </div>
              <div>
                <dt className="inline font-semibold">Record hash: </dt>
                <dd className="num inline" title={s.recordHash} data-testid="signature-hash">
                  {shortHash(s.recordHash)}…
                </dd>
              </div>
              {s.reason ? (
                <div className="sm:col-span-2">
                  <dt className="inline font-semibold">Reason: </dt>
                  <dd className="inline" data-testid="signature-reason-text">
                    {s.reason}
                  </dd>
                </div>
              ) : null}
              {s.meaning === 'verified' && s.checklist ? (
                <div className="sm:col-span-2">
                  <dt className="inline font-semibold">Checklist: </dt>
                  <dd className="inline">{Object.keys(s.checklist).length} items confirmed</dd>
                </div>
              ) : null}
            </dl>
          </li>
        );
      })}
    </ol>
  );
}
