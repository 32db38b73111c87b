import { useEffect, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { retireInputSchema, type RetireInput } from '../../../../shared/schemas/inventory.ts';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { applyApiFieldErrors } from '../../../lib/form.ts';

/**
 * "Retire" asks for a reason in a modal dialog before anything is sent. Nothing is ever deleted: the item
 * stays in the register (and in every record that used it) with status "retired".
 */
export function RetireDialog({
  open,
  itemName,
  onClose,
  onRetire,
  busy,
}: {
  open: boolean;
  itemName: string;
  onClose: () => void;
  onRetire: (reason: string) => Promise<unknown>;
  busy: boolean;
}) {
  const ref = useRef<HTMLDialogElement>(null);
  const [banner, setBanner] = useState<string | null>(null);
  const form = useForm<RetireInput>({ resolver: zodResolver(retireInputSchema), defaultValues: { reason: '' } });
  const error = form.formState.errors.reason?.message;

  useEffect(() => {
    const d = ref.current;
    if (!d) return;
    if (open && !d.open) {
      form.reset({ reason: '' });
      setBanner(null);
      d.showModal();
    }
    if (!open && d.open) d.close();
  }, [open, form]);

  const submit = form.handleSubmit(async ({ reason }) => {
    setBanner(null);
    try {
      await onRetire(reason);
    } catch (e) {
      setBanner(applyApiFieldErrors(e, form.setError, ['reason']));
    }
  });

  return (
    <dialog
      ref={ref}
      onClose={onClose}
      aria-labelledby="retire-title"
      data-testid="retire-dialog"
      className="m-auto w-[min(36rem,calc(100vw-2rem))] rounded-xl border-2 border-line bg-card p-0 text-ink backdrop:bg-slate-900/60"
    >
      <form noValidate onSubmit={submit} className="flex flex-col gap-4 p-6">
        <h2 id="retire-title" className="text-2xl font-bold">
          Retire {itemName}?
        </h2>
        <p className="text-ink-soft">
          A retired item can no longer be chosen for new work. It is not deleted: its record and every use of it stay
          readable, and the reason is kept in the audit trail.
        </p>
        {banner ? <Banner title="Not retired">{banner}</Banner> : null}
        <div>
          <label htmlFor="retire-reason" className="mb-1 block text-sm font-semibold">
            Reason (required)
          </label>
          <textarea
            id="retire-reason"
            rows={3}
            {...form.register('reason')}
            aria-invalid={error ? true : undefined}
            aria-describedby={error ? 'retire-reason-error' : undefined}
            className="field-input"
          />
          {error ? (
            <p id="retire-reason-error" role="alert" className="mt-1 text-sm font-semibold text-bad-700">
              {error}
            </p>
          ) : null}
        </div>
        <div className="flex flex-wrap justify-end gap-3">
          <Button variant="secondary" onClick={onClose} disabled={busy}>
            Keep it
          </Button>
          <Button type="submit" variant="danger" busy={busy} data-testid="retire-confirm">
            Retire
          </Button>
        </div>
      </form>
    </dialog>
  );
}
