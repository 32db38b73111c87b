/**
 * A dilution by mass at the bench and on the record (METROLOGY §5.5). Bench: huge, the balance reading to aim for
 * for the aliquot of parent (after the air-buoyancy correction, §2.1) and for the final solution; then both net
 * readings exactly as the balance shows them, with the room conditions (or the lab's defaults); a correction is a
 * new record with a reason. The result: mass fraction (mg/kg) and mass concentration (mg/L), each ± U (k = 2).
 */
import { useState, type FormEvent, type ReactNode } from 'react';
import { useMutation, useQueryClient } from '@tanstack/react-query';
import { Link } from 'react-router';
import { Button } from '../../../components/ui/button.tsx';
import { Banner, Panel } from '../../../components/ui/feedback.tsx';
import { api, type ApiError } from '../../../lib/api-client.ts';
import { gravimetricReadingsInputSchema, type GravimetricDilutionSection, type GravimetricReadingDto, type GravimetricReadingsInput } from '../../../../shared/schemas/gravimetric.ts';
import type { LineageSection } from '../../../../shared/schemas/lineage.ts';
import { checkReadingRange } from '../../../../shared/prep/reading.ts';
import { preparationKeys } from '../../preparations/api/preparation-keys.ts';
import { calcVersionName, formatLabTime, percent } from '../../preparations/format.ts';
import type { PreparationDetail } from '../../preparations/types.ts';
import { GatePanels } from '../../preparations/components/gate-panels.tsx';
import { useAuth } from '../../auth/use-auth.ts';
import { HazardCautions } from '../../preparations/components/hazard-cautions.tsx';

export function gravimetricOf(d: PreparationDetail): GravimetricDilutionSection | undefined {
  return (d as PreparationDetail & LineageSection).gravimetric;
}

/** A record made by gravimetric dilution (both readings, no pipette, flask or weighing of a solid). */
export function isGravimetric(d: PreparationDetail): boolean {
  return Boolean(gravimetricOf(d));
}

const currentReadings = (rows: GravimetricReadingDto[]) => rows.filter((r) => r.supersededById === undefined || r.supersededById === null).at(-1);

function Field({ id, label, error, hint, children }: { id: string; label: string; error?: string | undefined; hint?: ReactNode; children: ReactNode }) {
  return (
    <div>
      <label htmlFor={id} className="mb-1 block text-sm font-semibold">
        {label}
      </label>
      {children}
      {hint ? <p className="mt-1 text-sm text-ink-soft">{hint}</p> : null}
      {error ? (
        <p id={`${id}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** Mass fraction and mass concentration ± U, large, with the relative uncertainties. */
export function GravimetricResultView({ g, testId = 'grav-result' }: { g: GravimetricDilutionSection; testId?: string }) {
  const r = g.result;
  const shown = r ?? { massFraction: g.plan.planned.massFraction, massConcentration: g.plan.planned.massConcentration };
  return (
    <div className="flex flex-col gap-2" data-testid={testId}>
      <p className="text-sm font-semibold text-ink-soft">{r ? 'Result' : 'Expected with the planned masses'}</p>
      <p className="num text-2xl font-semibold" data-testid={`${testId}-fraction`}>
        {shown.massFraction.display}
      </p>
      <p className="num text-2xl font-semibold" data-testid={`${testId}-concentration`}>
        {shown.massConcentration.display}
      </p>
      <p className="text-ink-soft">
        Relative standard uncertainty <span className="num">{percent(shown.massFraction.relative, 2)}</span> (mass fraction) and{' '}
        <span className="num">{percent(shown.massConcentration.relative, 2)}</span> (mass concentration, with the final solution density).
        {r ? ` Computed from readings #${r.basedOn.readingsId} (${calcVersionName(r.calcVersion)}).` : ''}
      </p>
    </div>
  );
}

/** The plan and result of a gravimetric dilution on the record's detail page. */
export function GravimetricPanel({ d }: { d: PreparationDetail }) {
  const g = gravimetricOf(d);
  if (!g) return null;
  const p = g.plan;
  const rows: Array<[string, ReactNode]> = [
    ['Parent', <><span className="num">{g.parent.identifier}</span>, {g.parent.snapshot.concentration.display} (as used, version {g.parent.snapshot.version})</>],
    ['Parent as mass fraction', <><span className="num">{p.parentMassFraction.value}</span> mg/kg — {p.parentMassFraction.basis}</>],
    ['Aliquot to weigh', <><span className="num">{p.aliquot.readingShownG} g</span> reading (true mass <span className="num">{p.aliquot.trueMassG}</span> g, buoyancy factor <span className="num">{p.aliquot.buoyancyFactor}</span>)</>],
    ['Final solution', <><span className="num">{p.final.readingShownG} g</span> reading (true mass <span className="num">{p.plannedFinalMassG}</span> g)</>],
    ['Parent density', p.parentDensity.basis],
    ['Final density', p.finalDensity.basis],
    ['Air density (plan)', <><span className="num">{p.airDensity.value}</span> g/mL — {p.airDensity.basis}</>],
    ['Balance', <span className="num">{d.snapshot.balance.identifier}</span>],
  ];
  return (
    <Panel title={g.result ? 'Result (by mass)' : 'Expected result (by mass)'} id="detail-gravimetric">
      <GravimetricResultView g={g} testId="detail-grav" />
      <dl className="mt-4 grid gap-x-6 gap-y-2 sm:grid-cols-[auto_minmax(0,1fr)]" data-testid="detail-grav-plan">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="font-semibold text-ink-soft">{k}</dt>
            <dd>{v}</dd>
          </div>
        ))}
        <dt className="font-semibold text-ink-soft">Readings recorded</dt>
        <dd className="num">{g.readings.length ? g.readings.map((r) => `${r.aliquotReading} / ${r.finalReading} ${r.unit}${r.supersededById ? ' (superseded)' : ''}`).join('; ') : 'none yet'}</dd>
      </dl>
      {g.gates.length ? <div className="mt-4"><GatePanels gates={g.gates} /></div> : null}
      {d.notes ? <p className="mt-3">Notes: {d.notes}</p> : null}
    </Panel>
  );
}

