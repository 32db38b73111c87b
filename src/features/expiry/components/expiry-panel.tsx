import { useState } from 'react';
import { Link } from 'react-router';
import { relabelHref } from '../relabel.ts';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { EXPIRY_EXTENSION_MEANING_TEXT } from '../../../../shared/schemas/expiry.ts';
import { SIGNATURE_RESPONSIBILITY_STATEMENT, type PreparationDetail } from '../../../../shared/schemas/preparations.ts';
import { useAuth } from '../../auth/use-auth.ts';
import { expiryReasonText, formatLabTime, statusLabel } from '../../preparations/format.ts';
import { useExtendExpiry } from '../api/expiry-mutations.ts';
import { acknowledgeProblem, extendFormSchema, toInput, type ExtendFormValues } from '../form-schema.ts';
import { ISO_DATE_INPUT } from '../../../lib/format.ts';

type ExpiryDetail = Pick<
  PreparationDetail,
  'identifier' | 'version' | 'status' | 'statusBeforeExpiry' | 'expiry' | 'expiryExtensions' | 'expiryCap' | 'canExtendExpiry' | 'canSign'
> & Partial<Pick<PreparationDetail, 'stage'>>;

/**
 * A record past its expiry says so above everything else (REQUIREMENTS EX-04): it cannot be used as a parent
 * or have labels printed until QA extends it. The stored status stays visible.
 */
export function ExpiredBanner({ d }: { d: Pick<PreparationDetail, 'status' | 'statusBeforeExpiry' | 'expiry'> }) {
  if (d.status !== 'expired') return null;
  return (
    <div role="alert" data-testid="expired-banner" className="rounded-lg border-2 border-l-8 border-caution-700 bg-caution-50 px-4 py-3 text-caution-700">
      <p className="font-bold">
        Expired: past its expiry date <span className="num">{d.expiry.expiresOn}</span>
      </p>
      <p className="text-ink">
        Do not use it: it cannot be the parent of another standard, and no labels can be printed for it.
        {d.statusBeforeExpiry ? ` Before it expired it was ${statusLabel(d.statusBeforeExpiry).toLowerCase()}.` : ''} Only QA can extend the
        expiry, with the evidence and their signature.
      </p>
    </div>
  );
}

/** The expiry section of the record: the cap, the extensions so far, and for QA the "Extend expiry" form (EX-01, EX-05). */
export function ExpiryPanel({ d, timeZone }: { d: ExpiryDetail; timeZone?: string }) {
  const auth = useAuth();
  const isQa = auth.status === 'signed-in' && auth.user.role === 'qa';
  const extensions = d.expiryExtensions ?? [];
  return (
    <div className="flex flex-col gap-5" data-testid="expiry-panel">
      <div>
        <p className="text-lg">
          Expires <span className="num font-semibold" data-testid="expiry-date">{d.expiry.expiresOn}</span>
        </p>
        <p className="text-ink-soft" data-testid="expiry-reason-text">{expiryReasonText(d.expiry.reason, d.stage !== undefined && d.stage !== 'complete')}</p>
        <p className="mt-1" data-testid="expiry-cap">
          {d.expiryCap ? (
            <>
              An extension cannot be later than <span className="num font-semibold">{d.expiryCap.date}</span>, limited by {d.expiryCap.limitedBy}.
            </>
          ) : (
            'No input of this record has an expiry date, so nothing caps an extension; the evidence must support the date.'
          )}
        </p>
      </div>

      <div>
        <h3 className="mb-2 text-lg font-bold">Expiry extensions</h3>
        {extensions.length === 0 ? (
          <p className="text-ink-soft" data-testid="expiry-extensions-none">
            None: the expiry is as set when the solution was made.
          </p>
        ) : (
          <ol className="flex flex-col gap-3" data-testid="expiry-extensions">
            {extensions.map((e) => (
              <li key={e.id} className="rounded-lg border-2 border-line px-4 py-3" data-testid="expiry-extension">
                <p className="text-lg font-semibold">
                  <span className="num">{e.previousExpiresOn}</span> → <span className="num">{e.newExpiresOn}</span>
                </p>
                <p>{e.reason}</p>
                <p className="text-sm text-ink-soft">
                  {e.meaningText} — {e.signedBy.fullName}, {formatLabTime(e.signedAt, timeZone)} (record v {e.recordVersion})
                </p>
              </li>
            ))}
          </ol>
        )}
      </div>

      {isQa ? (
        d.canExtendExpiry?.allowed ? (
          <ExtendForm d={d} />
        ) : (
          <p className="rounded-lg border-2 border-line bg-slate-100 px-4 py-3" data-testid="expiry-extend-unavailable">
            {d.canExtendExpiry?.reason ?? 'The expiry cannot be extended.'}
          </p>
        )
      ) : null}
    </div>
  );
}

