import { useEffect, useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { get, useForm, useWatch, type FieldErrors } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { z } from 'zod';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { ChoiceField, SelectField, TextField } from '../../../components/ui/field.tsx';
import { applyApiFieldErrors } from '../../../lib/form.ts';
import { DECIMAL_TEXT } from '../../../../shared/schemas/decimal-text.ts';
import { pickerQueries } from '../api/preparation-queries.ts';
import { useRecordMakeUp } from '../api/preparation-mutations.ts';
import type { PreparationDetail } from '../types.ts';
import { ApiError } from '../../../lib/api-client.ts';
import { useChangeSignature } from '../../signatures/components/change-signature.tsx';

const makeUpFormSchema = (needsReason: boolean) =>
  z.object({
    flaskIdentifier: z.string().trim().min(1, 'Scan or type the identifier on the flask'),
    solventId: z.string().min(1, 'Choose the solvent'),
    solventLot: z.string().trim().min(1, 'Enter the solvent lot'),
    solutionTemperatureC: z.string().trim().min(1, 'Enter the solution temperature').regex(DECIMAL_TEXT, 'Enter the temperature as a number, e.g. 20.5'),
    applyTemperatureCorrection: z.boolean(),
    correctionReason: needsReason ? z.string().trim().min(3, 'Give the reason for making up again (at least 3 characters)') : z.string(),
  });
type MakeUpFormIn = z.input<ReturnType<typeof makeUpFormSchema>>;

const FIELDS = ['flaskIdentifier', 'solventId', 'solventLot', 'solutionTemperatureC', 'applyTemperatureCorrection', 'correctionReason'] as const;

/** Make up to the mark: confirm the flask (typed or scanned), the solvent and its lot, the solution temperature. */
export function MakeUpForm({ detail, onDone }: { detail: PreparationDetail; onDone: (d: PreparationDetail) => void }) {
  const solvents = useQuery(pickerQueries.solvents());
  const record = useRecordMakeUp(detail.identifier);
  // A change to a signed record needs the changer's password as well (an "amended" signature).
  const change = useChangeSignature(detail);
  const needsReason = !!detail.makeUp || change.required;
  const form = useForm<MakeUpFormIn>({
    resolver: zodResolver(makeUpFormSchema(needsReason)),
    defaultValues: { flaskIdentifier: '', solventId: '', solventLot: '', solutionTemperatureC: '', applyTemperatureCorrection: false, correctionReason: '' },
  });
  const { register, control, handleSubmit, setError, setValue } = form;
  const errors: FieldErrors<MakeUpFormIn> = form.formState.errors;
  const solventId = useWatch({ control, name: 'solventId' });
  const [banner, setBanner] = useState<string | null>(null);

  // Choosing a solvent fills in its lot from the inventory; the bench can overwrite it.
  useEffect(() => {
    const s = solvents.data?.find((x) => String(x.id) === solventId);
    if (s) setValue('solventLot', s.lot, { shouldValidate: false });
  }, [solventId, solvents.data, setValue]);

  const err = (name: string) => (get(errors, name) as { message?: string } | undefined)?.message;
  const planned = detail.snapshot.flask;

  const onSubmit = handleSubmit((v) => {
    setBanner(null);
    if (!change.validate()) return;
    record.mutate(
      {
        flaskIdentifier: v.flaskIdentifier.trim(),
        solventId: Number(v.solventId),
        solventLot: v.solventLot.trim(),
        solutionTemperatureC: v.solutionTemperatureC.trim(),
        applyTemperatureCorrection: v.applyTemperatureCorrection,
        ...(needsReason ? { correctionReason: v.correctionReason.trim() } : {}),
        ...change.payload(),
      },
      {
        onSuccess: (next) => {
          form.reset();
          change.reset();
          onDone(next);
        },
        onError: (e) => {
          if (change.applyServerError(e) && e instanceof ApiError && Object.keys(e.fields).every((k) => k === 'password' || k.startsWith('signature.'))) return;
          setBanner(applyApiFieldErrors(e, setError, FIELDS));
        },
      },
    );
  });

  return (
    <form noValidate onSubmit={onSubmit} aria-label="Make up to volume" className="flex flex-col gap-4" data-testid="make-up-form">
      <TextField
        label="Flask identifier (scan or type)"
        registration={register('flaskIdentifier')}
        error={err('flaskIdentifier')}
        hint={planned ? `Planned: ${planned.identifier} (${planned.nominalVolumeMl} mL). Another in-service flask of the same volume may be used.` : 'Any in-service volumetric flask of the planned volume.'}
        className="[&_input]:font-mono [&_input]:min-h-14 [&_input]:text-2xl"
      />
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField
          label="Solvent"
          registration={register('solventId')}
          error={err('solventId')}
          options={[{ value: '', label: solvents.isPending ? 'Loading…' : 'Choose the solvent…' }, ...(solvents.data ?? []).map((s) => ({ value: String(s.id), label: `${s.name}${s.grade ? ` (${s.grade})` : ''}` }))]}
        />
        <TextField label="Solvent lot" registration={register('solventLot')} error={err('solventLot')} />
        <TextField numeric label="Solution temperature" suffix="°C" inputMode="decimal" registration={register('solutionTemperatureC')} error={err('solutionTemperatureC')} />
      </div>
      <ChoiceField
        label="Correct the concentration for temperature"
        hint="Flask and solution expansion back to 20 °C (the flask's reference temperature)"
        registration={register('applyTemperatureCorrection')}
      />
      {needsReason ? (
        <TextField label="Reason for making up again (required)" registration={register('correctionReason')} error={err('correctionReason')} />
      ) : null}
      {change.fields}
      {banner ? <Banner title="The make-up was not saved">{banner}</Banner> : null}
      <Button type="submit" data-testid="save-make-up" busy={record.isPending} className="min-h-16 text-xl">
        {needsReason ? 'Save the new make-up' : 'Save make-up'}
      </Button>
    </form>
  );
}
