/**
 * The buoyancy factor table (any signed-in role): B = m/m' (true mass per balance reading) and 1/B (reading to
 * aim for per gram of true mass) for named samples from 0.7 to 22 g/mL, at the lab's room conditions or the
 * t, p, RH entered, and the weights' density. "Print for the balance" opens the same table as an A4 PDF.
 */
import { useState, type FormEvent } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useSearchParams } from 'react-router';
import { Button } from '../../components/ui/button.tsx';
import { Banner, PageHeader, Panel, Spinner } from '../../components/ui/feedback.tsx';
import type { ApiError } from '../../lib/api-client.ts';
import { buoyancyTableQuerySchema } from '../../../shared/schemas/buoyancy-table.ts';
import { buoyancyQueries, buoyancyUrls, type BuoyancyParams } from './api/buoyancy-api.ts';

const FIELDS = [
  { key: 't', label: 'Air temperature', suffix: '°C', hint: '15 to 27' },
  { key: 'p', label: 'Air pressure', suffix: 'hPa', hint: '600 to 1100' },
  { key: 'rh', label: 'Relative humidity', suffix: '%', hint: '0 to 100' },
  { key: 'weightDensity', label: 'Density of the weights', suffix: 'g/cm³', hint: 'stainless steel: 8.0' },
] as const;
type Key = (typeof FIELDS)[number]['key'];

function paramsOf(sp: URLSearchParams): BuoyancyParams {
  const out: BuoyancyParams = {};
  for (const f of FIELDS) {
    const v = sp.get(f.key);
    if (v) out[f.key] = v;
  }
  return out;
}

