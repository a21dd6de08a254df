import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError } from './http';

/**
 * The server's per-field messages (read from the API error's `details`) for the fields a form
 * shows, in the form's order. Messages for other paths are left out: the form shows those in
 * its banner instead.
 */
export function serverFieldErrors<T extends FieldValues>(error: unknown, fields: readonly Path<T>[]): [Path<T>, string][] {
  if (!(error instanceof ApiError)) return [];
  return fields.flatMap((f) => (error.fieldErrors[f] ? [[f, error.fieldErrors[f]] as [Path<T>, string]] : []));
}

/**
 * Put the server's per-field messages next to their fields through react-hook-form's setError,
 * focusing the first. Returns true when at least one field got a message; a form shows its
 * error banner only when none did (see `hasServerFieldErrors`).
 */
export function showServerFieldErrors<T extends FieldValues>(error: unknown, setError: UseFormSetError<T>, fields: readonly Path<T>[]): boolean {
  const found = serverFieldErrors(error, fields);
  found.forEach(([field, message], i) => setError(field, { type: 'server', message }, { shouldFocus: i === 0 }));
  return found.length > 0;
}

/** True when the server's answer named at least one of the form's fields (so no banner is needed). */
export function hasServerFieldErrors<T extends FieldValues>(error: unknown, fields: readonly Path<T>[]): boolean {
  return serverFieldErrors(error, fields).length > 0;
}
