import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError } from '../api/client';

/** Puts an API error on the form: field messages on their fields, the message at the top. */
export function applyApiError<T extends FieldValues>(err: unknown, setError: UseFormSetError<T>, fields: readonly Path<T>[], fallback: string) {
  if (err instanceof ApiError) {
    for (const [field, message] of Object.entries(err.fields)) {
      if ((fields as readonly string[]).includes(field)) setError(field as Path<T>, { message });
    }
    setError('root' as Path<T>, { message: err.message });
  } else {
    setError('root' as Path<T>, { message: fallback });
  }
}
