/**
 * A bench reading field that takes the reading from the balance (issue 15):
 * - a keyboard-output balance types its print followed by Enter far faster than a person: the burst is
 *   recognised (shared/balance/keyboard-burst.ts), parsed, the value filled and marked "from the balance";
 * - "Read from balance" uses Web Serial where the browser has it (readFromBalance);
 * - anything typed by hand stays possible and is marked "typed" (the verifier sees it).
 * Editing a captured value by hand turns it back into a typed reading.
 */
import { useRef, useState, type KeyboardEvent } from 'react';
import type { UseFormRegisterReturn } from 'react-hook-form';
import { burstText, BURST_MAX_GAP_MS, type KeyStamp } from '../../../shared/balance/keyboard-burst.ts';
import { parsePrintout } from '../../../shared/balance/output-line.ts';
import type { CaptureInput } from '../../../shared/balance/capture.ts';
import { hasWebSerial, readFromBalance, type BalancePortSettings } from './serial-read.ts';

export interface FieldCapture extends CaptureInput {
  /** the value the capture filled in (a hand edit that changes it drops the capture) */
  value: string;
  unit: 'g' | 'mg';
}

const METHOD_MARK: Record<CaptureInput['method'], string> = {
  typed: 'typed',
  keyboard_burst: 'captured from the balance (keyboard output)',
  serial: 'captured from the balance (serial)',
  bridge: 'captured from the balance (bench bridge)',
};

export function ReadingCaptureField({
  name,
  label,
  registration,
  error,
  hint,
  balance,
  capture,
  onCapture,
  onValue,
  testId,
}: {
  name: string;
  label: string;
  registration: UseFormRegisterReturn;
  error?: string;
  hint?: string;
  /** the selected balance (its line shape and port settings); null: not known yet */
  balance: BalancePortSettings | null;
  capture: FieldCapture | null;
  onCapture: (c: FieldCapture | null) => void;
  /** sets the field's value (and unit) in the form */
  onValue: (value: string, unit: 'g' | 'mg') => void;
  testId?: string;
}) {
  const keys = useRef<KeyStamp[]>([]);
  const [note, setNote] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const id = testId ?? `input-${name}`;

  const take = (raw: string, method: FieldCapture['method']) => {
    const print = parsePrintout(raw, balance?.outputShape ?? 'auto');
    const r = print.reading;
    if (r.kind !== 'reading') {
      setNote(r.message);
      onCapture(null);
      return;
    }
    if (r.unit === 'kg') {
      setNote('The balance printed kg: set it to g or mg and print again.');
      onCapture(null);
      return;
    }
    onValue(r.value, r.unit);
    onCapture({ method, rawLine: raw, value: r.value, unit: r.unit });
    setNote(r.stability === 'unstable' ? 'The balance marked this reading unstable: wait until it settles and print again.' : null);
  };

  const onKeyDown = (e: KeyboardEvent<HTMLInputElement>) => {
    const at = e.timeStamp;
    const last = keys.current.at(-1);
    if (!last || at - last.at > BURST_MAX_GAP_MS) keys.current = [];
    keys.current.push({ key: e.key, at });
    if (e.key !== 'Enter') return;
    const text = burstText(keys.current);
    keys.current = [];
    if (text === null) return;
    e.preventDefault(); // the balance's Enter ends its print; it does not submit the form
    take(`${text}\r\n`, 'keyboard_burst');
  };

  const registered = registration;
  const read = async () => {
    if (!balance) return;
    setBusy(true);
    setNote(null);
    try {
      const { raw } = await readFromBalance(balance);
      take(raw, 'serial');
    } catch (e) {
      setNote(e instanceof Error ? e.message : String(e));
    } finally {
      setBusy(false);
    }
  };
  const serial = hasWebSerial();

  return (
    <div>
      <label htmlFor={name} className="mb-1 block text-base font-semibold">
        {label}
      </label>
      <div className="flex flex-wrap items-stretch gap-2">
        <input
          id={name}
          type="text"
          inputMode="decimal"
          autoComplete="off"
          spellCheck={false}
          data-testid={id}
          {...registered}
          onKeyDown={onKeyDown}
          onChange={(e) => {
            void registered.onChange(e);
            if (capture && e.target.value.trim() !== capture.value) onCapture(null);
          }}
          aria-invalid={error ? true : undefined}
          aria-describedby={[`${name}-how`, hint ? `${name}-hint` : '', error ? `${name}-error` : ''].filter(Boolean).join(' ')}
          className="field-input num min-h-16 min-w-0 flex-1 text-3xl"
        />
        <button
          type="button"
          data-testid={`read-${name}`}
          onClick={serial ? () => void read() : () => setNote('This browser has no serial port access (Web Serial: Chrome or Edge). Press Print on a keyboard-output balance, or type the reading.')}
          disabled={busy || !balance}
          className="min-h-16 rounded-xl border-2 border-ink px-4 text-lg font-semibold"
        >
          {busy ? 'Reading…' : 'Read from balance'}
        </button>
      </div>
      <p id={`${name}-how`} data-testid={`how-${name}`} data-method={capture?.method ?? 'typed'} className={`mt-1 text-base font-semibold ${capture ? 'text-ok-700' : 'text-caution-700'}`}>
        {capture ? `✓ ${METHOD_MARK[capture.method]}` : 'typed: the verifier checks typed readings against the balance print'}
      </p>
      {note ? (
        <p role="status" data-testid={`note-${name}`} className="mt-1 text-sm font-semibold text-caution-700">
          {note}
        </p>
      ) : null}
      {hint ? (
        <p id={`${name}-hint`} className="mt-1 text-sm text-ink-soft">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${name}-error`} role="alert" className="mt-1 text-sm font-semibold text-bad-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}
