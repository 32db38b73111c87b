import { useState } from 'react';
import { useNavigate } from 'react-router';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import type { PreparationDetail, ResultOutOfPlan, SignableMeaning } from '../../../../shared/schemas/preparations.ts';
import { DisabledWithReason } from './sign-actions.tsx';
import { SignatureDialog } from './signature-dialog.tsx';
import { StatusBadge } from './status-badge.tsx';

/**
 * The verifier's checklist (REQUIREMENTS RV-03, W3): every item from the record's `verificationChecklist`
 * must be ticked before "Sign as verified" is possible; "Return to preparer" needs a reason instead.
 * The server re-checks all of it (every key, the second person, the state) whatever this page shows.
 */
export function VerificationPanel({ d }: { d: PreparationDetail }) {
  const navigate = useNavigate();
  const items = d.verificationChecklist ?? [];
  const [ticked, setTicked] = useState<Record<string, boolean>>({});
  const [meaning, setMeaning] = useState<SignableMeaning | null>(null);
  const can = d.canSign ?? { prepare: false, verify: false, return: false, discard: false, reasons: {} };
  const reasons = can.reasons ?? {};
  const done = items.filter((i) => ticked[i.key]).length;
  const allTicked = items.length > 0 && done === items.length;
  const checklist = Object.fromEntries(items.filter((i) => ticked[i.key]).map((i) => [i.key, true as const]));

  if (d.status !== 'prepared') {
    return (
      <Banner tone="info" title="Nothing to verify now" testId="verify-not-prepared">
        <span className="inline-flex flex-wrap items-center gap-2">
          The record is <StatusBadge status={d.status} />. It can be verified only once the preparer has signed it as prepared.
        </span>
      </Banner>
    );
  }

  return (
    <div className="flex flex-col gap-5" data-testid="verification-panel">
      {d.resultOutOfPlan ? <OutOfPlanNotice o={d.resultOutOfPlan} testId="verify-out-of-plan" /> : null}
      <fieldset className="flex flex-col gap-2" disabled={!can.verify && !can.return}>
        <legend className="mb-2 text-lg font-bold">
          Checklist{' '}
          <span className="num font-normal text-ink-soft" data-testid="checklist-count">
            ({done} of {items.length} ticked)
          </span>
        </legend>
        {items.map((item) => (
          <label
            key={item.key}
            htmlFor={`check-${item.key}`}
            className="flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border-2 border-line bg-card px-3 py-2 has-[:checked]:border-ok-700 has-[:checked]:bg-ok-50"
          >
            <input
              id={`check-${item.key}`}
              type="checkbox"
              data-testid={`check-${item.key}`}
              checked={!!ticked[item.key]}
              onChange={(e) => setTicked((t) => ({ ...t, [item.key]: e.target.checked }))}
              className="size-6 shrink-0 accent-ok-700"
            />
            <span className="font-semibold">{item.label}</span>
          </label>
        ))}
      </fieldset>

      <div className="flex flex-wrap items-start gap-4">
        {!can.verify ? (
          <DisabledWithReason label="Sign as verified" testId="sign-verified" reason={reasons.verify ?? 'You cannot verify this record.'} />
        ) : !allTicked ? (
          <DisabledWithReason label="Sign as verified" testId="sign-verified" reason={`Tick every checklist item first (${items.length - done} left).`} />
        ) : (
          <Button className="min-h-14 px-6 text-lg" data-testid="sign-verified" onClick={() => setMeaning('verified')}>
            Sign as verified
          </Button>
        )}
        {can.return ? (
          <Button variant="danger" className="min-h-14" data-testid="sign-returned" onClick={() => setMeaning('returned')}>
            Return to preparer…
          </Button>
        ) : (
          <DisabledWithReason label="Return to preparer…" testId="sign-returned" reason={reasons.return ?? 'You cannot return this record.'} />
        )}
      </div>

      {meaning ? (
        <SignatureDialog
          open
          meaning={meaning}
          detail={d}
          checklist={meaning === 'verified' ? checklist : undefined}
          onClose={() => setMeaning(null)}
          onSigned={(next) => {
            setMeaning(null);
            navigate(`/preparations/${encodeURIComponent(next.identifier)}`, { state: { signed: meaning } });
          }}
        />
      ) : null}
    </div>
  );
}

/** A result outside what the plan could produce, with the reason stated when it was signed as prepared: shown first. */
export function OutOfPlanNotice({ o, testId }: { o: ResultOutOfPlan; testId: string }) {
  return (
    <div role="alert" data-testid={testId} className="rounded-lg border-2 border-l-8 border-caution-700 bg-caution-50 px-4 py-3">
      <p className="text-lg font-bold text-caution-700">Review first: the result is outside what the plan could produce</p>
      {o.messages.map((m) => (
        <p key={m} className="mt-1">
          {m}.
        </p>
      ))}
      <p className="mt-2" data-testid={`${testId}-reason`}>
        {o.reason ? (
          <>
            Reason stated by <strong>{o.statedBy}</strong> when signing as prepared: &ldquo;{o.reason}&rdquo;
          </>
        ) : (
          'No reason was stated when it was signed as prepared.'
        )}
      </p>
      <p className="mt-1 text-ink-soft">If the reason does not hold, return the record to the preparer.</p>
    </div>
  );
}
