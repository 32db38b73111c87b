/**
 * Keyboard-output balances (and their USB adapters) type the reading followed by Enter, far faster than a
 * person types. A reading field records the time of each key; this decides whether the entry was such a burst
 * (captured) or typed by hand. Common practice for telling scanner or balance input from typing, thresholds ours:
 * at least 4 characters, every gap between keys at most 35 ms, and the whole entry within 1 s. A person typing
 * "12.3456" needs well over 35 ms between most keys; a keyboard-output device sends a key every few ms.
 */
export interface KeyStamp {
  key: string;
  /** Milliseconds (performance.now() or event.timeStamp). */
  at: number;
}

export const BURST_MIN_CHARS = 4;
export const BURST_MAX_GAP_MS = 35;
export const BURST_MAX_TOTAL_MS = 1000;

/** The text of a burst that ended with Enter, or null when the keys were typed (or edited) by hand. */
export function burstText(keys: readonly KeyStamp[]): string | null {
  if (keys.length === 0 || keys.at(-1)!.key !== 'Enter') return null;
  const chars = keys.slice(0, -1);
  if (chars.length < BURST_MIN_CHARS || chars.some((k) => k.key.length !== 1)) return null;
  for (let i = 1; i < keys.length; i++) if (keys[i]!.at - keys[i - 1]!.at > BURST_MAX_GAP_MS) return null;
  if (keys.at(-1)!.at - keys[0]!.at > BURST_MAX_TOTAL_MS) return null;
  return chars.map((k) => k.key).join('');
}
