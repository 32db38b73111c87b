import { useEffect, useId, useRef, useState, type FormEvent } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Button } from '../../../components/ui/button.tsx';
import { Banner, Panel } from '../../../components/ui/feedback.tsx';
import { useDebouncedValue } from '../../../hooks/use-debounced-value.ts';
import { ApiError } from '../../../lib/api-client.ts';
import { formatDateTime } from '../../../lib/format.ts';
import { useRecordReading } from '../api/volume-check-mutations.ts';
import { checkPickerQueries, volumeCheckQueries } from '../api/volume-check-queries.ts';
import { defaultReadingUnit, liveRequest, nextReplicate, percentText, readingError, replicateSlots, testedLabel, volumeText, type ReplicateSlot } from '../format.ts';
import type { VolumeCheckDetail } from '../types.ts';

const UNITS = ['g', 'mg'] as const;
type Unit = (typeof UNITS)[number];

function UnitPicker({ value, onChange, name }: { value: Unit; onChange: (u: Unit) => void; name: string }) {
  return (
    <div role="radiogroup" aria-label="Unit of the reading" className="flex gap-2">
      {UNITS.map((u) => (
        <label key={u} className="flex min-h-16 min-w-16 cursor-pointer items-center justify-center rounded-lg border-2 border-line bg-card px-4 text-2xl font-semibold has-[:checked]:border-slate-700 has-[:checked]:bg-slate-700 has-[:checked]:text-white">
          <input type="radio" name={name} value={u} checked={value === u} onChange={() => onChange(u)} className="sr-only" />
          {u}
        </label>
      ))}
    </div>
  );
}

