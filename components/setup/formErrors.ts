import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError, isConflict } from '../api/client';

/**
 * Puts a refused write's messages where the user looks: server field errors (ApiError.fields)
 * at their fields, a clash the server names by its error id (e.g. `duplicate_tag` → tag) at
 * that field, everything else above the form (root). After a 409/412 the screen's queries
 * have been read again (useSetupWrite), so what is shown is the current state.
 */
export function showServerErrors<T extends FieldValues>(
  err: unknown,
  setError: UseFormSetError<T>,
  fieldNames: readonly string[],
  clashFields: Readonly<Record<string, string>> = {},
) {
  if (!(err instanceof ApiError)) {
    setError('root', { message: 'That did not save. Try again.' });
    return;
  }
  let placed = false;
  for (const [field, message] of Object.entries(err.fields)) {
    const top = field.split('.')[0]!;
    if (fieldNames.includes(top)) {
      setError(top as Path<T>, { message });
      placed = true;
    }
  }
  const clash = err.status === 409 ? clashFields[err.id] : undefined;
  if (clash && fieldNames.includes(clash)) {
    setError(clash as Path<T>, { message: err.message });
    return;
  }
  setError('root', { message: writeErrorMessage(err, placed) });
}

/** The sentence for a refused write, shown above a form or beside a row. */
export function writeErrorMessage(err: unknown, fieldsShown = false): string {
  if (!(err instanceof ApiError)) return 'That did not save. Try again.';
  if (err.status === 412) return `${err.message} The current version is shown now.`;
  if (err.status === 409) return `${err.message} What you see now is the current state.`;
  if (fieldsShown && err.status === 400) return 'Check the fields marked below.';
  return err.message;
}

export { isConflict };
