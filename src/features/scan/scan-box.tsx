import { useEffect, useRef, useState, type FormEvent } from 'react';
import { useNavigate } from 'react-router';
import { isEditableTarget, ScanBuffer } from './scan-buffer.ts';
import { resolveScan } from './resolve-scan.ts';

/**
 * The scan box in the app shell. "/" or F2 (outside any input) puts the cursor here; a scanner then types
 * the code and Enter opens the record. A scan typed at scanner speed while nothing has focus is caught
 * too (ScanBuffer). Camera scanning is not offered: no installed package decodes camera images.
 */
export function ScanBox() {
  const navigate = useNavigate();
  const inputRef = useRef<HTMLInputElement>(null);
  const [value, setValue] = useState('');
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  const open = async (raw: string) => {
    setMessage(null);
    if (raw.trim() === '') return;
    setBusy(true);
    try {
      const target = await resolveScan(raw);
      if (target.kind === 'found') {
        setValue('');
        inputRef.current?.blur();
        navigate(target.to);
      } else {
        setValue(target.code);
        setMessage(`Nothing found for “${target.code}”.`);
        inputRef.current?.focus();
        inputRef.current?.select();
      }
    } finally {
      setBusy(false);
    }
  };
  const openRef = useRef(open);
  openRef.current = open;

  useEffect(() => {
    const buffer = new ScanBuffer();
    const onKeyDown = (e: KeyboardEvent) => {
      if (e.defaultPrevented || e.ctrlKey || e.metaKey || e.altKey) return;
      if (isEditableTarget(e.target)) return;
      const now = performance.now();
      if (e.key === 'F2' || (e.key === '/' && !buffer.active(now))) {
        e.preventDefault();
        buffer.reset();
        const el = inputRef.current;
        if (el) {
          el.focus();
          el.select();
          el.scrollIntoView({ block: 'nearest' });
        }
        return;
      }
      if (e.key === 'Enter') {
        const code = buffer.enter(now);
        if (code) {
          e.preventDefault();
          void openRef.current(code);
        }
        return;
      }
      if (e.key.length === 1) buffer.push(e.key, now);
    };
    window.addEventListener('keydown', onKeyDown);
    return () => window.removeEventListener('keydown', onKeyDown);
  }, []);

  const onSubmit = (e: FormEvent) => {
    e.preventDefault();
    void open(value);
  };

  return (
    <form role="search" onSubmit={onSubmit} className="flex flex-col gap-1" data-testid="scan-form">
      <div className="flex items-center gap-2">
        <label htmlFor="scan-box" className="sr-only">
          Scan or type an identifier
        </label>
        <input
          id="scan-box"
          ref={inputRef}
          data-testid="scan-box"
          value={value}
          onChange={(e) => {
            setValue(e.target.value);
            setMessage(null);
          }}
          onKeyDown={(e) => {
            if (e.key === 'Escape') {
              setValue('');
              setMessage(null);
              e.currentTarget.blur();
            }
          }}
          autoComplete="off"
          spellCheck={false}
          placeholder="Scan or type an identifier (press / or F2)"
          aria-describedby={message ? 'scan-box-message' : undefined}
          aria-invalid={message ? true : undefined}
          className="field-input num min-w-0 flex-1"
        />
        <button
          type="submit"
          disabled={busy}
          className="inline-flex min-h-12 shrink-0 items-center rounded-lg border-2 border-slate-700 bg-slate-700 px-5 font-semibold text-white hover:bg-slate-900 disabled:opacity-70"
        >
          Open
        </button>
      </div>
      {message ? (
        <p id="scan-box-message" role="alert" className="text-sm font-semibold text-bad-700" data-testid="scan-message">
          {message}
        </p>
      ) : null}
    </form>
  );
}
