import { useMemo, type ReactNode } from 'react';
import { useQuery } from '@tanstack/react-query';
import { get, useForm, useWatch, type FieldErrors } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Button } from '../../components/ui/button.tsx';
import { CautionBox, PageHeader, Panel } from '../../components/ui/feedback.tsx';
import { ChoiceField, SelectField, TextField } from '../../components/ui/field.tsx';
import { useDebouncedValue } from '../../hooks/use-debounced-value.ts';
import {
  BALANCE_U_UNITS,
  DENSITY_UNITS,
  EXAMPLE_VALUES,
  READING_UNITS,
  TARGET_UNITS,
  VOLUME_UNITS,
  calcFormSchema,
  type CalcFormIn,
  type CalcFormOut,
  type FormField,
} from './calc-form-schema.ts';
import { runLiveCalculation } from './live-calculation.ts';
import { ResultsPanel } from './components/results-panel.tsx';
import { ServerCheck } from './components/server-check.tsx';
import { BudgetTable } from './components/budget-table.tsx';
import { AimBar } from './components/aim-bar.tsx';
import { settingsQueries } from './api/settings-queries.ts';

const opts = (list: readonly string[]) => list.map((u) => ({ value: u, label: u }));

function Section({ title, children, hint }: { title: string; children: ReactNode; hint?: ReactNode }) {
  const id = `sec-${title.toLowerCase().replace(/[^a-z]+/g, '-')}`;
  return (
    <fieldset aria-labelledby={id} className="rounded-xl border-2 border-line bg-card p-5">
      <legend className="sr-only">{title}</legend>
      <h2 id={id} className="text-xl font-bold">
        {title}
      </h2>
      {hint ? <p className="mt-1 text-sm text-ink-soft">{hint}</p> : null}
      <div className="mt-4 grid gap-4 sm:grid-cols-2">{children}</div>
    </fieldset>
  );
}

