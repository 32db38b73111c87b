import { MAX_LABEL_COPIES } from '../../../../shared/schemas/printing.ts';

const clamp = (n: number) => Math.min(MAX_LABEL_COPIES, Math.max(1, Math.round(n)));

/**
 * Number of copies, 1 to 500, with large − / + buttons for gloved fingers. The text box accepts
 * typing; anything that is not a whole number in range is shown as an error and not used.
 */
export function CopiesStepper({
  value,
  onChange,
  text,
  onTextChange,
  error,
}: {
  value: number;
  onChange: (n: number) => void;
  text: string;
  onTextChange: (s: string) => void;
  error?: string;
}) {
  const step = (delta: number) => {
    const next = clamp(value + delta);
    onChange(next);
    onTextChange(String(next));
  };
  const btn =
    'flex min-h-14 min-w-14 items-center justify-center rounded-lg border-2 border-slate-700 bg-card text-2xl font-bold hover:bg-slate-100 disabled:cursor-not-allowed disabled:opacity-50';
  return (
    <div>
      <label htmlFor="label-copies" className="mb-1 block text-sm font-semibold">
        Copies (1 to {MAX_LABEL_COPIES})
      </label>
      <div className="flex items-center gap-2">
        <button type="button" className={btn} aria-label="One copy fewer" data-testid="copies-minus" disabled={value <= 1} onClick={() => step(-1)}>
          −
        </button>
        <input
          id="label-copies"
          data-testid="label-copies"
          inputMode="numeric"
          autoComplete="off"
          value={text}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? 'label-copies-error' : undefined}
          onChange={(e) => {
            // kept as typed ("-3" stays "-3" and is refused at the field, never silently made 3)
            const s = e.target.value.slice(0, 8);
            onTextChange(s);
            if (!copiesError(s)) onChange(Number(s.trim()));
          }}
          className="field-input num w-28 text-center text-xl"
        />
        <button
          type="button"
          className={btn}
          aria-label="One copy more"
          data-testid="copies-plus"
          disabled={value >= MAX_LABEL_COPIES}
          onClick={() => step(1)}
        >
          +
        </button>
        {[5, 10].map((d) => (
          <button key={d} type="button" className={`${btn} px-3 text-lg`} onClick={() => step(d)} disabled={value >= MAX_LABEL_COPIES}>
            +{d}
          </button>
        ))}
      </div>
      {error ? (
        <p id="label-copies-error" role="alert" className="mt-1 text-sm font-semibold text-bad-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** The message for a typed copies value, or undefined when it is a whole number from 1 to 500. */
export function copiesError(text: string): string | undefined {
  const t = text.trim();
  if (t === '') return `Enter the number of copies, 1 to ${MAX_LABEL_COPIES}`;
  if (!/^\d+$/.test(t)) return `Copies are a whole number from 1 to ${MAX_LABEL_COPIES}, not ${t}`;
  const n = Number(t);
  if (n < 1 || n > MAX_LABEL_COPIES) return `Use 1 to ${MAX_LABEL_COPIES} copies, not ${t}`;
  return undefined;
}
