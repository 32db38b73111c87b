import { useMemo, useRef, useState, type ReactNode } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useNavigate, useSearchParams } from 'react-router';
import { get, useForm, useWatch, type FieldErrors } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Button } from '../../components/ui/button.tsx';
import { Banner, CautionBox, PageHeader, Spinner } from '../../components/ui/feedback.tsx';
import { ChoiceField, SelectField, TextField } from '../../components/ui/field.tsx';
import { GatePanels } from '../preparations/components/gate-panels.tsx';
import { usePlanVolumeCheck } from './api/volume-check-mutations.ts';
import { checkPickerQueries } from './api/volume-check-queries.ts';
import { CHECK_KIND_LABELS, MATERIAL_LABELS, isCheckable, methodText } from './format.ts';
import { CHECK_PLAN_FIELDS, EMPTY_CHECK_PLAN, formFieldOf, planFormSchema, refusedGates, toPlanInput, type PlanFormValues } from './plan-form.ts';

function Section({ title, children, hint }: { title: string; children: ReactNode; hint?: ReactNode }) {
  const id = `check-${title.toLowerCase().replace(/[^a-z]+/g, '-')}`;
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

/** /glassware/new[?wareId=]: plan a gravimetric check of one ware item (chemist, technician). */
export function CheckPlanPage() {
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const ware = useQuery(checkPickerQueries.ware());
  const balances = useQuery(checkPickerQueries.balances());
  const plan = usePlanVolumeCheck();
  const [saveError, setSaveError] = useState<string | null>(null);
  const [gateMessage, setGateMessage] = useState<string | undefined>(undefined);
  const pistonRef = useRef(false);
  const resolver = useMemo(() => zodResolver(planFormSchema(() => pistonRef.current)), []);
  const form = useForm<PlanFormValues>({
    resolver,
    defaultValues: { ...EMPTY_CHECK_PLAN, wareId: /^\d+$/.test(params.get('wareId') ?? '') ? params.get('wareId')! : '' },
    mode: 'onTouched',
  });
  const { register, control, handleSubmit, setError } = form;
  const errors: FieldErrors<PlanFormValues> = form.formState.errors;
  const watched = useWatch({ control }) as PlanFormValues;

  const choosable = (ware.data ?? []).filter((w) => isCheckable(w.kind) && w.status !== 'retired');
  const item = choosable.find((w) => String(w.id) === watched.wareId);
  const isPiston = item?.kind === 'piston_pipette';
  pistonRef.current = isPiston;
  const balance = (balances.data ?? []).find((b) => String(b.id) === watched.balanceId);
  const err = (name: string): string | undefined => (get(errors, name) as { message?: string } | undefined)?.message;

  const onSave = handleSubmit((values) => {
    setSaveError(null);
    setGateMessage(undefined);
    const r = toPlanInput(values, isPiston);
    if ('errors' in r) return;
    plan.mutate(r.input, {
      onSuccess: (d) => navigate(`/glassware/${encodeURIComponent(d.identifier)}`),
      onError: (e) => {
        if (e.fields.balanceId && / cannot be used for this check/.test(e.message)) setGateMessage(e.fields.balanceId);
        let placed = 0;
        for (const [path, message] of Object.entries(e.fields)) {
          const field = formFieldOf(path);
          if ((CHECK_PLAN_FIELDS as readonly string[]).includes(field)) {
            setError(field as keyof PlanFormValues, { type: 'server', message });
            placed += 1;
          }
        }
        if (placed === 0 || placed < Object.keys(e.fields).length) setSaveError(e.message);
      },
    });
  });

  if (ware.isPending || balances.isPending) return <Spinner label="Loading the lab's ware and balances…" />;
  const listError = ware.error ?? balances.error;

  const wareOptions = [
    { value: '', label: 'Choose the ware to check…' },
    ...choosable.map((w) => ({ value: String(w.id), label: `${w.identifier} — ${CHECK_KIND_LABELS[w.kind] ?? w.kind} ${w.nominalVolumeMl} mL${w.class !== 'n/a' ? ` class ${w.class}` : ''}${w.status !== 'in_service' ? ' (out of service)' : ''}` })),
  ];
  const balanceOptions = [
    { value: '', label: 'Choose a balance…' },
    ...(balances.data ?? []).map((b) => ({
      value: String(b.id),
      label: `${b.identifier} — reads to ${b.readabilityMg} mg${b.minWeightMg ? `, min. ${b.minWeightMg} mg` : ''}${b.calibrationDueOn ? `, calibration due ${b.calibrationDueOn}` : ''}`,
    })),
  ];
  const materialOptions = [
    { value: '', label: item?.material ? `As in the inventory (${item.material})` : 'As in the inventory' },
    ...Object.entries(MATERIAL_LABELS).map(([value, label]) => ({ value, label })),
  ];
  const gates = refusedGates(gateMessage);

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Plan a check">
        Weigh the water the item delivers or contains, replicate by replicate. Tarebook converts each reading to the volume at 20 °C (water density by
        Tanaka 2001, air buoyancy, the vessel&apos;s expansion) and judges it against the maximum permissible error of its class.
      </PageHeader>
      {listError ? <Banner title="The lab's inventory could not be loaded">{listError.message}</Banner> : null}

      <form noValidate onSubmit={onSave} aria-label="Plan a check" className="grid items-start gap-5 lg:grid-cols-2" data-testid="check-plan-form">
        <div className="flex flex-col gap-5">
          <Section title="Ware" hint={item ? methodText(item.kind) : 'Bulb and piston pipettes, volumetric flasks and burettes.'}>
            <SelectField label="Ware to check" registration={register('wareId')} error={err('wareId')} options={wareOptions} />
            {isPiston ? (
              <p className="rounded-lg border-2 border-line bg-slate-100 px-4 py-3" data-testid="plan-replicates-piston">
                <span className="font-semibold">10 replicates at each tested volume</span>: {item?.nominalVolumeMl} mL (nominal), 50 % and 10 % of it (ISO 8655-6).
              </p>
            ) : (
              <TextField
                numeric
                label="Replicates"
                inputMode="numeric"
                registration={register('replicates')}
                error={err('replicates')}
                hint="The lab's choice for glass (2 to 30; 10 is common practice)."
              />
            )}
            <SelectField label="Material (for the thermal expansion)" registration={register('material')} error={err('material')} options={materialOptions} />
            <TextField numeric label="Check again after" inputMode="numeric" suffix="months" registration={register('intervalMonths')} error={err('intervalMonths')} hint="Sets the next due date when the check is verified." />
          </Section>

          <Section title="Balance" hint="Checked when you save: in calibration, minimum weight below the smallest water mass, readability suited to the volume (ISO 8655-6), capacity.">
            <SelectField label="Balance" registration={register('balanceId')} error={err('balanceId')} options={balanceOptions} />
            {balance ? (
              <p className="text-base" data-testid="plan-weight-density">
                Weights density <span className="num font-semibold">{balance.weightDensityGPerMl} g/mL</span> (from the balance record; used in the buoyancy correction).
              </p>
            ) : null}
            <GatePanels gates={gates} />
          </Section>
        </div>

        <div className="flex flex-col gap-5">
          <Section title="Water" hint="Measured in the water you weigh (water density by Tanaka 2001, 0–40 °C).">
            <TextField numeric label="Water temperature" inputMode="decimal" suffix="°C" registration={register('conditions.waterTemperatureC')} error={err('conditions.waterTemperatureC')} />
            <ChoiceField label="Air-saturated water" hint="Tanaka's air-saturation correction (0–25 °C); leave unticked for degassed water" registration={register('conditions.waterAirSaturated')} />
            <TextField
              numeric
              label="Evaporation loss per replicate (optional)"
              inputMode="decimal"
              suffix="mg"
              registration={register('conditions.evaporationMg')}
              error={err('conditions.evaporationMg')}
              hint="Added to each reading; from the lab's own evaporation trial."
            />
          </Section>

          <Section title="Air at the balance" hint="For the air density (CIPM-2007).">
            <div className="grid gap-4 sm:grid-cols-3">
              <TextField numeric label="Temperature" inputMode="decimal" suffix="°C" registration={register('conditions.air.temperatureC')} error={err('conditions.air.temperatureC')} />
              <TextField numeric label="Pressure" inputMode="decimal" suffix="hPa" registration={register('conditions.air.pressureHPa')} error={err('conditions.air.pressureHPa')} />
              <TextField numeric label="Humidity" inputMode="decimal" suffix="% RH" registration={register('conditions.air.relativeHumidityPct')} error={err('conditions.air.relativeHumidityPct')} />
            </div>
          </Section>

          <Section title="Notes">
            <TextField label="Notes (optional)" registration={register('notes')} error={err('notes')} />
          </Section>

          <CautionBox>
            Use distilled or deionised water (ISO 3696 grade 3 or better) equilibrated to the room. Never pipette by mouth; wear gloves and eye protection as
            your local procedure and the cleaning agents&apos; safety data sheets require.
          </CautionBox>

          {saveError ? <Banner title="The check was not planned">{saveError}</Banner> : null}
          <Button type="submit" data-testid="save-check-plan" busy={plan.isPending} className="min-h-14 w-full text-lg">
            Plan the check
          </Button>
        </div>
      </form>
    </div>
  );
}