export function BuoyancyPage() {
  const [sp, setSp] = useSearchParams();
  const applied = paramsOf(sp);
  const [form, setForm] = useState<Record<Key, string>>({ t: applied.t ?? '', p: applied.p ?? '', rh: applied.rh ?? '', weightDensity: applied.weightDensity ?? '' });
  const [clientErrors, setClientErrors] = useState<Partial<Record<Key, string>>>({});
  const q = useQuery(buoyancyQueries.table(applied));
  const serverErrors = ((q.error as ApiError | null)?.fields ?? {}) as Partial<Record<Key, string>>;
  const errors = { ...serverErrors, ...clientErrors };

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = buoyancyTableQuerySchema.safeParse(form);
    if (!parsed.success) {
      const errs: Partial<Record<Key, string>> = {};
      for (const i of parsed.error.issues) {
        const k = i.path[0] as Key;
        if (!errs[k]) errs[k] = i.message;
      }
      setClientErrors(errs);
      return;
    }
    setClientErrors({});
    const next = new URLSearchParams();
    for (const f of FIELDS) if (form[f.key].trim()) next.set(f.key, form[f.key].trim());
    setSp(next, { replace: true });
  };
  const useLab = () => {
    setForm({ t: '', p: '', rh: '', weightDensity: form.weightDensity });
    setClientErrors({});
    const next = new URLSearchParams();
    if (form.weightDensity.trim()) next.set('weightDensity', form.weightDensity.trim());
    setSp(next, { replace: true });
  };

  const d = q.data;
  return (
    <div className="flex flex-col gap-5">
      <PageHeader title="Buoyancy factor table">
        True mass = balance reading × B. To weigh a true mass, aim for true mass × 1/B. The factors depend on the air density, so they hold for the conditions shown.
      </PageHeader>

      <Panel title="Conditions">
        <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4" aria-label="Conditions of the table">
          <p className="text-base text-ink-soft">Leave temperature, pressure and humidity empty to use the lab’s room conditions (settings).</p>
          <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
            {FIELDS.map((f) => (
              <div key={f.key}>
                <label htmlFor={`bt-${f.key}`} className="mb-1 block text-sm font-semibold">
                  {f.label}
                </label>
                <div className="flex items-center gap-2">
                  <input
                    id={`bt-${f.key}`}
                    name={f.key}
                    type="text"
                    inputMode="decimal"
                    autoComplete="off"
                    className="field-input num"
                    value={form[f.key]}
                    onChange={(e) => setForm({ ...form, [f.key]: e.target.value })}
                    aria-invalid={errors[f.key] ? true : undefined}
                    aria-describedby={errors[f.key] ? `bt-${f.key}-error` : `bt-${f.key}-hint`}
                  />
                  <span className="shrink-0 text-base text-ink-soft">{f.suffix}</span>
                </div>
                <p id={`bt-${f.key}-hint`} className="mt-1 text-sm text-ink-soft">
                  {f.hint}
                </p>
                {errors[f.key] ? (
                  <p id={`bt-${f.key}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700" data-testid={`error-${f.key}`}>
                    {errors[f.key]}
                  </p>
                ) : null}
              </div>
            ))}
          </div>
          <div className="flex flex-wrap gap-3">
            <Button type="submit" data-testid="buoyancy-apply">
              Show the table
            </Button>
            <Button type="button" variant="secondary" onClick={useLab}>
              Use the lab’s room conditions
            </Button>
          </div>
        </form>
      </Panel>

      {q.isPending ? <Spinner label="Computing the table…" /> : null}
      {q.error && !Object.keys(serverErrors).length ? <Banner title="The table could not be computed">{(q.error as ApiError).message}</Banner> : null}
      {d ? (
        <Panel title="Factors">
          <div className="mb-3 flex flex-wrap items-center justify-between gap-3">
            <p className="text-base" data-testid="buoyancy-air">
              Air {d.air.temperatureC} °C, {d.air.pressureHPa} hPa, {d.air.relativeHumidityPct} % RH ({d.air.source === 'entered' ? 'entered' : 'lab’s room conditions'}):{' '}
              <strong className="num">ρa = {d.air.densityKgPerM3Display} kg/m³</strong> (CIPM-2007). Weights: <strong className="num">{d.weightDensity} g/cm³</strong>.
            </p>
            <a
              href={buoyancyUrls.pdf(applied)}
              target="_blank"
              rel="noreferrer"
              data-testid="buoyancy-print"
              className="inline-flex min-h-12 items-center rounded-lg border-2 border-slate-700 bg-card px-5 text-lg font-semibold text-ink hover:bg-slate-100"
            >
              Print for the balance
            </a>
          </div>
          <div className="overflow-x-auto">
            <table className="w-full text-left" data-testid="buoyancy-table">
              <thead>
                <tr className="border-b-2 border-slate-700 text-sm">
                  <th className="py-2 pr-4">Sample</th>
                  <th className="py-2 pr-4 text-right">ρ (g/mL)</th>
                  <th className="py-2 pr-4 text-right">B = m/m′</th>
                  <th className="py-2 pr-4 text-right">1/B (g per g)</th>
                  <th className="py-2 pr-4 text-right">ppm</th>
                  <th className="py-2">Density source</th>
                </tr>
              </thead>
              <tbody>
                {d.rows.map((r) => (
                  <tr key={r.name} className="border-b border-slate-200" data-testid="buoyancy-row">
                    <td className="py-2 pr-4 text-lg font-semibold">{r.name}</td>
                    <td className="num py-2 pr-4 text-right text-lg">{r.density}</td>
                    <td className="num py-2 pr-4 text-right text-xl font-bold" data-testid="factor">
                      {r.factorDisplay}
                    </td>
                    <td className="num py-2 pr-4 text-right text-xl font-bold" data-testid="inverse">
                      {r.readingPerGramDisplay}
                    </td>
                    <td className="num py-2 pr-4 text-right">{r.correctionPpm}</td>
                    <td className="py-2 text-sm text-ink-soft">{r.source}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <p className="mt-3 text-sm text-ink-soft">
            B = (1 − ρa/ρw)/(1 − ρa/ρ) (NIST SOP 2). Densities marked “from memory” should be checked against a handbook; buoyancy needs them only to about ±5 %. Calculation {d.calcVersion}.
          </p>
        </Panel>
      ) : null}
    </div>
  );
}
