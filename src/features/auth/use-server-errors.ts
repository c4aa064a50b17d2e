import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError } from '@/api/client';

/**
 * Puts the server's per-field reasons under the matching inputs and returns the message
 * to show above the form when the refusal was not about one field.
 */
export function applyServerErrors<T extends FieldValues>(
  error: unknown,
  fields: readonly Path<T>[],
  setError: UseFormSetError<T>,
): string | undefined {
  if (!(error instanceof ApiError)) return 'Something went wrong; try again.';
  let placed = false;
  for (const detail of error.details) {
    const field = fields.find((f) => f === detail.field);
    if (field) {
      setError(field, { type: 'server', message: detail.reason });
      placed = true;
    }
  }
  return placed ? undefined : error.message;
}
