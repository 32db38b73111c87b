import { useEffect, useState } from 'react';
import { get, useForm, useWatch, type FieldErrors } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { ChoiceField, SelectField, TextField } from '../../../components/ui/field.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { applyApiFieldErrors } from '../../../lib/form.ts';
import type { RoomConditions } from '../../../../shared/schemas/settings.ts';
import { SIGNED_READING_TEXT } from '../../../../shared/schemas/preparations.ts';
import { checkReadingRange } from '../../../../shared/prep/reading.ts';
import { useRecordWeighing } from '../api/preparation-mutations.ts';
import { balanceDecimals } from '../format.ts';
import { conditionsFormSchema, toConditionsInput } from '../plan-form-schema.ts';
import type { PreparationDetail, Weighing, WeighingInput } from '../types.ts';
import { ConditionsFields, isoToLocalInput, nowLocalInput } from './conditions-fields.tsx';
import { useChangeSignature } from '../../signatures/components/change-signature.tsx';

const readingText = z
  .string()
  .trim()
  .refine((s) => s === '' || SIGNED_READING_TEXT.test(s), 'Type the reading exactly as the balance shows it: digits and a point only, e.g. 160.07');

const weighingFormSchema = z
  .object({
    mode: z.enum(['direct', 'difference']),
    reading: readingText,
    before: readingText,
    after: readingText,
    unit: z.enum(['mg', 'g']),
    conditions: conditionsFormSchema,
    correctionReason: z.string(),
  })
  .superRefine((w, ctx) => {
    const need = (ok: boolean, path: string, message: string) => ok || ctx.addIssue({ code: 'custom', path: [path], message });
    if (w.mode === 'direct') need(w.reading.trim() !== '', 'reading', 'Enter the reading exactly as the balance shows it');
    else {
      need(w.before.trim() !== '', 'before', 'Enter the reading with the material, before transfer');
      need(w.after.trim() !== '', 'after', 'Enter the reading after transfer');
    }
  });
type WeighingFormIn = z.input<typeof weighingFormSchema>;
type WeighingFormOut = z.output<typeof weighingFormSchema>;

const FIELDS = ['mode', 'reading', 'before', 'after', 'unit', 'conditions.temperatureC', 'conditions.pressureHPa', 'conditions.relativeHumidityPct', 'conditions.measuredAt', 'correctionReason'] as const;

function initialValues(detail: PreparationDetail): WeighingFormIn {
  const c = detail.conditionsUsed;
  return {
    mode: 'direct',
    reading: '',
    before: '',
    after: '',
    unit: 'mg',
    conditions:
      c.source === 'lab-default'
        ? { source: 'lab-default', temperatureC: '', pressureHPa: '', relativeHumidityPct: '', measuredAt: nowLocalInput() }
        : { source: 'measured', temperatureC: c.temperatureC, pressureHPa: c.pressureHPa, relativeHumidityPct: c.relativeHumidityPct, measuredAt: nowLocalInput() },
    correctionReason: '',
  };
}

/**
 * Record a weighing: the reading is sent exactly as typed (a string, never a number). A reading outside
 * the window comes back as 400 fields.outOfWindowReason; the form then asks for the reason and resends
 * with confirmOutOfWindow. With `correcting`, the entry supersedes an earlier one and needs a reason.
 */
