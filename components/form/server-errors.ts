import type { FieldPath, FieldValues, UseFormSetError } from 'react-hook-form';
import { fieldErrors } from '@/hooks/api/api-client';

/**
 * Puts a 400's `details.fields` messages next to the matching inputs. Returns true when at
 * least one known field got a message, so the caller can skip a general notice.
 */
export function applyServerFieldErrors<T extends FieldValues>(
  error: unknown,
  setError: UseFormSetError<T>,
  knownFields: readonly FieldPath<T>[],
): boolean {
  const fields = fieldErrors(error);
  let applied = false;
  for (const name of knownFields) {
    const message = fields[name];
    if (message) {
      setError(name, { type: 'server', message });
      applied = true;
    }
  }
  return applied;
}
