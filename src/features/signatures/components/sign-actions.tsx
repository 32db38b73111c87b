import { useEffect, useRef, useState, type ReactNode } from 'react';
import { Link, useLocation } from 'react-router';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import type { PreparationDetail, SignableMeaning } from '../../../../shared/schemas/preparations.ts';
import { useAuth } from '../../auth/use-auth.ts';
import { SignatureDialog } from './signature-dialog.tsx';
import { StatusReasonBanner } from './status-badge.tsx';

/** An action the user may not take now, shown disabled with the server's reason beside it (never hidden silently). */
export function DisabledWithReason({ label, reason, testId }: { label: ReactNode; reason: string; testId: string }) {
  return (
    <div className="flex flex-col gap-1">
      <Button disabled aria-describedby={`${testId}-reason`} data-testid={testId}>
        {label}
      </Button>
      <p id={`${testId}-reason`} data-testid={`${testId}-reason`} className="max-w-md text-sm font-semibold text-ink-soft">
        {reason}
      </p>
    </div>
  );
}

const DONE: Record<SignableMeaning, string> = {
  prepared: 'Signed as prepared. The other chemists have been asked by e-mail to verify it.',
  verified: 'Signed as verified. The preparer has been told by e-mail.',
  returned: 'Returned to the preparer with your reason. The preparer has been told by e-mail.',
  discarded: 'The record is discarded. It stays readable, marked discarded.',
};

/**
 * The signing buttons on the record page: "Sign as prepared" for the preparer once the bench work is complete,
 * the way to the verification page once it is prepared, and "Discard". What the user may do comes from the
 * server (`canSign`, computed for the requesting user); a refused action shows the server's reason.
 */
export function SignActions({ d }: { d: PreparationDetail }) {
  const auth = useAuth();
  const location = useLocation();
  // The verification page comes back here with what was signed, so the verifier sees it took effect.
  const arrived = (location.state as { signed?: SignableMeaning } | null)?.signed;
  const [meaning, setMeaning] = useState<SignableMeaning | null>(null);
  const [done, setDone] = useState<string | null>(arrived ? DONE[arrived] : null);
  // the confirmation is brought to where the user is (the verification page may have been scrolled far down)
  const doneRef = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (!done || !doneRef.current) return;
    doneRef.current.scrollIntoView?.({ block: 'center' });
    doneRef.current.focus({ preventScroll: true });
  }, [done]);
  if (auth.status !== 'signed-in') return null;
  const role = auth.user.role;
  const can = d.canSign ?? { prepare: false, verify: false, return: false, discard: false, reasons: {} };
  const reasons = can.reasons ?? {};
  const verifyPath = `/preparations/${encodeURIComponent(d.identifier)}/verify`;

  const showPrepare = role === 'chemist' && d.stage === 'complete' && (d.status === 'planned' || d.status === 'returned');
  const showVerify = role === 'chemist' && d.status === 'prepared';
  const showDiscard = (role === 'chemist' || role === 'qa') && d.status !== 'discarded'; // an expired record can be discarded (expired → discarded)
  const notComplete = role === 'chemist' && d.stage !== 'complete' && (d.status === 'planned' || d.status === 'returned');

  const hasReason = d.status === 'returned' || d.status === 'discarded';
  if (!showPrepare && !showVerify && !showDiscard && !notComplete && !done && !hasReason) return null;

  return (
    <div className="flex flex-col gap-3" data-testid="sign-actions">
      <StatusReasonBanner d={d} />
      {done ? (
        <div ref={doneRef} tabIndex={-1} role="status" className="outline-none">
          <Banner tone="ok" title="Signed" testId="sign-done">
            {done}
          </Banner>
        </div>
      ) : null}
      <div className="flex flex-wrap items-start gap-4">
        {showPrepare ? (
          can.prepare ? (
            <Button className="min-h-14 px-6 text-lg" data-testid="sign-prepared" onClick={() => setMeaning('prepared')}>
              Sign as prepared
            </Button>
          ) : (
            <DisabledWithReason label="Sign as prepared" testId="sign-prepared" reason={reasons.prepare ?? 'You cannot sign this record as prepared now.'} />
          )
        ) : null}
        {notComplete ? (
          <DisabledWithReason label="Sign as prepared" testId="sign-prepared" reason={reasons.prepare ?? 'Record the weighing and the make-up first; then the preparer signs.'} />
        ) : null}
        {showVerify ? (
          can.verify ? (
            <Link
              to={verifyPath}
              data-testid="open-verify"
              className="inline-flex min-h-14 items-center rounded-lg border-2 border-slate-700 bg-slate-700 px-6 text-lg font-semibold text-white hover:bg-slate-900"
            >
              Review and verify
            </Link>
          ) : (
            <DisabledWithReason label="Review and verify" testId="open-verify" reason={reasons.verify ?? 'You cannot verify this record.'} />
          )
        ) : null}
        {showDiscard ? (
          can.discard ? (
            <Button variant="danger" className="min-h-14" data-testid="sign-discarded" onClick={() => setMeaning('discarded')}>
              Discard…
            </Button>
          ) : reasons.discard ? (
            <DisabledWithReason label="Discard…" testId="sign-discarded" reason={reasons.discard} />
          ) : null
        ) : null}
      </div>
      {meaning ? (
        <SignatureDialog
          open
          meaning={meaning}
          detail={d}
          onClose={() => setMeaning(null)}
          onSigned={() => {
            setDone(DONE[meaning]);
            setMeaning(null);
          }}
        />
      ) : null}
    </div>
  );
}
