import type { UseFormRegisterReturn } from 'react-hook-form';
import { ChoiceField, TextField } from '../../../components/ui/field.tsx';
import type { RoomConditions } from '../../../../shared/schemas/settings.ts';

/** Form values of a room-conditions block; `measuredAt` is a datetime-local value in the device's time. */
export type ConditionsFormValues = {
  source: 'measured' | 'lab-default';
  temperatureC: string;
  pressureHPa: string;
  relativeHumidityPct: string;
  measuredAt: string;
};

type Errors = Partial<Record<keyof ConditionsFormValues, string | undefined>>;

/**
 * Room conditions at the balance (for the CIPM-2007 air density): measured now, or the lab's defaults.
 * The form using it must have the block under the name `conditions`.
 */
export function ConditionsFields({
  register,
  source,
  errors,
  defaults,
}: {
  register: (name: `conditions.${keyof ConditionsFormValues}`) => UseFormRegisterReturn;
  source: 'measured' | 'lab-default';
  errors: Errors;
  defaults?: RoomConditions;
}) {
  return (
    <div className="grid gap-4 sm:grid-cols-2">
      <div className="grid gap-2 sm:col-span-2 sm:grid-cols-2" role="radiogroup" aria-label="Room conditions">
        <ChoiceField type="radio" value="measured" label="Measured at the balance" hint="temperature, pressure, humidity, time" registration={register('conditions.source')} />
        <ChoiceField
          type="radio"
          value="lab-default"
          label="Use the lab's default conditions"
          hint={defaults ? `${defaults.temperatureC} °C, ${defaults.pressureHPa} hPa, ${defaults.relativeHumidityPct} % RH` : 'as set by the admin'}
          registration={register('conditions.source')}
        />
      </div>
      {source === 'measured' ? (
        <>
          <TextField numeric label="Temperature" suffix="°C" inputMode="decimal" registration={register('conditions.temperatureC')} error={errors.temperatureC} />
          <TextField numeric label="Pressure" suffix="hPa" inputMode="decimal" registration={register('conditions.pressureHPa')} error={errors.pressureHPa} />
          <TextField
            numeric
            label="Relative humidity"
            suffix="%"
            inputMode="decimal"
            registration={register('conditions.relativeHumidityPct')}
            error={errors.relativeHumidityPct}
          />
          <TextField label="Measured at" type="datetime-local" registration={register('conditions.measuredAt')} error={errors.measuredAt} hint="Your device's local time" />
        </>
      ) : null}
    </div>
  );
}

/** "2026-03-07T14:02" for a datetime-local input, in the device's time. */
export function nowLocalInput(): string {
  const d = new Date();
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** A datetime-local value → UTC ISO; empty or unreadable → undefined (the server stamps its own time). */
export function localInputToIso(s: string | undefined): string | undefined {
  if (!s) return undefined;
  const d = new Date(s);
  return Number.isNaN(d.getTime()) ? undefined : d.toISOString();
}

/** UTC ISO → datetime-local value in the device's time. */
export function isoToLocalInput(iso: string | null | undefined): string {
  if (!iso) return nowLocalInput();
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return nowLocalInput();
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}
