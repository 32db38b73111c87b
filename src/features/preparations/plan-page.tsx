import { useEffect, useMemo, useState, type ReactNode } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useNavigate } from 'react-router';
import { get, useForm, useWatch, type FieldErrors } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Spinner } from '../../components/ui/feedback.tsx';
import { ChoiceField, SelectField, TextField } from '../../components/ui/field.tsx';
import { useDebouncedValue } from '../../hooks/use-debounced-value.ts';
import { ApiError } from '../../lib/api-client.ts';
import { applyApiFieldErrors } from '../../lib/form.ts';
import { settingsQueries } from '../calculate/api/settings-queries.ts';
import { fixed, sig } from '../calculate/format-result.ts';
import { pickerQueries, preparationQueries } from './api/preparation-queries.ts';
import { useCreatePreparation } from './api/preparation-mutations.ts';
import { ConditionsFields, nowLocalInput } from './components/conditions-fields.tsx';
import { GatePanels } from './components/gate-panels.tsx';
import { MaterialCard } from './components/material-card.tsx';
import { balanceDecimals, percent } from './format.ts';
import {
  CONCENTRATION_UNITS,
  EMPTY_PLAN,
  PLAN_FIELDS,
  VOLUME_UNITS,
  planFormSchema,
  toPlanInput,
  type PlanFormIn,
  type PlanFormOut,
} from './plan-form-schema.ts';
import type { PreviewResponse } from './types.ts';

const opts = (list: readonly string[]) => list.map((u) => ({ value: u, label: u }));

function Section({ title, children, hint }: { title: string; children: ReactNode; hint?: ReactNode }) {
  const id = `plan-${title.toLowerCase().replace(/[^a-z]+/g, '-')}`;
  return (
    <fieldset aria-labelledby={id} className="rounded-xl border-2 border-line bg-card p-5">
      <legend className="sr-only">{title}</legend>
      <h2 id={id} className="text-xl font-bold">
        {title}
      </h2>
      {hint ? <p className="mt-1 text-sm text-ink-soft">{hint}</p> : null}
      <div className="mt-4 flex flex-col gap-4">{children}</div>
    </fieldset>
  );
}

function Stat({ label, value, unit, testId }: { label: string; value: string; unit?: string; testId: string }) {
  return (
    <div className="rounded-lg border-2 border-line bg-card px-3 py-2">
      <dt className="text-sm font-semibold text-ink-soft">{label}</dt>
      <dd className="mt-1">
        <span data-testid={testId} className="num text-2xl font-semibold">
          {value}
        </span>
        {unit ? <span className="ml-2 text-base text-ink-soft">{unit}</span> : null}
      </dd>
    </div>
  );
}

function PreviewPanel({ preview, pending }: { preview: PreviewResponse; pending: boolean }) {
  const decimals = balanceDecimals(preview.snapshot.balance?.readabilityMg) ?? 2;
  return (
    <div className="flex flex-col gap-4" data-testid="plan-preview" aria-busy={pending || undefined}>
      <div className="rounded-xl border-4 border-brass-400 bg-brass-100 px-5 py-4">
        <p className="text-base font-bold">Reading to aim for on {preview.snapshot.balance?.identifier ?? 'the balance'}</p>
        <p className="mt-1 flex flex-wrap items-baseline gap-x-3">
          <span data-testid="plan-target-reading" className="num text-6xl font-bold tracking-tight">
            {fixed(preview.targetReading.value, decimals)}
          </span>
          <span className="text-2xl font-semibold">{preview.targetReading.unit}</span>
        </p>
        <p className="mt-2 text-base">
          Acceptable window (± {preview.window.pct} %):{' '}
          <span data-testid="plan-window" className="num font-semibold">
            {preview.window.low} … {preview.window.high} {preview.window.unit}
          </span>
        </p>
      </div>
      <dl className="grid gap-3 sm:grid-cols-2">
        <Stat label="True mass needed" testId="plan-true-mass" value={fixed(preview.calc.trueMass.value, decimals + 1)} unit={preview.calc.trueMass.unit} />
        <Stat label="Buoyancy factor (true mass ÷ reading)" testId="plan-buoyancy" value={fixed(preview.calc.buoyancyFactor, 7)} />
        <Stat label="Air density" testId="plan-air-density" value={sig(preview.calc.airDensity.value, 5)} unit="g/mL" />
        <Stat label="Gravimetric factor" testId="plan-gravimetric" value={sig(preview.calc.gravimetricFactor, 6)} />
      </dl>
      <div className="rounded-lg bg-slate-900 px-4 py-3 text-white">
        <p className="text-sm font-semibold text-slate-100">Expected concentration if you weigh exactly this (k = 2)</p>
        <p data-testid="plan-expected" className="num mt-1 text-2xl font-bold">
          {preview.expectedUncertainty.display}
        </p>
        <p className="text-sm text-slate-100">Relative standard uncertainty {percent(preview.expectedUncertainty.relative, 2)}</p>
      </div>
      <p className="text-sm text-ink-soft">
        Conditions used: {preview.conditionsUsed.source === 'lab-default' ? "the lab's defaults" : 'as measured'} —{' '}
        {preview.conditionsUsed.temperatureC} °C, {preview.conditionsUsed.pressureHPa} hPa, {preview.conditionsUsed.relativeHumidityPct} % RH.
      </p>
    </div>
  );
}

