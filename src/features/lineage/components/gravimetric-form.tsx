/**
 * Plan a dilution by mass (METROLOGY §5.5): weigh an aliquot of the verified parent and the final solution on one
 * balance. The chemist gives the target mass fraction (mg/kg), the final mass and the balance, and optionally
 * the two solution densities; the server works out the aliquot to weigh, the balance readings to aim for after
 * the air-buoyancy correction (CIPM-2007 air density), runs the balance gates (minimum weight, calibration) and
 * creates the record. The preview here is approximate (water density, no buoyancy) and says so.
 */
import { useState, type FormEvent, type ReactNode } from 'react';
import { parentConcentration } from '../parent-check.ts';
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useNavigate } from 'react-router';
import { Button } from '../../../components/ui/button.tsx';
import { Banner, CautionBox, Panel } from '../../../components/ui/feedback.tsx';
import { api, type ApiError } from '../../../lib/api-client.ts';
import { D } from '../../../../shared/calc/decimal.ts';
import { gravimetricPlanInputSchema, type GravimetricPlanInput } from '../../../../shared/schemas/gravimetric.ts';
import { pickerQueries } from '../../preparations/api/preparation-queries.ts';
import { preparationKeys } from '../../preparations/api/preparation-keys.ts';
import type { PreparationDetail } from '../../preparations/types.ts';

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

/** zod issues of the shared schema → { 'dotted.path': message } (first message per field). */
function fieldErrors(input: unknown): Record<string, string> {
  const r = gravimetricPlanInputSchema.safeParse(input);
  if (r.success) return {};
  const out: Record<string, string> = {};
  for (const i of r.error.issues) {
    const k = i.path.join('.');
    if (!out[k]) out[k] = i.message;
  }
  return out;
}

const safe = (s: string) => {
  try {
    const d = new D(s.trim());
    return d.isFinite() && d.gt(0) ? d : null;
  } catch {
    return null;
  }
};