export function CalculatePage() {
  const form = useForm<CalcFormIn, unknown, CalcFormOut>({
    resolver: zodResolver(calcFormSchema),
    defaultValues: EXAMPLE_VALUES,
    mode: 'onChange',
  });
  const { register, control } = form;
  const errors: FieldErrors<CalcFormIn> = form.formState.errors;

  const watched = useWatch({ control }) as CalcFormIn;
  const values = useDebouncedValue(watched, 150);
  // The lab's rounding rule (half-even or half-up) applies to the reported result; until the settings
  // arrive the core's default (half-even) is used.
  const settings = useQuery(settingsQueries.detail());
  const rounding = settings.data?.roundingRule;
  const live = useMemo(() => runLiveCalculation(values, rounding), [values, rounding]);
  const useLabConditions = () => {
    const d = settings.data?.defaultRoomConditions;
    if (!d) return;
    form.setValue('air.mode', 'conditions');
    form.setValue('air.temperatureC', d.temperatureC, { shouldValidate: true });
    form.setValue('air.pressureHPa', d.pressureHPa, { shouldValidate: true });
    form.setValue('air.relativeHumidityPct', d.relativeHumidityPct, { shouldValidate: true });
  };

  const liveFields = live.status === 'ok' ? {} : live.fields;
  /** The message under a field: the form's own check first, then the core's or the shared schema's. */
  const err = (name: FormField): string | undefined =>
    (get(errors, name) as { message?: string } | undefined)?.message ?? liveFields[name];

  const airMode = watched.air?.mode ?? 'conditions';
  const purityMode = watched.material?.purity?.mode ?? 'expanded';
  const request = live.status === 'ok' ? live.request : null;
  const readingTyped = values.weighing?.reading?.value ?? '';

  return (
    <div className="flex flex-col gap-6 pb-24 xl:pb-0">
      <PageHeader title="Calculate a standard">
        Weigh a reference material, dissolve it to volume, and get the true concentration after air-buoyancy correction,
        with its uncertainty. Results update as you type and nothing is saved.
        {rounding ? ` Results are rounded ${rounding === 'half-up' ? 'half up' : 'half to even'}, as set for the lab.` : ''}
      </PageHeader>

      <CautionBox>
        Lead compounds and many other reference materials are toxic. Follow the safety data sheet, local regulations and
        your laboratory&apos;s own procedures. These results support, but do not replace, the lab&apos;s procedures and
        review by a qualified person.
      </CautionBox>

      <div className="grid items-start gap-6 xl:grid-cols-[minmax(0,1.1fr)_minmax(0,1fr)]">
        <form noValidate onSubmit={(e) => e.preventDefault()} aria-label="Preparation inputs" className="flex flex-col gap-5" data-testid="calc-form">
          <Section title="Target">
            <TextField numeric label="Target concentration" inputMode="decimal" registration={register('target.value')} error={err('target.value')} />
            <SelectField label="Concentration unit" registration={register('target.unit')} error={err('target.unit')} options={opts(TARGET_UNITS)} />
          </Section>

          <Section title="Volume" hint="The nominal volume of the flask you make up to.">
            <TextField numeric label="Final volume" inputMode="decimal" registration={register('volume.value')} error={err('volume.value')} />
            <SelectField label="Volume unit" registration={register('volume.unit')} error={err('volume.unit')} options={opts(VOLUME_UNITS)} />
            <TextField
              numeric
              label="Standard uncertainty of the volume (optional)"
              inputMode="decimal"
              registration={register('volume.standardUncertainty')}
              error={err('volume.standardUncertainty')}
              hint="Same unit as the volume, k = 1."
              className="sm:col-span-2"
            />
          </Section>

          <Section title="Reference material" hint="The compound you weigh, and the element or ion the concentration is expressed as.">
            <TextField
              label="Formula of the compound"
              registration={register('material.formula')}
              error={err('material.formula')}
              hint="e.g. Pb(NO3)2. Hydrates with brackets: CuSO4(H2O)5."
            />
            <TextField
              label="Expressed as (analyte formula)"
              registration={register('material.analyteFormula')}
              error={err('material.analyteFormula')}
              hint="e.g. Pb. Leave both empty to weigh the analyte itself."
            />
            <TextField
              numeric
              label="Purity (mass fraction)"
              inputMode="decimal"
              registration={register('material.purity.value')}
              error={err('material.purity.value')}
              hint="As on the certificate, e.g. 0.9995"
              className="sm:col-span-2"
            />
            <div className="sm:col-span-2">
              <p className="mb-1 text-sm font-semibold" id="purity-mode-label">
                Uncertainty of the purity is given as
              </p>
              <div role="radiogroup" aria-labelledby="purity-mode-label" className="grid gap-2 sm:grid-cols-2">
                <ChoiceField type="radio" value="expanded" label="Expanded, with k" hint="U and k from the certificate" registration={register('material.purity.mode')} />
                <ChoiceField type="radio" value="standard" label="Standard uncertainty" hint="u, k = 1" registration={register('material.purity.mode')} />
              </div>
            </div>
            {purityMode === 'standard' ? (
              <TextField
                numeric
                label="Standard uncertainty of the purity"
                inputMode="decimal"
                registration={register('material.purity.standardUncertainty')}
                error={err('material.purity.standardUncertainty')}
                className="sm:col-span-2"
              />
            ) : (
              <>
                <TextField
                  numeric
                  label="Expanded uncertainty U of the purity"
                  inputMode="decimal"
                  registration={register('material.purity.expandedUncertainty')}
                  error={err('material.purity.expandedUncertainty')}
                />
                <TextField numeric label="Coverage factor k" inputMode="decimal" registration={register('material.purity.k')} error={err('material.purity.k')} />
              </>
            )}
            <TextField
              numeric
              label="Density of the solid"
              inputMode="decimal"
              registration={register('material.density.value')}
              error={err('material.density.value')}
              hint="For the buoyancy correction, e.g. 4.53 for Pb(NO3)2"
            />
            <SelectField label="Density unit" registration={register('material.density.unit')} error={err('material.density.unit')} options={opts(DENSITY_UNITS)} />
          </Section>

          <Section title="Balance">
            <TextField
              numeric
              label="Density of the calibration weights"
              inputMode="decimal"
              registration={register('balance.weightDensity.value')}
              error={err('balance.weightDensity.value')}
              hint="8.0 g/mL for steel weights (OIML conventional value)"
            />
            <SelectField
              label="Weight density unit"
              registration={register('balance.weightDensity.unit')}
              error={err('balance.weightDensity.unit')}
              options={opts(DENSITY_UNITS)}
            />
            <TextField
              numeric
              label="Standard uncertainty of a reading (optional)"
              inputMode="decimal"
              registration={register('balance.standardUncertainty.value')}
              error={err('balance.standardUncertainty.value')}
              hint="From the balance calibration, k = 1"
            />
            <SelectField
              label="Reading uncertainty unit"
              registration={register('balance.standardUncertainty.unit')}
              error={err('balance.standardUncertainty.unit')}
              options={opts(BALANCE_U_UNITS)}
            />
          </Section>

          <Section title="Air" hint="Room conditions at the balance, for the air density (CIPM-2007).">
            <div className="grid gap-2 sm:col-span-2 sm:grid-cols-2" role="radiogroup" aria-label="How to get the air density">
              <ChoiceField type="radio" value="conditions" label="From room conditions" hint="temperature, pressure, humidity" registration={register('air.mode')} />
              <ChoiceField type="radio" value="fixed" label="Use a fixed air density" hint="e.g. the conventional 0.0012 g/mL" registration={register('air.mode')} />
            </div>
            {airMode === 'conditions' ? (
              <>
                <TextField numeric label="Temperature" suffix="°C" inputMode="decimal" registration={register('air.temperatureC')} error={err('air.temperatureC')} />
                <TextField numeric label="Pressure" suffix="hPa" inputMode="decimal" registration={register('air.pressureHPa')} error={err('air.pressureHPa')} />
                <TextField
                  numeric
                  label="Relative humidity"
                  suffix="%"
                  inputMode="decimal"
                  registration={register('air.relativeHumidityPct')}
                  error={err('air.relativeHumidityPct')}
                />
                {settings.data ? (
                  <div className="flex items-end">
                    <Button variant="secondary" data-testid="use-lab-conditions" onClick={useLabConditions} className="w-full">
                      Use the lab&apos;s defaults ({settings.data.defaultRoomConditions.temperatureC} °C,{' '}
                      {settings.data.defaultRoomConditions.pressureHPa} hPa)
                    </Button>
                  </div>
                ) : null}
              </>
            ) : (
              <>
                <TextField numeric label="Air density" inputMode="decimal" registration={register('air.density.value')} error={err('air.density.value')} />
                <SelectField label="Air density unit" registration={register('air.density.unit')} error={err('air.density.unit')} options={opts(DENSITY_UNITS)} />
              </>
            )}
          </Section>

          <Section title="Weighing" hint="Optional. Type the reading exactly as the balance shows it, trailing zeros included.">
            <TextField
              numeric
              label="Balance reading"
              inputMode="decimal"
              placeholder="e.g. 159.91"
              registration={register('weighing.reading.value')}
              error={err('weighing.reading.value')}
            />
            <SelectField label="Reading unit" registration={register('weighing.reading.unit')} error={err('weighing.reading.unit')} options={opts(READING_UNITS)} />
          </Section>

          <div className="flex flex-wrap gap-3">
            <Button variant="secondary" data-testid="reset-example" onClick={() => form.reset(EXAMPLE_VALUES)}>
              Reset to the example
            </Button>
            <Button
              variant="secondary"
              data-testid="clear-reading"
              onClick={() => form.setValue('weighing.reading.value', '', { shouldValidate: true })}
            >
              Clear the reading
            </Button>
          </div>
        </form>

        <div className="@container flex flex-col gap-5 xl:sticky xl:top-4 xl:max-h-[calc(100vh-2rem)] xl:overflow-y-auto" aria-label="Results" role="region">
          <h2 className="sr-only">Results</h2>
          <ResultsPanel live={live} readingTyped={readingTyped} />
        </div>
      </div>

      {live.status === 'ok' && live.result.actual ? (
        <Panel title="Uncertainty budget" id="budget">
          <BudgetTable rows={live.result.actual.budget} outputUnit={live.result.actual.concentration.unit} />
        </Panel>
      ) : null}

      <div className="rounded-xl border-2 border-line bg-card p-5">
        <ServerCheck request={request} browser={live.status === 'ok' ? live.result : null} />
      </div>

      <AimBar live={live} readingTyped={readingTyped} />
    </div>
  );
}