export function PlanPage() {
  const navigate = useNavigate();
  const settings = useQuery(settingsQueries.detail());
  const materials = useQuery(pickerQueries.materials());
  const balances = useQuery(pickerQueries.balances());
  const flasks = useQuery(pickerQueries.flasks());
  const create = useCreatePreparation();
  const [saveError, setSaveError] = useState<string | null>(null);

  const form = useForm<PlanFormIn, unknown, PlanFormOut>({
    resolver: zodResolver(planFormSchema),
    defaultValues: { ...EMPTY_PLAN, conditions: { ...EMPTY_PLAN.conditions, measuredAt: nowLocalInput() } },
    mode: 'onChange',
  });
  const { register, control, setValue, handleSubmit, setError } = form;
  const errors: FieldErrors<PlanFormIn> = form.formState.errors;
  const watched = useWatch({ control }) as PlanFormIn;

  const material = useMemo(() => materials.data?.find((m) => String(m.id) === watched.materialId), [materials.data, watched.materialId]);
  const analytes = material?.analytes ?? [];

  // Pick the first analyte when the material changes (the material's own list, REQUIREMENTS TR-02).
  useEffect(() => {
    if (!material) return;
    if (!material.analytes.some((a) => a.formula === form.getValues('analyteFormula'))) {
      setValue('analyteFormula', material.analytes[0]?.formula ?? '', { shouldValidate: true });
    }
  }, [material, setValue, form]);

  const body = useMemo(() => {
    const b = toPlanInput(watched);
    if (!b) return null;
    const { notes: _notes, ...plan } = b;
    return plan;
  }, [watched]);
  const debounced = useDebouncedValue(body, 300);
  const preview = useQuery(preparationQueries.preview(debounced));
  const previewError = preview.error instanceof ApiError ? preview.error : null;
  const previewData = body && !preview.isError ? preview.data : undefined;
  const blocked = (previewData?.gates ?? []).some((g) => g.severity === 'block');

  const err = (name: string): string | undefined =>
    (get(errors, name) as { message?: string } | undefined)?.message ?? (previewError && body ? previewError.fields[name] : undefined);

  const onSave = handleSubmit((values) => {
    setSaveError(null);
    const input = toPlanInput(values as PlanFormIn);
    if (!input) return;
    create.mutate(input, {
      onSuccess: (detail) => navigate(`/preparations/${encodeURIComponent(detail.identifier)}`),
      onError: (e) => {
        if (e.code === 'gate_blocked') {
          setSaveError(`${e.message} Fix the blocking checks shown with the plan, then save again.`);
          void preview.refetch();
          return;
        }
        setSaveError(applyApiFieldErrors(e, setError, PLAN_FIELDS));
      },
    });
  });

  if (materials.isPending || balances.isPending || flasks.isPending) return <Spinner label="Loading the lab's materials and equipment…" />;
  const listError = materials.error ?? balances.error ?? flasks.error;

  const materialOptions = [
    { value: '', label: 'Choose a reference material…' },
    ...(materials.data ?? []).map((m) => ({
      value: String(m.id),
      label: `${m.name} — lot ${m.lot}, purity ${m.purity.value}${m.expiresOn ? `, expires ${m.expiresOn}` : ''}`,
    })),
  ];
  const balanceOptions = [
    { value: '', label: 'Choose a balance…' },
    ...(balances.data ?? []).map((b) => ({
      value: String(b.id),
      label: `${b.identifier} — reads to ${b.readabilityMg} mg${b.minWeightMg ? `, min. ${b.minWeightMg} mg` : ''}${b.calibrationDueOn ? `, calibration due ${b.calibrationDueOn}` : ''}`,
    })),
  ];
  const flaskOptions = [
    { value: '', label: 'Choose a volumetric flask…' },
    ...(flasks.data ?? []).map((f) => ({
      value: String(f.id),
      // a flask holding an open preparation's solution is marked; the flask used is the one scanned at make-up
      label: `${f.identifier} — ${f.nominalVolumeMl} mL class ${f.class}${f.toleranceMl ? ` (± ${f.toleranceMl} mL)` : ''}${f.holds ? ` — occupied: still holds ${f.holds}` : ''}`,
    })),
  ];
  const volumeMode = watched.volumeMode ?? 'flask';
  const source = watched.conditions?.source ?? 'measured';
  const saveDisabled = !body || blocked || !previewData || preview.isFetching;

  return (
    <div className="flex flex-col gap-6 pb-28 lg:pb-0">
      <PageHeader title="Plan a standard">
        Choose the reference material, the concentration and the glassware. Tarebook works out the balance reading to aim for after the
        air-buoyancy correction, and checks the balance, the material and the minimum weight before anything is weighed.
      </PageHeader>
      {listError ? <Banner title="The lab's inventory could not be loaded">{listError.message}</Banner> : null}

      <div className="grid items-start gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
        <form noValidate onSubmit={onSave} aria-label="Plan" className="flex flex-col gap-5" data-testid="plan-form">
          <Section title="Reference material" hint="Only accepted, unexpired lots are listed.">
            <SelectField label="Reference material" registration={register('materialId')} error={err('materialId')} options={materialOptions} />
            {material ? <MaterialCard material={material} /> : null}
            <SelectField
              label="Expressed as (analyte)"
              registration={register('analyteFormula')}
              error={err('analyteFormula')}
              options={analytes.length ? analytes.map((a) => ({ value: a.formula, label: `${a.formula} (${a.name})` })) : [{ value: '', label: 'Choose the material first' }]}
              disabled={!material}
            />
          </Section>

          <Section title="Target">
            <div className="grid gap-4 sm:grid-cols-2">
              <TextField numeric label="Target concentration" inputMode="decimal" registration={register('target.value')} error={err('target.value')} />
              <SelectField label="Concentration unit" registration={register('target.unit')} error={err('target.unit')} options={opts(CONCENTRATION_UNITS)} />
            </div>
          </Section>

          <Section title="Volume" hint="The flask you make up to sets the volume and its tolerance.">
            <div className="grid gap-2 sm:grid-cols-2" role="radiogroup" aria-label="How the volume is given">
              <ChoiceField type="radio" value="flask" label="A volumetric flask" hint="from the lab's glassware" registration={register('volumeMode')} />
              <ChoiceField type="radio" value="free" label="A final volume" hint="typed in" registration={register('volumeMode')} />
            </div>
            {volumeMode === 'flask' ? (
              <SelectField label="Volumetric flask" registration={register('flaskId')} error={err('flaskId')} options={flaskOptions} />
            ) : (
              <div className="grid gap-4 sm:grid-cols-2">
                <TextField numeric label="Final volume" inputMode="decimal" registration={register('volume.value')} error={err('volume.value') ?? err('volume')} />
                <SelectField label="Volume unit" registration={register('volume.unit')} error={err('volume.unit')} options={opts(VOLUME_UNITS)} />
              </div>
            )}
          </Section>

          <Section title="Balance">
            <SelectField label="Balance" registration={register('balanceId')} error={err('balanceId')} options={balanceOptions} />
          </Section>

          <Section title="Room conditions" hint="At the balance, for the air density (CIPM-2007). The bench page asks again when you weigh.">
            <ConditionsFields
              register={(n) => register(n)}
              source={source}
              defaults={settings.data?.defaultRoomConditions}
              errors={{
                temperatureC: err('conditions.temperatureC'),
                pressureHPa: err('conditions.pressureHPa'),
                relativeHumidityPct: err('conditions.relativeHumidityPct'),
                measuredAt: err('conditions.measuredAt'),
              }}
            />
          </Section>

          <Section title="Notes">
            <TextField label="Notes (optional)" registration={register('notes')} error={err('notes')} />
          </Section>

          {saveError ? <Banner title="The plan was not saved">{saveError}</Banner> : null}
          <div className="hidden lg:block">
            <Button type="submit" data-testid="save-plan" disabled={saveDisabled} busy={create.isPending} className="w-full text-lg">
              {blocked ? 'Save plan (blocked: see the checks)' : 'Save plan'}
            </Button>
          </div>
        </form>

        <div className="flex flex-col gap-4 lg:sticky lg:top-4" role="region" aria-label="Plan preview">
          {previewError && body ? (
            <Banner title="No plan yet">{previewError.message}</Banner>
          ) : previewData ? (
            <>
              <GatePanels gates={previewData.gates} />
              <PreviewPanel preview={previewData} pending={preview.isFetching} />
            </>
          ) : body ? (
            <Spinner label="Working out the reading…" />
          ) : (
            <p data-testid="plan-waiting" className="rounded-xl border-2 border-dashed border-line bg-card px-5 py-6 text-ink-soft">
              Choose the material, flask and balance and enter the room conditions: the reading to aim for appears here as you type.
            </p>
          )}
        </div>
      </div>

      {/* Narrow screens: the reading and the save button stay in reach. */}
      <div className="fixed inset-x-0 bottom-0 z-20 border-t-4 border-brass-400 bg-slate-900 px-4 py-2 text-white lg:hidden" data-testid="plan-bar">
        <div className="mx-auto flex max-w-5xl items-center justify-between gap-4">
          <p className="flex items-baseline gap-2">
            <span className="text-sm font-semibold text-slate-100">Aim for</span>
            <span className="num text-3xl font-bold">
              {previewData ? fixed(previewData.targetReading.value, balanceDecimals(previewData.snapshot.balance?.readabilityMg) ?? 2) : '—'}
            </span>
            <span className="text-lg">mg</span>
          </p>
          <Button
            type="button"
            data-testid="save-plan-bar"
            onClick={() => void onSave()}
            disabled={saveDisabled}
            busy={create.isPending}
            className="border-brass-400 bg-brass-400 text-slate-900 hover:bg-brass-100"
          >
            {blocked ? 'Blocked' : 'Save plan'}
          </Button>
        </div>
      </div>
    </div>
  );
}