export function WeighingForm({
  detail,
  correcting,
  onDone,
  onCancelCorrection,
  defaults,
}: {
  detail: PreparationDetail;
  correcting: Weighing | null;
  onDone: (detail: PreparationDetail) => void;
  onCancelCorrection: () => void;
  defaults?: RoomConditions;
}) {
  const record = useRecordWeighing(detail.identifier);
  const form = useForm<WeighingFormIn, unknown, WeighingFormOut>({ resolver: zodResolver(weighingFormSchema), defaultValues: initialValues(detail), mode: 'onSubmit' });
  const { register, control, handleSubmit, setError, reset } = form;
  const errors: FieldErrors<WeighingFormIn> = form.formState.errors;
  const watched = useWatch({ control }) as WeighingFormIn;
  const [banner, setBanner] = useState<string | null>(null);
  const [oow, setOow] = useState<{ message: string; input: WeighingInput } | null>(null);
  const [reason, setReason] = useState('');
  const [reasonError, setReasonError] = useState<string | null>(null);
  // A change to a signed record needs a reason and the changer's password (an "amended" signature).
  const change = useChangeSignature(detail);
  const needsReason = !!correcting || change.required;

  useEffect(() => {
    if (correcting) {
      form.setValue('mode', correcting.mode);
      form.setValue('unit', (correcting.reading?.unit ?? correcting.before?.unit ?? 'mg') as 'mg' | 'g');
      form.setValue('conditions.measuredAt', isoToLocalInput(undefined));
    }
  }, [correcting, form]);

  const balance = detail.snapshot.balance;
  const unit = watched.unit ?? 'mg';
  const decimals = balanceDecimals(balance?.readabilityMg, unit);
  const hint =
    decimals === null
      ? 'Type it exactly as the balance shows it.'
      : `${balance.identifier} shows ${decimals} decimal${decimals === 1 ? '' : 's'} in ${unit}: type all of them, trailing zeros included.`;

  const err = (name: string) => (get(errors, name) as { message?: string } | undefined)?.message;

  const send = (input: WeighingInput) => {
    setBanner(null);
    record.mutate(input, {
      onSuccess: (next) => {
        setOow(null);
        setReason('');
        change.reset();
        reset({ ...initialValues(next), unit: input.unit, mode: input.mode });
        onDone(next);
      },
      onError: (e) => {
        if (e instanceof ApiError && e.fields.outOfWindowReason && !input.confirmOutOfWindow) {
          setOow({ message: e.fields.outOfWindowReason, input });
          return;
        }
        if (e instanceof ApiError && e.fields.outOfWindowReason) {
          setReasonError(e.fields.outOfWindowReason);
          return;
        }
        setOow(null);
        if (change.applyServerError(e) && e instanceof ApiError && Object.keys(e.fields).every((k) => k === 'password' || k.startsWith('signature.'))) return;
        setBanner(applyApiFieldErrors(e, setError, FIELDS));
      },
    });
  };

  const onSubmit = handleSubmit((v) => {
    if (needsReason && v.correctionReason.trim().length < 3) {
      setError('correctionReason', { type: 'manual', message: 'Give the reason for the correction (at least 3 characters)' });
      return;
    }
    // a reading this balance cannot show is refused here, at the field, as the server would (422)
    let impossible = false;
    const fieldsNow = v.mode === 'direct' ? ([['reading', v.reading, 'A direct reading']] as const) : ([['before', v.before, 'The reading before transfer'], ['after', v.after, 'The reading after transfer']] as const);
    for (const [name, value, what] of fieldsNow) {
      if (!balance?.capacityG) break;
      const range = checkReadingRange(value, v.unit, balance.capacityG, { net: name === 'reading', balanceIdentifier: balance.identifier, what });
      if (!range.ok) {
        setError(name, { type: 'manual', message: range.message });
        impossible = true;
      }
    }
    if (impossible) return;
    if (!change.validate()) return;
    const input: WeighingInput = {
      mode: v.mode,
      unit: v.unit,
      conditions: toConditionsInput(v.conditions),
      ...(v.mode === 'direct' ? { reading: v.reading.trim() } : { before: v.before.trim(), after: v.after.trim() }),
      ...(correcting ? { supersedesId: correcting.id, correctionReason: v.correctionReason.trim() } : {}),
      ...(!correcting && change.required ? { correctionReason: v.correctionReason.trim() } : {}),
      ...change.payload(),
    };
    send(input);
  });

  const confirmOutOfWindow = () => {
    if (!oow) return;
    if (reason.trim().length < 3) {
      setReasonError('Give the reason the reading is outside the window (at least 3 characters)');
      return;
    }
    setReasonError(null);
    send({ ...oow.input, confirmOutOfWindow: true, outOfWindowReason: reason.trim() });
  };

  const mode = watched.mode ?? 'direct';
  return (
    <form noValidate onSubmit={onSubmit} aria-label={correcting ? `Correct weighing #${correcting.id}` : 'Record a weighing'} className="flex flex-col gap-5" data-testid="weighing-form">
      {correcting ? (
        <Banner tone="info" title={`Correcting weighing #${correcting.id}`}>
          The earlier entry stays in the record, marked superseded.{' '}
          <button type="button" className="min-h-12 font-semibold underline" onClick={onCancelCorrection}>
            Cancel the correction
          </button>
        </Banner>
      ) : null}
      <div className="grid gap-2 sm:grid-cols-2" role="radiogroup" aria-label="How you weigh">
        <ChoiceField type="radio" value="direct" label="Direct" hint="into a tared vessel: one reading" registration={register('mode')} />
        <ChoiceField type="radio" value="difference" label="By difference" hint="vessel before and after transfer" registration={register('mode')} />
      </div>
      <div className="grid gap-4 sm:grid-cols-[minmax(0,1fr)_8rem]">
        {mode === 'direct' ? (
          <ReadingInput label="Balance reading" name="reading" register={register} error={err('reading')} hint={hint} />
        ) : (
          <div className="grid gap-4 sm:grid-cols-2">
            <ReadingInput label="Before transfer (vessel + material)" name="before" register={register} error={err('before')} hint={hint} />
            <ReadingInput label="After transfer (vessel)" name="after" register={register} error={err('after')} />
          </div>
        )}
        <SelectField label="Unit" registration={register('unit')} error={err('unit')} options={[{ value: 'mg', label: 'mg' }, { value: 'g', label: 'g' }]} />
      </div>

      <div>
        <h3 className="mb-2 text-lg font-bold">Room conditions now</h3>
        <ConditionsFields
          register={(n) => register(n)}
          source={watched.conditions?.source ?? 'measured'}
          defaults={defaults}
          errors={{
            temperatureC: err('conditions.temperatureC'),
            pressureHPa: err('conditions.pressureHPa'),
            relativeHumidityPct: err('conditions.relativeHumidityPct'),
            measuredAt: err('conditions.measuredAt'),
          }}
        />
      </div>

      {needsReason ? (
        <TextField label="Reason for the correction (required)" registration={register('correctionReason')} error={err('correctionReason')} data-testid="correction-reason" />
      ) : null}
      {change.fields}

      {oow ? (
        <div role="alert" data-testid="oow-panel" className="flex flex-col gap-3 rounded-xl border-2 border-l-8 border-caution-700 bg-caution-50 px-4 py-4">
          <p className="text-lg font-bold text-caution-700">The reading is outside the acceptable window</p>
          <p data-testid="oow-message">{oow.message}</p>
          <p>It is kept only with a reason. Otherwise cancel and weigh again.</p>
          <label htmlFor="oow-reason" className="font-semibold">
            Reason for keeping it
          </label>
          <textarea
            id="oow-reason"
            data-testid="oow-reason"
            value={reason}
            onChange={(e) => setReason(e.target.value)}
            rows={2}
            aria-invalid={reasonError ? true : undefined}
            className="field-input"
          />
          {reasonError ? (
            <p role="alert" className="text-sm font-semibold text-bad-700">
              {reasonError}
            </p>
          ) : null}
          <div className="flex flex-wrap gap-3">
            <Button data-testid="oow-confirm" onClick={confirmOutOfWindow} busy={record.isPending}>
              Keep it with this reason
            </Button>
            <Button variant="secondary" data-testid="oow-cancel" onClick={() => setOow(null)}>
              Cancel, weigh again
            </Button>
          </div>
        </div>
      ) : null}

      {banner ? <Banner title="The weighing was not saved">{banner}</Banner> : null}
      {!oow ? (
        <Button type="submit" data-testid="save-weighing" busy={record.isPending} className="min-h-16 text-xl">
          {correcting ? 'Save the correction' : 'Save weighing'}
        </Button>
      ) : null}
    </form>
  );
}

function ReadingInput({
  label,
  name,
  register,
  error,
  hint,
}: {
  label: string;
  name: 'reading' | 'before' | 'after';
  register: ReturnType<typeof useForm<WeighingFormIn, unknown, WeighingFormOut>>['register'];
  error?: string;
  hint?: string;
}) {
  return (
    <div>
      <label htmlFor={name} className="mb-1 block text-base font-semibold">
        {label}
      </label>
      <input
        id={name}
        type="text"
        inputMode="decimal"
        autoComplete="off"
        spellCheck={false}
        data-testid={`input-${name}`}
        {...register(name)}
        aria-invalid={error ? true : undefined}
        aria-describedby={[hint ? `${name}-hint` : '', error ? `${name}-error` : ''].filter(Boolean).join(' ') || undefined}
        className="field-input num min-h-16 text-3xl"
      />
      {hint ? (
        <p id={`${name}-hint`} className="mt-1 text-sm text-ink-soft">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${name}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}
