import { useEffect, useId, useRef, useState, type FormEvent, type ReactNode } from 'react';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import {
  SIGNATURE_MEANING_TEXT,
  SIGNATURE_RESPONSIBILITY_STATEMENT,
  type PreparationDetail,
  type SignableMeaning,
  type SignatureInput,
} from '../../../../shared/schemas/preparations.ts';
import { useAuth } from '../../auth/use-auth.ts';
import { useSignPreparation } from '../api/signature-mutations.ts';

const TITLES: Record<SignableMeaning, string> = {
  prepared: 'Sign as prepared',
  verified: 'Sign as verified',
  returned: 'Return to the preparer',
  discarded: 'Discard the record',
};

const CONFIRM: Record<SignableMeaning, string> = {
  prepared: 'Sign as prepared',
  verified: 'Sign as verified',
  returned: 'Sign and return',
  discarded: 'Sign and discard',
};

const REASON_LABEL: Partial<Record<SignableMeaning, string>> = {
  returned: 'What the preparer must change (required)',
  discarded: 'Why the record is discarded (required)',
};

/**
 * How a dialog signs: the preparation's signature mutation by default; another signed record (a volume check)
 * passes its own mutation. Only what the dialog uses of a TanStack mutation.
 */
export type SignMutation<T> = {
  mutate: (input: SignatureInput, callbacks: { onSuccess: (next: T) => void; onError: (e: unknown) => void }) => void;
  isPending: boolean;
  reset: () => void;
};

/** The server's refusal, placed where the signer will look for it. */
type Refusal = { banner?: { title: string; text: string; code: string }; password?: string; reason?: string; outOfPlanReason?: string; acknowledge?: string };

function refusalFrom(e: unknown): Refusal {
  if (!(e instanceof ApiError)) return { banner: { title: 'Not signed', text: e instanceof Error ? e.message : 'Something went wrong.', code: 'unknown' } };
  const out: Refusal = {};
  const f = e.fields;
  if (e.code === 'signature_password' || f.password) out.password = f.password ?? e.message;
  if (f.reason) out.reason = f.reason;
  if (f.outOfPlanReason) out.outOfPlanReason = f.outOfPlanReason;
  // The server answers with the statement itself under this key: show it, and ask for the tick.
  if (f.acknowledgeResponsibility) out.acknowledge = 'Tick the statement to acknowledge it before your first signature';
  const PLACED = ['password', 'reason', 'outOfPlanReason', 'acknowledgeResponsibility'];
  const placed = Object.keys(f).filter((k) => PLACED.includes(k)).length;
  if (e.code === 'self_verification') {
    out.banner = { title: 'You cannot verify this record', text: e.message, code: e.code };
  } else if (e.code === 'invalid_transition') {
    out.banner = { title: 'Not possible in the current state', text: e.message, code: e.code };
  } else if (e.status === 403) {
    out.banner = { title: 'Not allowed', text: e.message, code: e.code };
  } else if (!out.password && (placed === 0 || placed < Object.keys(f).length)) {
    const extra = Object.entries(f)
      .filter(([k]) => !PLACED.includes(k))
      .map(([, v]) => v);
    out.banner = { title: 'Not signed', text: [e.message, ...extra].filter((x, i, a) => a.indexOf(x) === i).join(' '), code: e.code };
  }
  return out;
}

/**
 * One signing dialog for every meaning (REQUIREMENTS ES-01…ES-08). It shows the meaning text before anything
 * is signed, the signer (always the signed-in user: there is no way to sign for someone else), asks for the
 * password again every time (ES-04), a reason where the meaning needs one, and the responsibility statement
 * at a user's first signature (ES-08). Nothing is remembered between openings.
 */
