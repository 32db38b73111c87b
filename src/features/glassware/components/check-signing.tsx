import { useState } from 'react';
import { Button } from '../../../components/ui/button.tsx';
import { Banner, Panel } from '../../../components/ui/feedback.tsx';
import type { SignableMeaning } from '../../../../shared/schemas/preparations.ts';
import { useAuth } from '../../auth/use-auth.ts';
import { signatureTime } from '../../signatures/format.ts';
import { DisabledWithReason } from '../../signatures/components/sign-actions.tsx';
import { SignatureDialog } from '../../signatures/components/signature-dialog.tsx';
import { useSignVolumeCheck } from '../api/volume-check-mutations.ts';
import { certificateUrl } from '../api/volume-check-queries.ts';
import { CHECK_KIND_LABELS } from '../format.ts';
import type { VolumeCheckDetail } from '../types.ts';

const DONE: Partial<Record<SignableMeaning, string>> = {
  prepared: 'Signed as prepared. A second chemist now reviews and verifies it.',
  verified: "Signed as verified. The ware's calibration status and next due date follow from this check.",
  returned: 'Returned with your reason. The check takes readings and corrections again, then is signed anew.',
};

/**
 * Signing a check: "prepared" by a chemist once every replicate is in; "verified" (after the checklist) or
 * "returned" (with a reason) by a second chemist. The same signature dialog as a preparation (password at every
 * signature, the responsibility statement at a first signature); the server decides who may sign (`canSign`).
 */
export function CheckSigning({ d, tz }: { d: VolumeCheckDetail; tz?: string }) {
  const auth = useAuth();
  const sign = useSignVolumeCheck(d.identifier);
  const [meaning, setMeaning] = useState<SignableMeaning | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [ticked, setTicked] = useState<Record<string, boolean>>({});
  if (auth.status !== 'signed-in') return null;
  const chemist = auth.user.role === 'chemist';
  const items = d.verificationChecklist;
  const left = items.filter((i) => !ticked[i.key]).length;
  const checklist = Object.fromEntries(items.filter((i) => ticked[i.key]).map((i) => [i.key, true as const]));
  const reasons = d.canSign.reasons;

  return (
    <Panel title="Signatures and certificate" id="signing">
      <div className="flex flex-col gap-5" data-testid="check-signing">
        {done ? (
          <Banner tone="ok" title="Signed" testId="sign-done">
            {done}
          </Banner>
        ) : null}

        {d.status === 'planned' && chemist ? (
          d.canSign.prepare ? (
            <Button className="min-h-14 self-start px-6 text-lg" data-testid="sign-prepared" onClick={() => setMeaning('prepared')}>
              Sign as prepared
            </Button>
          ) : (
            <DisabledWithReason label="Sign as prepared" testId="sign-prepared" reason={reasons.prepare ?? 'Record every replicate first.'} />
          )
        ) : null}
        {d.status === 'planned' && !chemist ? <p className="text-ink-soft">When every replicate is in, a chemist signs the check as prepared.</p> : null}

        {d.status === 'prepared' && chemist ? (
          <div className="flex flex-col gap-4" data-testid="check-verification">
            <fieldset className="flex flex-col gap-2" disabled={!d.canSign.verify && !d.canSign.return}>
              <legend className="mb-2 text-lg font-bold">
                Second-person review{' '}
                <span className="num font-normal text-ink-soft" data-testid="checklist-count">
                  ({items.length - left} of {items.length} ticked)
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
              {!d.canSign.verify ? (
                <DisabledWithReason label="Sign as verified" testId="sign-verified" reason={reasons.verify ?? 'You cannot verify this check.'} />
              ) : left > 0 ? (
                <DisabledWithReason label="Sign as verified" testId="sign-verified" reason={`Tick every checklist item first (${left} left).`} />
              ) : (
                <Button className="min-h-14 px-6 text-lg" data-testid="sign-verified" onClick={() => setMeaning('verified')}>
                  Sign as verified
                </Button>
              )}
              {d.canSign.return ? (
                <Button variant="danger" className="min-h-14" data-testid="sign-returned" onClick={() => setMeaning('returned')}>
                  Return…
                </Button>
              ) : (
                <DisabledWithReason label="Return…" testId="sign-returned" reason={reasons.return ?? 'You cannot return this check.'} />
              )}
            </div>
          </div>
        ) : null}
        {d.status === 'prepared' && !chemist ? <p className="text-ink-soft">A second chemist reviews the check and signs it as verified, or returns it.</p> : null}

        {d.signatures.length ? (
          <ol className="flex flex-col gap-2" data-testid="check-signatures">
            {d.signatures.map((s) => {
              const t = signatureTime(s.signedAt, tz);
              return (
                <li key={s.id} className="rounded-lg border-2 border-line px-4 py-2" data-testid="check-signature" data-meaning={s.meaning}>
                  <p className="font-semibold">
                    {s.signer.fullName} — {s.meaningText}
                  </p>
                  <p className="text-sm text-ink-soft">
                    {t.local} ({t.utc}) · version v {s.recordVersion} · {s.valid ? 'applies to this version' : 'applied to an earlier version'}
                  </p>
                  {s.reason ? <p className="text-sm">Reason: {s.reason}</p> : null}
                </li>
              );
            })}
          </ol>
        ) : (
          <p className="text-ink-soft">Not signed yet.</p>
        )}

        {d.result ? (
          <a
            href={certificateUrl(d.identifier)}
            target="_blank"
            rel="noopener"
            data-testid="certificate-link"
            className="inline-flex min-h-14 items-center self-start rounded-lg border-2 border-slate-700 bg-card px-6 text-lg font-semibold hover:bg-slate-100"
          >
            Calibration certificate (PDF)
          </a>
        ) : null}
        {d.result && d.status !== 'verified' ? <p className="text-sm text-ink-soft">Until the check is verified, the certificate says it is not yet verified.</p> : null}

        {meaning ? (
          <SignatureDialog
            open
            meaning={meaning}
            detail={{ identifier: d.identifier, version: d.version }}
            subject={`(${CHECK_KIND_LABELS[d.ware.kind] ?? d.ware.kind} ${d.ware.identifier}, gravimetric check)`}
            mutation={sign}
            needsAcknowledgement={d.canSign.acknowledgementRequired === true}
            checklist={meaning === 'verified' ? checklist : undefined}
            onClose={() => setMeaning(null)}
            onSigned={() => {
              setDone(DONE[meaning] ?? 'Signed.');
              setMeaning(null);
              setTicked({});
            }}
          />
        ) : null}
      </div>
    </Panel>
  );
}