const FORM_FIELDS = ['newExpiresOn', 'reason', 'password'] as const;

function ExtendForm({ d }: { d: ExpiryDetail }) {
  const auth = useAuth();
  const extend = useExtendExpiry(d.identifier);
  const [needsAck, setNeedsAck] = useState(d.canSign?.acknowledgementRequired === true);
  const [banner, setBanner] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const [relabel, setRelabel] = useState<{ from: string; to: string } | null>(null);
  const form = useForm<ExtendFormValues>({
    resolver: zodResolver(extendFormSchema(d.expiry.expiresOn, d.expiryCap)),
    defaultValues: { newExpiresOn: '', reason: '', password: '', acknowledge: false },
  });
  const errors = form.formState.errors;

  const submit = form.handleSubmit(async (values) => {
    setBanner(null);
    setDone(null);
    setRelabel(null);
    const ack = acknowledgeProblem(needsAck, values.acknowledge);
    if (ack) {
      form.setError('acknowledge', { type: 'client', message: ack });
      return;
    }
    try {
      const next = await extend.mutateAsync(toInput(values, needsAck));
      form.reset({ newExpiresOn: '', reason: '', password: '', acknowledge: false });
      setNeedsAck(false);
      setDone(`Expiry extended to ${next.expiry.expiresOn}.`);
      setRelabel({ from: d.expiry.expiresOn, to: next.expiry.expiresOn });
    } catch (e) {
      form.setValue('password', '');
      if (!(e instanceof ApiError)) {
        setBanner(e instanceof Error ? e.message : 'Something went wrong.');
        return;
      }
      let placed = 0;
      for (const [path, message] of Object.entries(e.fields)) {
        if ((FORM_FIELDS as readonly string[]).includes(path)) {
          form.setError(path as (typeof FORM_FIELDS)[number], { type: 'server', message });
          placed += 1;
        } else if (path === 'acknowledgeResponsibility') {
          setNeedsAck(true);
          form.setError('acknowledge', { type: 'server', message: 'Tick the statement to acknowledge it before your first signature' });
          placed += 1;
        }
      }
      if (e.code === 'signature_password' && !e.fields.password) form.setError('password', { type: 'server', message: e.message });
      else if (placed === 0 || placed < Object.keys(e.fields).length) setBanner(e.message);
    }
  });

  if (auth.status !== 'signed-in') return null;

  return (
    <form noValidate onSubmit={submit} className="flex flex-col gap-4 rounded-lg border-2 border-slate-700 p-4" data-testid="expiry-extend-form">
      <h3 className="text-xl font-bold">Extend expiry</h3>
      <div className="rounded-lg border-2 border-slate-700 bg-slate-100 px-4 py-3">
        <p className="text-sm font-semibold uppercase tracking-wide text-ink-soft">Meaning of this signature</p>
        <p className="text-lg font-bold" data-testid="expiry-meaning-text">
          {EXPIRY_EXTENSION_MEANING_TEXT}
        </p>
        <p className="mt-1 text-ink-soft">
          Applies to <span className="num font-semibold text-ink">{d.identifier}</span> v {d.version}; signed by{' '}
          <span className="font-semibold text-ink">{auth.user.fullName}</span> (you sign only as yourself).
        </p>
      </div>

      {done ? (
        <Banner tone="ok" testId="expiry-extended">
          {done}
        </Banner>
      ) : null}
      {done && relabel ? (
        <div role="note" data-testid="expiry-relabel" className="rounded-lg border-4 border-brass-400 bg-brass-100 px-4 py-3">
          <p className="font-bold">Labels already printed still show {relabel.from}.</p>
          <p className="mt-1">Relabel the bottles: print the labels again (a reprint, with the reason filled in) and destroy the old labels.</p>
          <Link to={relabelHref(d.identifier, relabel.from, relabel.to)} data-testid="expiry-relabel-print" className="mt-2 inline-flex min-h-12 items-center rounded-lg border-2 border-slate-700 bg-card px-4 font-semibold">
            Reprint labels →
          </Link>
        </div>
      ) : null}
      {banner ? (
        <Banner title="Not extended" testId="expiry-refused">
          {banner}
        </Banner>
      ) : null}

      <TextField
        label="New expiry date (YYYY-MM-DD)"
        {...ISO_DATE_INPUT}
        numeric
        registration={form.register('newExpiresOn')}
        error={errors.newExpiresOn?.message}
        hint={
          d.expiryCap
            ? `Later than ${d.expiry.expiresOn}; cannot be later than ${d.expiryCap.date}, limited by ${d.expiryCap.limitedBy}.`
            : `Later than ${d.expiry.expiresOn}.`
        }
        data-testid="expiry-new-date"
      />

      <div>
        <label htmlFor="expiry-reason" className="mb-1 block text-sm font-semibold">
          Reason and evidence (required): the study, test result or report that supports the new date
        </label>
        <textarea
          id="expiry-reason"
          rows={3}
          data-testid="expiry-reason"
          {...form.register('reason')}
          aria-invalid={errors.reason ? true : undefined}
          aria-describedby={errors.reason ? 'expiry-reason-error' : undefined}
          className="field-input"
        />
        {errors.reason ? (
          <p id="expiry-reason-error" role="alert" className="mt-1 text-sm font-semibold text-bad-700">
            {errors.reason.message}
          </p>
        ) : null}
      </div>

      {needsAck ? (
        <div className="rounded-lg border-2 border-l-8 border-caution-700 bg-caution-50 px-4 py-3" data-testid="expiry-responsibility">
          <p className="font-bold text-caution-700">Your first electronic signature</p>
          <p className="mt-1">{SIGNATURE_RESPONSIBILITY_STATEMENT}</p>
          <label htmlFor="expiry-ack" className="mt-3 flex min-h-12 cursor-pointer items-center gap-3 rounded-lg border-2 border-line bg-card px-3 py-2 has-[:checked]:border-slate-700">
            <input
              id="expiry-ack"
              type="checkbox"
              data-testid="expiry-acknowledge"
              {...form.register('acknowledge')}
              aria-invalid={errors.acknowledge ? true : undefined}
              aria-describedby={errors.acknowledge ? 'expiry-ack-error' : undefined}
              className="size-6 shrink-0 accent-slate-700"
            />
            <span className="font-semibold">I have read and accept this statement</span>
          </label>
          {errors.acknowledge ? (
            <p id="expiry-ack-error" role="alert" className="mt-1 text-sm font-semibold text-bad-700">
              {errors.acknowledge.message}
            </p>
          ) : null}
        </div>
      ) : null}

      <input type="text" name="username" autoComplete="username" value={auth.user.email} readOnly hidden />
      <TextField
        label="Your password (asked at every signature)"
        type="password"
        autoComplete="current-password"
        registration={form.register('password')}
        error={errors.password?.message}
        data-testid="expiry-password"
      />

      <div>
        <Button type="submit" busy={extend.isPending} data-testid="expiry-submit" className="min-h-14 text-lg">
          Sign and extend the expiry
        </Button>
      </div>
    </form>
  );
}