export function SignatureDialog<T = PreparationDetail>({
  open,
  meaning,
  detail,
  subject,
  mutation,
  checklist,
  needsAcknowledgement: needsAckProp,
  onClose,
  onSigned,
}: {
  open: boolean;
  meaning: SignableMeaning;
  detail: Pick<PreparationDetail, 'identifier' | 'version'> & Partial<Pick<PreparationDetail, 'materialName' | 'analyteFormula' | 'canSign' | 'resultOutOfPlan'>>;
  /** what the record is, after "Applies to <identifier> version v N" (default: the preparation's material and analyte) */
  subject?: ReactNode;
  /** how to sign (default: POST /api/preparations/:key/signatures) */
  mutation?: SignMutation<T>;
  /** for "verified": the ticked checklist, sent as `{ key: true }` */
  checklist?: Record<string, true>;
  /** true when the server has said this is the user's first signature (default: detail.canSign.acknowledgementRequired) */
  needsAcknowledgement?: boolean;
  onClose: () => void;
  onSigned: (d: T) => void;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const needsAcknowledgement = needsAckProp ?? detail.canSign?.acknowledgementRequired === true;
  const auth = useAuth();
  const preparationSign = useSignPreparation(detail.identifier);
  const sign: SignMutation<T> = mutation ?? (preparationSign as unknown as SignMutation<T>);
  const uid = useId();
  const [password, setPassword] = useState('');
  const [reason, setReason] = useState('');
  const [outOfPlanReason, setOutOfPlanReason] = useState('');
  const [ack, setAck] = useState(false);
  const [showAck, setShowAck] = useState(needsAcknowledgement);
  const [refusal, setRefusal] = useState<Refusal>({});
  const needsReason = meaning === 'returned' || meaning === 'discarded';
  /** a result outside what the plan could produce is signed as prepared only with a stated reason (server: 422) */
  const outOfPlan = meaning === 'prepared' ? (detail.resultOutOfPlan ?? (refusal.outOfPlanReason ? { messages: [] } : undefined)) : undefined;

  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) {
      setPassword('');
      setReason('');
      setOutOfPlanReason('');
      setAck(false);
      setShowAck(needsAcknowledgement);
      setRefusal({});
      sign.reset();
      d.showModal();
    }
    if (!open && d.open) d.close();
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [open]);

  useEffect(() => {
    if (needsAcknowledgement) setShowAck(true);
  }, [needsAcknowledgement]);

  if (auth.status !== 'signed-in') return null;
  const user = auth.user;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const local: Refusal = {};
    if (password === '') local.password = 'Enter your password to sign';
    if (needsReason && reason.trim().length < 3) local.reason = `Give the reason the record is ${meaning} (at least 3 characters)`;
    if (outOfPlan && outOfPlanReason.trim().length < 3) local.outOfPlanReason = 'State why this result stands (at least 3 characters), or correct the entries first';
    if (showAck && !ack) local.acknowledge = 'Tick the statement to acknowledge it before your first signature';
    if (local.password || local.reason || local.outOfPlanReason || local.acknowledge) {
      setRefusal(local);
      return;
    }
    setRefusal({});
    const input: SignatureInput = {
      meaning,
      password,
      ...(needsReason ? { reason: reason.trim() } : {}),
      ...(outOfPlan ? { outOfPlanReason: outOfPlanReason.trim() } : {}),
      ...(meaning === 'verified' && checklist ? { checklist } : {}),
      ...(showAck && ack ? { acknowledgeResponsibility: true as const } : {}),
    };
    sign.mutate(input, {
      onSuccess: (next) => {
        setPassword('');
        onSigned(next);
      },
      onError: (err) => {
        const r = refusalFrom(err);
        if (r.acknowledge) setShowAck(true);
        if (r.password) setPassword('');
        setRefusal(r);
      },
    });
  };

  const pwId = `${uid}-password`;
  const reasonId = `${uid}-reason`;
  const ackId = `${uid}-ack`;
  const outOfPlanId = `${uid}-out-of-plan`;

  return (
    <dialog
      ref={ref}
      onClose={onClose}
      aria-labelledby={`${uid}-title`}
      data-testid="signature-dialog"
      data-meaning={meaning}
      className="m-auto max-h-[calc(100vh-2rem)] w-[min(40rem,calc(100vw-2rem))] overflow-y-auto rounded-xl border-2 border-line bg-card p-0 text-ink backdrop:bg-slate-900/60"
    >
      <form noValidate onSubmit={submit} className="flex flex-col gap-5 p-6">
        <h2 id={`${uid}-title`} className="text-2xl font-bold">
          {TITLES[meaning]}
        </h2>

        <div className="rounded-lg border-2 border-slate-700 bg-slate-100 px-4 py-3">
          <p className="text-sm font-semibold uppercase tracking-wide text-ink-soft">Meaning of this signature</p>
          <p className="text-lg font-bold" data-testid="signature-meaning-text">
            {SIGNATURE_MEANING_TEXT[meaning]}
          </p>
          <p className="mt-1 text-ink-soft">
            Applies to <span className="num font-semibold text-ink">{detail.identifier}</span> version{' '}
            <span className="num font-semibold text-ink" data-testid="signature-version">
              v {detail.version}
            </span>{' '}
            {subject ?? (
              <>
                ({detail.materialName} as <span className="num">{detail.analyteFormula}</span>)
              </>
            )}{' '}
            exactly as it stands now.
          </p>
        </div>

        <div>
          <p className="text-sm font-semibold text-ink-soft">Signer</p>
          <p className="text-lg font-semibold" data-testid="signature-signer">
            {user.fullName}
          </p>
          <p className="text-sm text-ink-soft">
            {user.email} · you sign only as yourself. Not you?{' '}
            <span className="font-semibold">Sign out and sign in with your own account.</span>
          </p>
        </div>

        {refusal.banner ? (
          <Banner title={refusal.banner.title} testId={refusal.banner.code === 'self_verification' ? 'signature-self-verification' : 'signature-refused'}>
            {refusal.banner.text}
          </Banner>
        ) : null}

        {needsReason ? (
          <div>
            <label htmlFor={reasonId} className="mb-1 block text-sm font-semibold">
              {REASON_LABEL[meaning]}
            </label>
            <textarea
              id={reasonId}
              name="reason"
              data-testid="signature-reason"
              rows={3}
              value={reason}
              onChange={(e) => setReason(e.target.value)}
              aria-invalid={refusal.reason ? true : undefined}
              aria-describedby={refusal.reason ? `${reasonId}-error` : undefined}
              className="field-input"
            />
            {refusal.reason ? (
              <p id={`${reasonId}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700">
                {refusal.reason}
              </p>
            ) : null}
          </div>
        ) : null}

        {outOfPlan ? (
          <div className="rounded-lg border-2 border-l-8 border-caution-700 bg-caution-50 px-4 py-3" data-testid="signature-out-of-plan">
            <p className="font-bold text-caution-700">The result is outside what the plan could produce</p>
            {outOfPlan.messages.map((m) => (
              <p key={m} className="mt-1">
                {m}.
              </p>
            ))}
            <p className="mt-1">Check the readings and their units first. If the result stands, say why: the verifier sees your reason first.</p>
            <label htmlFor={outOfPlanId} className="mb-1 mt-3 block text-sm font-semibold">
              Why the result stands (required)
            </label>
            <textarea
              id={outOfPlanId}
              name="outOfPlanReason"
              data-testid="signature-out-of-plan-reason"
              rows={3}
              maxLength={500}
              value={outOfPlanReason}
              onChange={(e) => setOutOfPlanReason(e.target.value)}
              aria-invalid={refusal.outOfPlanReason ? true : undefined}
              aria-describedby={refusal.outOfPlanReason ? `${outOfPlanId}-error` : undefined}
              className="field-input"
            />
            {refusal.outOfPlanReason ? (
              <p id={`${outOfPlanId}-error`} role="alert" data-testid="signature-out-of-plan-error" className="mt-1 text-sm font-semibold text-bad-700">
                {refusal.outOfPlanReason}
              </p>
            ) : null}
          </div>
        ) : null}

        {showAck ? (
          <div className="rounded-lg border-2 border-l-8 border-caution-700 bg-caution-50 px-4 py-3" data-testid="signature-responsibility">
            <p className="font-bold text-caution-700">Your first electronic signature</p>
            <p className="mt-1">{SIGNATURE_RESPONSIBILITY_STATEMENT}</p>
            <label htmlFor={ackId} className="mt-3 flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border-2 border-line bg-card px-3 py-2 has-[:checked]:border-slate-700">
              <input
                id={ackId}
                type="checkbox"
                data-testid="signature-acknowledge"
                checked={ack}
                onChange={(e) => setAck(e.target.checked)}
                aria-invalid={refusal.acknowledge ? true : undefined}
                aria-describedby={refusal.acknowledge ? `${ackId}-error` : undefined}
                className="size-6 shrink-0 accent-slate-700"
              />
              <span className="font-semibold">I have read and accept this statement</span>
            </label>
            {refusal.acknowledge ? (
              <p id={`${ackId}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700">
                {refusal.acknowledge}
              </p>
            ) : null}
          </div>
        ) : null}

        <div>
          {/* A hidden username lets password managers pair the two; the password itself is never stored by Tarebook. */}
          <input type="text" name="username" autoComplete="username" value={user.email} readOnly hidden />
          <label htmlFor={pwId} className="mb-1 block text-sm font-semibold">
            Your password (asked at every signature)
          </label>
          <input
            id={pwId}
            name="password"
            type="password"
            autoComplete="current-password"
            data-testid="signature-password"
            value={password}
            onChange={(e) => setPassword(e.target.value)}
            aria-invalid={refusal.password ? true : undefined}
            aria-describedby={refusal.password ? `${pwId}-error` : undefined}
            className="field-input min-h-14 text-lg"
          />
          {refusal.password ? (
            <p id={`${pwId}-error`} role="alert" data-testid="signature-password-error" className="mt-1 text-sm font-semibold text-bad-700">
              {refusal.password}
            </p>
          ) : null}
        </div>

        <div className="flex flex-wrap justify-end gap-3">
          <Button variant="secondary" onClick={onClose} disabled={sign.isPending} data-testid="signature-cancel">
            Cancel
          </Button>
          <Button type="submit" variant={meaning === 'returned' || meaning === 'discarded' ? 'danger' : 'primary'} busy={sign.isPending} data-testid="signature-submit">
            {CONFIRM[meaning]}
          </Button>
        </div>
      </form>
    </dialog>
  );
}