export function GravimetricForm({ parent }: { parent: PreparationDetail }) {
  const navigate = useNavigate();
  const queryClient = useQueryClient();
  const balances = useQuery(pickerQueries.balances());
  const [target, setTarget] = useState('');
  const [finalMass, setFinalMass] = useState('100');
  const [balanceId, setBalanceId] = useState('');
  const [parentDensity, setParentDensity] = useState('');
  const [finalDensity, setFinalDensity] = useState('');
  const [notes, setNotes] = useState('');
  const [local, setLocal] = useState<Record<string, string>>({});
  const create = useMutation({
    mutationFn: (input: GravimetricPlanInput) => api.post<PreparationDetail>(`/api/preparations/${encodeURIComponent(parent.identifier)}/gravimetric-dilutions`, input),
    onSuccess: (d) => {
      queryClient.setQueryData(preparationKeys.detail(d.identifier), d);
      void queryClient.invalidateQueries({ queryKey: preparationKeys.lists() });
      void queryClient.invalidateQueries({ queryKey: preparationKeys.detail(parent.identifier) });
      void navigate(`/preparations/${encodeURIComponent(d.identifier)}`);
    },
  });
  const conc = parentConcentration(parent);
  const apiErr = create.error as ApiError | null;
  const fields: Record<string, string> = { ...(apiErr?.fields ?? {}), ...local };

  // approximate preview: w1 ≈ γ1/ρ1 (ρ1 as typed, else 0.998 g/mL), aliquot ≈ w2·m_f/w1; buoyancy changes it by ~0.1 %
  const w2 = safe(target);
  const mf = safe(finalMass);
  const rho1 = safe(parentDensity) ?? new D('0.998');
  const w1 = conc && conc.unit === 'mg/L' ? new D(conc.value).div(rho1) : conc && conc.unit === 'mg/kg' ? new D(conc.value) : null;
  const aliquotG = w1 && w2 && mf && w2.lt(w1) ? w2.mul(mf).div(w1) : null;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const input = {
      target: { value: target.trim(), unit: 'mg/kg' as const },
      balanceId: balanceId ? Number(balanceId) : undefined,
      plannedFinalMassG: finalMass.trim(),
      ...(parentDensity.trim() ? { parentDensity: parentDensity.trim() } : {}),
      ...(finalDensity.trim() ? { finalDensity: finalDensity.trim() } : {}),
      ...(notes.trim() ? { notes: notes.trim() } : {}),
    };
    const errs = fieldErrors(input);
    if (!errs['target.value'] && w1 && w2 && w2.gte(w1)) errs['target.value'] = `The target must be below the parent's ${w1.toSignificantDigits(5).toString()} mg/kg`;
    setLocal(errs);
    if (Object.keys(errs).length) return;
    create.mutate(gravimetricPlanInputSchema.parse(input));
  };

  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-6" data-testid="gravimetric-form">
      <Panel title="Target, final mass and balance" id="gravimetric-inputs">
        <div className="grid gap-5 md:grid-cols-3">
          <Field id="grav-target" label="Target mass fraction (mg/kg)" error={fields['target.value'] ?? fields['target.unit'] ?? fields.target}
            hint={aliquotG ? <>Weigh about <span className="num font-semibold">{aliquotG.toSignificantDigits(4).toString()} g</span> of {parent.identifier} (the exact reading to aim for is worked out with the air-buoyancy correction)</> : undefined}>
            <input id="grav-target" data-testid="grav-target" inputMode="decimal" value={target} onChange={(e) => setTarget(e.target.value)} aria-invalid={fields['target.value'] ? true : undefined} className="field-input num" autoComplete="off" />
          </Field>
          <Field id="grav-final" label="Final solution, true mass (g)" error={fields.plannedFinalMassG} hint="Aliquot plus diluent, weighed in the same tared bottle">
            <input id="grav-final" data-testid="grav-final" inputMode="decimal" value={finalMass} onChange={(e) => setFinalMass(e.target.value)} aria-invalid={fields.plannedFinalMassG ? true : undefined} className="field-input num" autoComplete="off" />
          </Field>
          <Field id="grav-balance" label="Balance" error={fields.balanceId}>
            <select id="grav-balance" data-testid="grav-balance" value={balanceId} onChange={(e) => setBalanceId(e.target.value)} className="field-input" aria-invalid={fields.balanceId ? true : undefined}>
              <option value="">{balances.isPending ? 'Loading…' : 'Choose a balance'}</option>
              {(balances.data ?? []).map((b) => (
                <option key={b.id} value={b.id}>
                  {b.identifier} — {b.capacityG} g × {b.readabilityMg} mg{b.minWeightMg ? `, minimum weight ${b.minWeightMg} mg` : ''}
                </option>
              ))}
            </select>
          </Field>
          <Field id="grav-parent-density" label="Parent solution density (g/mL, optional)" error={fields.parentDensity}
            hint="Empty: water at the parent's make-up temperature, ± 0.005 g/mL. A measured density narrows the uncertainty.">
            <input id="grav-parent-density" data-testid="grav-parent-density" inputMode="decimal" value={parentDensity} onChange={(e) => setParentDensity(e.target.value)} aria-invalid={fields.parentDensity ? true : undefined} className="field-input num" autoComplete="off" />
          </Field>
          <Field id="grav-final-density" label="Final solution density (g/mL, optional)" error={fields.finalDensity}
            hint="Empty: water at the room temperature, ± 0.005 g/mL. Used for the mass concentration (mg/L).">
            <input id="grav-final-density" data-testid="grav-final-density" inputMode="decimal" value={finalDensity} onChange={(e) => setFinalDensity(e.target.value)} aria-invalid={fields.finalDensity ? true : undefined} className="field-input num" autoComplete="off" />
          </Field>
          <Field id="grav-notes" label="Notes (optional)" error={fields.notes}>
            <input id="grav-notes" value={notes} onChange={(e) => setNotes(e.target.value)} className="field-input" autoComplete="off" />
          </Field>
        </div>
        {balances.error ? <p className="mt-3 text-bad-700">The balance list could not be loaded: {balances.error.message}</p> : null}
      </Panel>
      <CautionBox>
        Weigh acid or toxic-metal solutions in closed bottles, with gloves and eye protection; follow the safety data sheet and your laboratory's procedures.
      </CautionBox>
      {apiErr && Object.keys(apiErr.fields).length === 0 ? (
        <Banner title={apiErr.code === 'gate_blocked' ? 'The balance cannot take this weighing' : 'The dilution was not created'} testId="grav-refused">
          {apiErr.message}
        </Banner>
      ) : null}
      <div>
        <Button type="submit" busy={create.isPending} data-testid="grav-submit" className="min-h-14 px-8 text-lg">
          Plan the dilution by mass
        </Button>
      </div>
    </form>
  );
}
