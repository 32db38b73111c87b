/**
 * Recognises a barcode scanner typing into the page while no input has focus. Keyboard-wedge scanners
 * send each character a few milliseconds apart and finish with Enter; people type far slower
 * (common practice: a gap of about 50 ms separates the two). Pure: the caller passes the time.
 */
export const SCAN_GAP_MS = 50;
export const SCAN_MIN_LENGTH = 3;

export class ScanBuffer {
  private chars = '';
  private last = -Infinity;

  constructor(
    private readonly gapMs = SCAN_GAP_MS,
    private readonly minLength = SCAN_MIN_LENGTH,
  ) {}

  /** A printable character arrived at time `at` (ms). */
  push(char: string, at: number): void {
    if (at - this.last > this.gapMs) this.chars = '';
    this.chars += char;
    this.last = at;
  }

  /** Enter arrived at `at`: the scanned code, or null when the keys were typed by hand (or too few). */
  enter(at: number): string | null {
    const code = at - this.last <= this.gapMs && this.chars.length >= this.minLength ? this.chars : null;
    this.reset();
    return code;
  }

  /** True while keys are arriving at scanner speed (so "/" belongs to the code, not to the shortcut). */
  active(at: number): boolean {
    return this.chars.length > 0 && at - this.last <= this.gapMs;
  }

  reset(): void {
    this.chars = '';
    this.last = -Infinity;
  }
}

/** Key presses inside these go to the element, never to the scan shortcut or the buffer. */
export function isEditableTarget(target: EventTarget | null): boolean {
  if (!target || typeof (target as Element).closest !== 'function') return false;
  const el = target as HTMLElement;
  if (el.isContentEditable) return true;
  return el.closest('input, textarea, select, [contenteditable=""], [contenteditable="true"]') !== null;
}
