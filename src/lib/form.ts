import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError } from './api-client.ts';

/**
 * Puts the server's `error.fields` (dotted paths) on the matching form fields.
 * Returns the message for a banner when the error has no field the form knows about.
 */
export function applyApiFieldErrors<T extends FieldValues>(
  error: unknown,
  setError: UseFormSetError<T>,
  knownFields: readonly string[],
): string | null {
  if (!(error instanceof ApiError)) {
    return error instanceof Error ? error.message : 'Something went wrong.';
  }
  let unplaced = false;
  let placed = 0;
  for (const [path, message] of Object.entries(error.fields)) {
    if (knownFields.includes(path)) {
      setError(path as Path<T>, { type: 'server', message });
      placed += 1;
    } else {
      unplaced = true;
    }
  }
  if (placed === 0 || unplaced) return error.message;
  return null;
}