/** The bench of a gravimetric dilution (mounted by the bench page instead of the weighing and make-up). */
export function GravimetricBench({ d, timeZone }: { d: PreparationDetail; timeZone?: string | undefined }) {
  const g = gravimetricOf(d)!;
  const auth = useAuth();
  const queryClient = useQueryClient();
  const current = currentReadings(g.readings);
  const [correcting, setCorrecting] = useState(false);
  const [aliquot, setAliquot] = useState('');
  const [final, setFinal] = useState('');
  const [unit, setUnit] = useState<'g' | 'mg'>('g');
  const [useDefaults, setUseDefaults] = useState(false);
  const [room, setRoom] = useState({ temperatureC: '', pressureHPa: '', humidityPct: '' });
  const [reason, setReason] = useState('');
  const [local, setLocal] = useState<Record<string, string>>({});
  const save = useMutation({
    mutationFn: (input: GravimetricReadingsInput) => api.post<PreparationDetail>(`/api/preparations/${encodeURIComponent(d.identifier)}/gravimetric-readings`, input),
    onSuccess: (next) => {
      queryClient.setQueryData(preparationKeys.detail(d.identifier), next);
      queryClient.setQueryData(preparationKeys.detail(String(d.id)), next);
      void queryClient.invalidateQueries({ queryKey: preparationKeys.lists() });
      setCorrecting(false);
      setAliquot('');
      setFinal('');
      setReason('');
    },
  });
  const apiErr = save.error as ApiError | null;
  const fields: Record<string, string> = { ...(apiErr?.fields ?? {}), ...local };
  const canRecord = auth.status === 'signed-in' && (auth.user.role === 'chemist' || auth.user.role === 'technician') && d.status === 'planned';
  const showForm = canRecord && (!current || correcting);
  const balance = d.snapshot.balance;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const input = {
      aliquotReading: aliquot.trim(),
      finalReading: final.trim(),
      unit,
      ...(useDefaults ? {} : { room: { temperatureC: room.temperatureC.trim(), pressureHPa: room.pressureHPa.trim(), humidityPct: room.humidityPct.trim() } }),
      ...(correcting && current ? { supersedesId: current.id, correctionReason: reason.trim() } : {}),
    };
    const r = gravimetricReadingsInputSchema.safeParse(input);
    const errs: Record<string, string> = {};
    if (!r.success) for (const i of r.error.issues) errs[i.path.join('.')] ??= i.message;
    // both are net readings: above zero and within the balance's capacity, as the server checks (422)
    const what = { aliquotReading: 'The aliquot reading', finalReading: 'The final solution reading' } as const;
    for (const f of ['aliquotReading', 'finalReading'] as const) {
      if (errs[f] || !balance?.capacityG) continue;
      const range = checkReadingRange(input[f], unit, balance.capacityG, { net: true, balanceIdentifier: balance.identifier, what: what[f] });
      if (!range.ok) errs[f] = range.message;
    }
    setLocal(errs);
    if (!r.success || Object.keys(errs).length) return;
    save.mutate(r.data);
  };

  return (
    <div className="flex flex-col gap-6">
      <section aria-label="What to weigh" className="grid gap-4 rounded-xl border-4 border-brass-400 bg-brass-100 px-5 py-5 md:grid-cols-2" data-testid="grav-targets">
        <div>
          <p className="text-lg font-bold">1. Aliquot of <span className="num">{g.parent.identifier}</span>: reading to aim for</p>
          <p className="flex flex-wrap items-baseline gap-x-3">
            <span className="num text-7xl font-bold tracking-tight" data-testid="grav-aliquot-target">{g.plan.aliquot.readingShownG}</span>
            <span className="text-3xl font-semibold">g</span>
          </p>
          <p className="mt-2">
            True mass <span className="num">{g.plan.aliquot.trueMassG}</span> g; the reading is lower by the buoyancy factor <span className="num">{g.plan.aliquot.buoyancyFactor}</span>. Any reading near it is fine: the result uses the reading you record.
          </p>
        </div>
        <div>
          <p className="text-lg font-bold">2. Add diluent up to a final reading of</p>
          <p className="flex flex-wrap items-baseline gap-x-3">
            <span className="num text-5xl font-bold" data-testid="grav-final-target">{g.plan.final.readingShownG}</span>
            <span className="text-2xl font-semibold">g</span>
          </p>
          <p className="mt-2 text-lg">
            On <span className="num font-bold" data-testid="grav-balance">{balance.identifier}</span> (reads to {balance.readabilityMg} mg{balance.minWeightMg ? `, minimum weight ${balance.minWeightMg} mg` : ''}), both net in the same tared bottle.
          </p>
        </div>
      </section>
      <HazardCautions hazards={d.hazards} testId="grav-bench-cautions" showCodes={false} />

      {g.readings.length ? (
        <Panel title="Readings recorded" id="grav-readings">
          <ul className="flex flex-col gap-2" data-testid="grav-readings-list">
            {g.readings.map((r) => (
              <li key={r.id} className={r.supersededById ? 'text-ink-soft line-through' : ''}>
                #{r.id}: aliquot <span className="num font-semibold">{r.aliquotReading} {r.unit}</span>, final <span className="num font-semibold">{r.finalReading} {r.unit}</span> on {r.balance.identifier};{' '}
                {r.conditions.source === 'lab-default' ? 'lab default room' : 'room'} {r.conditions.temperatureC} °C, {r.conditions.pressureHPa} hPa, {r.conditions.relativeHumidityPct} %; by {r.recordedBy.fullName}, {formatLabTime(r.recordedAt, timeZone)}
                {r.correctionReason ? ` — correction: ${r.correctionReason}` : ''}
                {r.supersededById ? ' (superseded)' : ''}
              </li>
            ))}
          </ul>
          {canRecord && current && !correcting ? (
            <Button variant="secondary" className="mt-4" data-testid="grav-correct" onClick={() => setCorrecting(true)}>
              Correct the readings (with a reason)
            </Button>
          ) : null}
        </Panel>
      ) : null}

      {showForm ? (
        <Panel title={correcting ? `Correct readings #${current?.id ?? ''}` : '3. Record both readings'} id="grav-record">
          <form onSubmit={submit} noValidate className="flex flex-col gap-5" data-testid="grav-readings-form">
            <div className="grid gap-5 md:grid-cols-3">
              <Field id="grav-aliquot" label={`Aliquot, net reading (${unit})`} error={fields.aliquotReading} hint="Exactly as the balance shows it, all digits">
                <input id="grav-aliquot" data-testid="grav-aliquot" inputMode="decimal" value={aliquot} onChange={(e) => setAliquot(e.target.value)} aria-invalid={fields.aliquotReading ? true : undefined} className="field-input num text-2xl" autoComplete="off" />
              </Field>
              <Field id="grav-final-reading" label={`Final solution, net reading (${unit})`} error={fields.finalReading}>
                <input id="grav-final-reading" data-testid="grav-final-reading" inputMode="decimal" value={final} onChange={(e) => setFinal(e.target.value)} aria-invalid={fields.finalReading ? true : undefined} className="field-input num text-2xl" autoComplete="off" />
              </Field>
              <Field id="grav-unit" label="Unit shown" error={fields.unit}>
                <select id="grav-unit" value={unit} onChange={(e) => setUnit(e.target.value as 'g' | 'mg')} className="field-input">
                  <option value="g">g</option>
                  <option value="mg">mg</option>
                </select>
              </Field>
            </div>
            <label className="flex min-h-11 items-center gap-3 text-lg">
              <input type="checkbox" className="size-6" checked={useDefaults} onChange={(e) => setUseDefaults(e.target.checked)} data-testid="grav-room-defaults" />
              Use the lab's default room conditions (not measured)
            </label>
            {useDefaults ? null : (
              <div className="grid gap-5 md:grid-cols-3">
                <Field id="grav-t" label="Air temperature (°C)" error={fields['room.temperatureC']}>
                  <input id="grav-t" data-testid="grav-room-t" inputMode="decimal" value={room.temperatureC} onChange={(e) => setRoom({ ...room, temperatureC: e.target.value })} aria-invalid={fields['room.temperatureC'] ? true : undefined} className="field-input num" autoComplete="off" />
                </Field>
                <Field id="grav-p" label="Air pressure (hPa)" error={fields['room.pressureHPa']}>
                  <input id="grav-p" data-testid="grav-room-p" inputMode="decimal" value={room.pressureHPa} onChange={(e) => setRoom({ ...room, pressureHPa: e.target.value })} aria-invalid={fields['room.pressureHPa'] ? true : undefined} className="field-input num" autoComplete="off" />
                </Field>
                <Field id="grav-h" label="Relative humidity (%)" error={fields['room.humidityPct']}>
                  <input id="grav-h" data-testid="grav-room-h" inputMode="decimal" value={room.humidityPct} onChange={(e) => setRoom({ ...room, humidityPct: e.target.value })} aria-invalid={fields['room.humidityPct'] ? true : undefined} className="field-input num" autoComplete="off" />
                </Field>
              </div>
            )}
            {correcting ? (
              <Field id="grav-reason" label="Reason for the correction" error={fields.correctionReason}>
                <input id="grav-reason" data-testid="grav-reason" value={reason} onChange={(e) => setReason(e.target.value)} aria-invalid={fields.correctionReason ? true : undefined} className="field-input" autoComplete="off" />
              </Field>
            ) : null}
            {apiErr && Object.keys(apiErr.fields).length === 0 ? <Banner title="The readings were not stored">{apiErr.message}</Banner> : null}
            <div className="flex flex-wrap gap-3">
              <Button type="submit" busy={save.isPending} data-testid="grav-save" className="min-h-14 px-8 text-lg">
                Store the readings
              </Button>
              {correcting ? (
                <Button type="button" variant="secondary" onClick={() => setCorrecting(false)}>
                  Cancel the correction
                </Button>
              ) : null}
            </div>
          </form>
        </Panel>
      ) : null}

      <Panel title={g.result ? '4. Result' : 'Expected result'} id="grav-result-panel">
        <GravimetricResultView g={g} />
        {g.result && d.status === 'planned' ? (
          <p className="mt-3 text-lg">
            Next: sign it "prepared" on <Link to={`/preparations/${encodeURIComponent(d.identifier)}`} className="font-semibold underline">the record</Link>.
          </p>
        ) : null}
      </Panel>
    </div>
  );
}
