import { useEffect, useState } from 'react';

/** The value, once it has stopped changing for `delayMs`. Compared by JSON, so new-but-equal objects do not restart the timer. */
export function useDebouncedValue<T>(value: T, delayMs: number): T {
  const [debounced, setDebounced] = useState(value);
  const key = JSON.stringify(value);
  useEffect(() => {
    const t = setTimeout(() => setDebounced(value), delayMs);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, delayMs]);
  return debounced;
}
