import { useId, useState } from 'react';
import { ApiError } from '../../../lib/api-client.ts';
import {
  SIGNATURE_MEANING_TEXT,
  SIGNATURE_RESPONSIBILITY_STATEMENT,
  type ChangeSignatureInput,
  type PreparationDetail,
} from '../../../../shared/schemas/preparations.ts';
import { useAuth } from '../../auth/use-auth.ts';
import { isSigned, statusText } from '../format.ts';

export type ChangeSignature = {
  /** true when the record is signed, so a change needs the changer's password ("amended" signature) */
  required: boolean;
  /** checks the password locally; false (and an error at the field) when it is missing */
  validate: () => boolean;
  /** `{ signature: { password } }` for the request body, or `{}` when the record is not signed */
  payload: () => { signature?: ChangeSignatureInput };
  /** puts a server refusal of the signature at the password field; true when it did */
  applyServerError: (e: unknown) => boolean;
  /** clears the password after a save */
  reset: () => void;
  fields: React.ReactNode;
};

/**
 * A change to a signed record (a weighing or make-up correction while it is prepared, returned or verified)
 * is itself signed "Amended by" with the changer's password (REQUIREMENTS ES-03, CO-02). This hook gives a bench
 * form the explanation and the password field, and the `signature` to send next to `correctionReason`.
 */
export function useChangeSignature(detail: Pick<PreparationDetail, 'status' | 'version' | 'canSign'>): ChangeSignature {
  const auth = useAuth();
  const uid = useId();
  const [password, setPassword] = useState('');
  const [error, setError] = useState<string | null>(null);
  // ES-08: the first signature of a user (an amendment counts) needs the responsibility statement acknowledged.
  const [askAck, setAskAck] = useState(false);
  const [ack, setAck] = useState(false);
  const [ackError, setAckError] = useState<string | null>(null);
  const required = isSigned(detail);
  const showAck = required && (askAck || detail.canSign?.acknowledgementRequired === true);
  const id = `${uid}-change-password`;

  const fields = required ? (
    <div className="flex flex-col gap-3 rounded-xl border-2 border-l-8 border-caution-700 bg-caution-50 px-4 py-4" data-testid="change-signature">
      <p className="text-lg font-bold text-caution-700">This record is signed ({statusText(detail.status).label}, v {detail.version})</p>
      <p>
        Saving this change signs it <span className="font-semibold">&ldquo;{SIGNATURE_MEANING_TEXT.amended}&rdquo;</span> as{' '}
        <span className="font-semibold">{auth.status === 'signed-in' ? auth.user.fullName : 'you'}</span>. The record becomes v {detail.version + 1}, every earlier
        signature stops applying (it stays listed against v {detail.version}), and the record must be signed as prepared and then verified again by a
        chemist who did not change it.
      </p>
      {showAck ? (
        <div data-testid="change-signature-responsibility">
          <p className="font-bold">Your first electronic signature</p>
          <p className="mt-1">{SIGNATURE_RESPONSIBILITY_STATEMENT}</p>
          <label htmlFor={`${id}-ack`} className="mt-2 flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border-2 border-line bg-card px-3 py-2 has-[:checked]:border-slate-700">
            <input
              id={`${id}-ack`}
              type="checkbox"
              data-testid="change-signature-acknowledge"
              checked={ack}
              onChange={(e) => {
                setAck(e.target.checked);
                setAckError(null);
              }}
              className="size-6 shrink-0 accent-slate-700"
            />
            <span className="font-semibold">I have read and accept this statement</span>
          </label>
          {ackError ? (
            <p role="alert" className="mt-1 text-sm font-semibold text-bad-700">
              {ackError}
            </p>
          ) : null}
        </div>
      ) : null}
      <div>
        <label htmlFor={id} className="mb-1 block text-sm font-semibold">
          Your password, to sign the change (required)
        </label>
        <input
          id={id}
          type="password"
          name="signature.password"
          autoComplete="current-password"
          data-testid="change-signature-password"
          value={password}
          onChange={(e) => {
            setPassword(e.target.value);
            setError(null);
          }}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : undefined}
          className="field-input min-h-14 text-lg"
        />
        {error ? (
          <p id={`${id}-error`} role="alert" data-testid="change-signature-error" className="mt-1 text-sm font-semibold text-bad-700">
            {error}
          </p>
        ) : null}
      </div>
    </div>
  ) : null;

  return {
    required,
    fields,
    validate: () => {
      if (!required) return true;
      let ok = true;
      if (password === '') {
        setError('Enter your password to sign the change');
        ok = false;
      }
      if (showAck && !ack) {
        setAckError('Tick the statement to acknowledge it before your first signature');
        ok = false;
      }
      return ok;
    },
    payload: () => (required ? { signature: { password, ...(showAck && ack ? { acknowledgeResponsibility: true as const } : {}) } } : {}),
    applyServerError: (e) => {
      if (!(e instanceof ApiError)) return false;
      if (e.fields['signature.acknowledgeResponsibility']) {
        setAskAck(true);
        setAckError('Tick the statement to acknowledge it before your first signature');
        return true;
      }
      const message = e.fields['signature.password'] ?? e.fields.password ?? (e.code === 'signature_password' ? e.message : undefined);
      if (!message) return false;
      setPassword('');
      setError(message);
      return true;
    },
    reset: () => {
      setPassword('');
      setError(null);
      setAck(false);
      setAckError(null);
    },
  };
}
