/**
 * Record the aliquot of a volumetric dilution at the bench (POST /api/preparations/:key/aliquots):
 * scan (or type) the pipette's identifier — the scanner types the code and Enter — and, for a piston pipette,
 * the volume set. A correction is a new record that supersedes the current one, with a reason (append-only).
 * Server field errors land on their fields; anything else in a banner.
 */
import { useRef, useState } from 'react';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { get, useForm, useWatch, type FieldErrors } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Button } from '../../../components/ui/button.tsx';
import { Banner } from '../../../components/ui/feedback.tsx';
import { TextField } from '../../../components/ui/field.tsx';
import { api } from '../../../lib/api-client.ts';
import { applyApiFieldErrors } from '../../../lib/form.ts';
import type { Aliquot, AliquotInput, DilutionSection } from '../../../../shared/schemas/lineage.ts';
import { preparationKeys } from '../../preparations/api/preparation-keys.ts';
import type { PreparationDetail } from '../../preparations/types.ts';
import { ALIQUOT_FORM_FIELDS, aliquotFieldsFor, aliquotFormSchema, pipetteMatch, toAliquotInput, wareKindLabel, type AliquotFormValues } from './aliquot-fields.ts';

export function useRecordAliquot(key: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: AliquotInput) => api.post<PreparationDetail>(`/api/preparations/${encodeURIComponent(key)}/aliquots`, input),
    onSuccess: (d) => {
      queryClient.setQueryData(preparationKeys.detail(d.identifier), d);
      queryClient.setQueryData(preparationKeys.detail(String(d.id)), d);
      void queryClient.invalidateQueries({ queryKey: preparationKeys.lists() });
      void queryClient.invalidateQueries({ queryKey: ['trace'] });
    },
  });
}

export function AliquotForm({
  detail,
  dilution,
  correcting,
  onDone,
  onCancel,
  componentId,
}: {
  detail: PreparationDetail;
  /** a dilution's section, or a mix component (its plannedAliquot) */
  dilution: Pick<DilutionSection, 'plannedAliquot'>;
  /** a mix only: the component (MixComponent.linkId) this aliquot is for */
  componentId?: number;
  /** the current aliquot when this entry corrects it */
  correcting?: Aliquot | null;
  onDone: (next: PreparationDetail) => void;
  onCancel?: () => void;
}) {
  const planned = dilution.plannedAliquot;
  const fields = aliquotFieldsFor(planned.pipette.snapshot);
  const record = useRecordAliquot(detail.identifier);
  const form = useForm<AliquotFormValues>({
    resolver: zodResolver(aliquotFormSchema(fields, !!correcting)),
    defaultValues: { pipetteIdentifier: '', volumeMl: fields.volume === 'set' ? planned.volumeMl : '', correctionReason: '' },
  });
  const { register, handleSubmit, setError, control } = form;
  const errors: FieldErrors<AliquotFormValues> = form.formState.errors;
  const err = (name: string) => (get(errors, name) as { message?: string } | undefined)?.message;
  const typed = useWatch({ control, name: 'pipetteIdentifier' }) ?? '';
  const match = pipetteMatch(typed, planned.pipette.identifier);
  const [banner, setBanner] = useState<string | null>(null);
  const volumeRef = useRef<HTMLInputElement | null>(null);
  const reasonRef = useRef<HTMLInputElement | null>(null);

  const onSubmit = handleSubmit((v) => {
    setBanner(null);
    const input = toAliquotInput(v, { fields, plannedIdentifier: planned.pipette.identifier, ...(correcting ? { supersedesId: correcting.id } : {}) });
    record.mutate(componentId !== undefined ? { ...input, componentId } : input, {
      onSuccess: (next) => {
        form.reset();
        onDone(next);
      },
      onError: (e) => setBanner(applyApiFieldErrors(e, setError, ALIQUOT_FORM_FIELDS)),
    });
  });

  const pipetteReg = register('pipetteIdentifier');
  const volumeReg = register('volumeMl');
  const reasonReg = register('correctionReason');
  const kind = wareKindLabel(planned.pipette.snapshot.kind);

  return (
    <form noValidate onSubmit={onSubmit} aria-label={correcting ? `Correct aliquot #${correcting.id}` : 'Record the aliquot'} className="flex flex-col gap-4" data-testid="aliquot-form">
      {correcting ? (
        <Banner tone="info" title={`Correcting aliquot #${correcting.id}`}>
          The earlier record stays, marked superseded; the concentration is recomputed from the new one.
        </Banner>
      ) : null}
      <TextField
        label="Pipette identifier (scan or type, then Enter)"
        registration={pipetteReg}
        // A scanner types the code and Enter: with more to fill in, Enter moves on instead of saving.
        onKeyDown={(e) => {
          if (e.key !== 'Enter') return;
          const next = fields.volume === 'set' ? volumeRef.current : correcting ? reasonRef.current : null;
          if (next) {
            e.preventDefault();
            next.focus();
            next.select();
          }
        }}
        autoFocus
        error={err('pipetteIdentifier')}
        hint={
          match === 'other'
            ? `Not the planned ${planned.pipette.identifier}: another in-service ${planned.pipette.snapshot.nominalVolumeMl} mL ${kind} may be used, and the record notes the substitution.`
            : match === 'planned'
              ? `The planned pipette, ${planned.pipette.identifier}.`
              : `Planned: ${planned.pipette.identifier} (${planned.pipette.snapshot.nominalVolumeMl} mL ${kind}).`
        }
        data-testid="aliquot-pipette"
        className="[&_input]:min-h-16 [&_input]:font-mono [&_input]:text-3xl"
      />
      {fields.volume === 'set' ? (
        <TextField
          numeric
          label={`Volume set on the pipette (${fields.minMl} to ${fields.maxMl} mL)`}
          suffix="mL"
          inputMode="decimal"
          registration={{ ...volumeReg, ref: (el) => { volumeReg.ref(el); volumeRef.current = el; } }}
          error={err('volumeMl')}
          hint={`Planned: ${planned.volumeMl} mL. Type the volume exactly as set on the pipette.`}
          data-testid="aliquot-volume"
          className="[&_input]:min-h-16 [&_input]:text-3xl"
        />
      ) : (
        <p className="text-lg" data-testid="aliquot-fixed-volume">
          A {kind} delivers its nominal <span className="num font-bold">{fields.deliversMl} mL</span>: nothing to set.
        </p>
      )}
      {correcting ? (
        <TextField
          label="Reason for the correction (required)"
          registration={{ ...reasonReg, ref: (el) => { reasonReg.ref(el); reasonRef.current = el; } }}
          error={err('correctionReason')}
          data-testid="aliquot-reason"
        />
      ) : null}
      {banner ? <Banner title="The aliquot was not saved">{banner}</Banner> : null}
      <div className="flex flex-wrap gap-3">
        <Button type="submit" data-testid="save-aliquot" busy={record.isPending} className="min-h-16 flex-1 text-xl">
          {correcting ? 'Save the correction' : 'Save aliquot'}
        </Button>
        {correcting && onCancel ? (
          <Button variant="secondary" data-testid="cancel-aliquot-correction" className="min-h-16" onClick={onCancel}>
            Cancel the correction
          </Button>
        ) : null}
      </div>
    </form>
  );
}