/** A reading input for gloved hands: large, digits kept exactly as typed, decimal keypad on tablets. */
function ReadingInput({ id, value, onChange, error, testId, label }: { id: string; value: string; onChange: (v: string) => void; error?: string | null; testId: string; label: string }) {
  return (
    <div className="min-w-0 flex-1">
      <label htmlFor={id} className="mb-1 block text-base font-semibold">
        {label}
      </label>
      <input
        id={id}
        type="text"
        inputMode="decimal"
        autoComplete="off"
        spellCheck={false}
        data-testid={testId}
        value={value}
        onChange={(e) => onChange(e.target.value)}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className="field-input num min-h-16 w-full text-3xl font-semibold"
      />
      {error ? (
        <p id={`${id}-error`} role="alert" data-testid={`${testId}-error`} className="mt-1 text-base font-semibold text-bad-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}

function CorrectionForm({ d, testedIndex, slot, onDone }: { d: VolumeCheckDetail; testedIndex: number; slot: ReplicateSlot; onDone: () => void }) {
  const uid = useId();
  const record = useRecordReading(d.identifier);
  const [value, setValue] = useState('');
  const [unit, setUnit] = useState<Unit>((slot.current?.unit as Unit) ?? 'g');
  const [reason, setReason] = useState('');
  const [errors, setErrors] = useState<{ value?: string | null; reason?: string; banner?: string }>({});
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const next = { value: readingError(value), reason: reason.trim().length < 3 ? 'Give the reason for the correction (at least 3 characters)' : undefined };
    setErrors(next);
    if (next.value || next.reason || !slot.current) return;
    record.mutate(
      { testedIndex, replicate: slot.replicate, value: value.trim(), unit, supersedesId: slot.current.id, correctionReason: reason.trim() },
      {
        onSuccess: onDone,
        onError: (err) => setErrors({ value: err.fields.value, reason: err.fields.correctionReason, banner: err.fields.value || err.fields.correctionReason ? undefined : err.message }),
      },
    );
  };
  return (
    <form noValidate onSubmit={submit} className="mt-3 flex flex-col gap-3 rounded-lg border-2 border-caution-700 bg-caution-50 p-4" data-testid="correction-form">
      <p className="font-bold">
        Correct replicate {slot.replicate} (now {slot.current?.value} {slot.current?.unit}). The old reading stays on the record.
      </p>
      <div className="flex flex-wrap items-end gap-3">
        <ReadingInput id={`${uid}-value`} label="Corrected reading, as shown" value={value} onChange={setValue} error={errors.value} testId="correction-value" />
        <UnitPicker value={unit} onChange={setUnit} name={`${uid}-unit`} />
      </div>
      <div>
        <label htmlFor={`${uid}-reason`} className="mb-1 block text-base font-semibold">
          Reason for the correction (required)
        </label>
        <input
          id={`${uid}-reason`}
          type="text"
          data-testid="correction-reason"
          value={reason}
          onChange={(e) => setReason(e.target.value)}
          aria-invalid={errors.reason ? true : undefined}
          aria-describedby={errors.reason ? `${uid}-reason-error` : undefined}
          className="field-input min-h-14 text-lg"
        />
        {errors.reason ? (
          <p id={`${uid}-reason-error`} role="alert" className="mt-1 text-base font-semibold text-bad-700">
            {errors.reason}
          </p>
        ) : null}
      </div>
      {errors.banner ? <Banner title="Not recorded">{errors.banner}</Banner> : null}
      <div className="flex flex-wrap gap-3">
        <Button type="submit" busy={record.isPending} className="min-h-14 text-lg" data-testid="correction-submit">
          Record the correction
        </Button>
        <Button variant="secondary" className="min-h-14" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

/**
 * The bench view of a check: one tested volume at a time, the next replicate's reading typed as the balance shows
 * it, append-only (a correction names the reading it replaces and gives a reason), and beside it the volume at
 * 20 °C of each replicate and the running mean, s and CV from POST /api/calc/volume-check (nothing stored there).
 */
export function BenchPanel({ d, canRecord, tz }: { d: VolumeCheckDetail; canRecord: boolean; tz?: string }) {
  const uid = useId();
  const firstOpen = d.plan.tested.findIndex((_, i) => nextReplicate(replicateSlots(d, i)) !== null);
  const [active, setActive] = useState(firstOpen >= 0 ? firstOpen : 0);
  const tested = d.plan.tested[active]!;
  const slots = replicateSlots(d, active);
  const next = nextReplicate(slots);
  const [value, setValue] = useState('');
  const [unit, setUnit] = useState<Unit>(defaultReadingUnit(tested.value));
  const [fieldError, setFieldError] = useState<string | null>(null);
  const [banner, setBanner] = useState<string | null>(null);
  const [correcting, setCorrecting] = useState<number | null>(null);
  const inputRef = useRef<HTMLDivElement>(null);
  const record = useRecordReading(d.identifier);
  const balance = useQuery(checkPickerQueries.balance(d.balance.id));
  const live = d.status === 'planned';

  useEffect(() => {
    setUnit(defaultReadingUnit(d.plan.tested[active]!.value));
    setValue('');
    setFieldError(null);
  }, [active, d.plan.tested]);

  const typed = value.trim() !== '' && readingError(value) === null ? { value, unit } : null;
  const built = live ? liveRequest(d, active, balance.data, next !== null ? typed : null) : null;
  const request = useDebouncedValue(built?.request ?? null, 250);
  const calc = useQuery({ ...volumeCheckQueries.live(request), enabled: live && request !== null && !balance.isPending });
  const liveResult = calc.data && request ? calc.data : undefined;
  const stored = d.result?.tested[active];
  const shown = stored ?? liveResult;
  const recorded = slots.filter((s) => s.current);
  // volume of each recorded replicate: the n-th reading sent is the n-th recorded replicate (sorted by replicate)
  const volumeOf = new Map<number, string>();
  recorded.forEach((s, i) => {
    const v = shown?.replicates[i]?.volume.value;
    if (v) volumeOf.set(s.replicate, v);
  });
  const pendingVolume = typed && liveResult && !built?.single ? liveResult.replicates[recorded.length]?.volume.value : typed && liveResult && built?.single ? liveResult.replicates[0]?.volume.value : undefined;
  const enoughForStats = recorded.length + (typed && next !== null ? 1 : 0) >= 2;
  const rd = d.balance.readabilityMg;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (next === null) return;
    const problem = readingError(value);
    setFieldError(problem);
    setBanner(null);
    if (problem) return;
    record.mutate(
      { testedIndex: active, replicate: next, value: value.trim(), unit },
      {
        onSuccess: () => {
          setValue('');
          inputRef.current?.querySelector('input')?.focus();
        },
        onError: (err) => {
          const f = err.fields;
          if (f.value || f.unit) setFieldError(f.value ?? f.unit ?? null);
          else setBanner(err.message);
        },
      },
    );
  };

  return (
    <Panel title={canRecord ? 'Bench: readings' : 'Readings'} id="bench">
      <div className="flex flex-col gap-5" data-testid="bench-panel">
        {d.plan.tested.length > 1 ? (
          <div role="tablist" aria-label="Tested volume" className="flex flex-wrap gap-2">
            {d.plan.tested.map((t, i) => {
              const s = replicateSlots(d, i);
              const done = s.filter((x) => x.current).length;
              return (
                <button
                  key={i}
                  type="button"
                  role="tab"
                  aria-selected={active === i}
                  data-testid={`tested-tab-${i}`}
                  onClick={() => setActive(i)}
                  className={`min-h-14 rounded-lg border-2 px-4 text-lg font-semibold ${active === i ? 'border-slate-700 bg-slate-700 text-white' : 'border-line bg-card'}`}
                >
                  {testedLabel(d, i)} <span className="num text-base font-normal">· {done}/{t.replicates}</span>
                </button>
              );
            })}
          </div>
        ) : (
          <p className="text-lg">
            Tested volume <span className="num font-semibold">{testedLabel(d, 0)}</span>, {tested.replicates} replicates.
          </p>
        )}

        {canRecord && next !== null ? (
          <form noValidate onSubmit={submit} className="flex flex-col gap-3 rounded-xl border-4 border-brass-400 bg-brass-100 p-4" data-testid="reading-form">
            <p className="text-xl font-bold" data-testid="next-replicate">
              Replicate {next} of {tested.replicates}
            </p>
            <div ref={inputRef} className="flex flex-wrap items-end gap-3">
              <ReadingInput id={`${uid}-reading`} label="Net reading of the water, as the balance shows it" value={value} onChange={(v) => { setValue(v); setFieldError(null); }} error={fieldError} testId="reading-value" />
              <UnitPicker value={unit} onChange={setUnit} name={`${uid}-unit`} />
              <Button type="submit" busy={record.isPending} className="min-h-16 px-8 text-xl" data-testid="reading-submit">
                Record
              </Button>
            </div>
            {typed ? (
              <p className="text-lg" data-testid="pending-volume">
                Volume at 20 °C of this reading: <span className="num font-bold">{pendingVolume ? `${volumeText(pendingVolume, rd)} ${liveResult?.mean.unit ?? 'mL'}` : '…'}</span>{' '}
                <span className="text-base text-ink-soft">(not recorded yet)</span>
              </p>
            ) : null}
            {banner ? <Banner title="Not recorded">{banner}</Banner> : null}
          </form>
        ) : canRecord ? (
          <Banner tone="ok" title="Every replicate of this tested volume is recorded" testId="tested-complete">
            {d.plan.tested.length > 1 ? 'Choose another tested volume above, or ' : ''}Corrections are still possible until a chemist signs the check as prepared.
          </Banner>
        ) : null}

        {shown && enoughForStats ? (
          <dl className="grid gap-3 sm:grid-cols-3" data-testid="running-stats" aria-busy={calc.isFetching || undefined}>
            <div className="rounded-lg border-2 border-line px-3 py-2">
              <dt className="text-sm font-semibold text-ink-soft">{stored ? 'Mean volume at 20 °C' : 'Running mean at 20 °C'}</dt>
              <dd className="num text-2xl font-bold" data-testid="running-mean">
                {volumeText(shown.mean.value, rd)} <span className="font-sans text-base font-normal text-ink-soft">{shown.mean.unit}</span>
              </dd>
            </div>
            <div className="rounded-lg border-2 border-line px-3 py-2">
              <dt className="text-sm font-semibold text-ink-soft">Systematic error</dt>
              <dd className="num text-2xl font-bold">
                {volumeText(shown.systematicError.value, rd)} <span className="font-sans text-base font-normal text-ink-soft">{shown.systematicError.unit} ({percentText(shown.systematicError.percent)} %)</span>
              </dd>
            </div>
            <div className="rounded-lg border-2 border-line px-3 py-2">
              <dt className="text-sm font-semibold text-ink-soft">Random error s (CV)</dt>
              <dd className="num text-2xl font-bold">
                {volumeText(shown.randomError.standardDeviation.value, rd)} <span className="font-sans text-base font-normal text-ink-soft">{shown.randomError.standardDeviation.unit} ({percentText(shown.randomError.cvPercent)} %)</span>
              </dd>
            </div>
          </dl>
        ) : null}
        {live && calc.isError && request ? (
          <Banner title="The live calculation is not available">{calc.error instanceof ApiError ? calc.error.message : 'Try again.'}</Banner>
        ) : null}
        {live ? <p className="text-sm text-ink-soft">Live values as you type; the stored result is computed by the server when the last replicate is in.</p> : null}

        <ol className="flex flex-col gap-2" data-testid="readings-list">
          {slots.map((s) => (
            <li key={s.replicate} className="rounded-lg border-2 border-line px-4 py-2" data-testid="reading-row" data-replicate={s.replicate}>
              <div className="flex flex-wrap items-center justify-between gap-3">
                <p className="flex flex-wrap items-baseline gap-x-4">
                  <span className="w-28 font-semibold">Replicate {s.replicate}</span>
                  {s.current ? (
                    <>
                      <span className="num text-2xl font-semibold" data-testid="reading-shown">
                        {s.current.value} {s.current.unit}
                      </span>
                      <span className="num text-lg">→ {volumeOf.has(s.replicate) ? `${volumeText(volumeOf.get(s.replicate), rd)} ${shown?.mean.unit ?? 'mL'}` : '…'}</span>
                      <span className="text-sm text-ink-soft">
                        {s.current.recordedBy.fullName}, {formatDateTime(s.current.recordedAt, tz)}
                      </span>
                    </>
                  ) : (
                    <span className="text-ink-soft">not recorded</span>
                  )}
                </p>
                {canRecord && s.current && correcting !== s.replicate ? (
                  <Button variant="secondary" onClick={() => setCorrecting(s.replicate)} data-testid="correct-reading">
                    Correct…
                  </Button>
                ) : null}
              </div>
              {s.current?.correctionReason ? <p className="text-sm">Correction: {s.current.correctionReason}</p> : null}
              {s.history.length ? (
                <ul className="mt-1 text-sm text-ink-soft">
                  {s.history.map((h) => (
                    <li key={h.id}>
                      <span className="num line-through">
                        {h.value} {h.unit}
                      </span>{' '}
                      superseded (recorded by {h.recordedBy.fullName}, {formatDateTime(h.recordedAt, tz)})
                    </li>
                  ))}
                </ul>
              ) : null}
              {correcting === s.replicate ? <CorrectionForm d={d} testedIndex={active} slot={s} onDone={() => setCorrecting(null)} /> : null}
            </li>
          ))}
        </ol>
      </div>
    </Panel>
  );
}
