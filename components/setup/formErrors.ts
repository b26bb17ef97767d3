import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError, isConflict } from '../api/client';
import { NOT_SAVED, writeErrorMessage } from '../api/writeErrors';

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
    setError('root', { message: NOT_SAVED });
    return;
  }
  let placed = false;
  for (const [field, message] of Object.entries(err.fields)) {
    // A nested field of the form (`concentrationLimitOverride.value`) takes its own message; else the top field.
    const top = fieldNames.includes(field) ? field : field.split('.')[0]!;
    if (fieldNames.includes(top)) {
      // The first one placed takes the focus, so a long form scrolls to it.
      setError(top as Path<T>, { message }, { shouldFocus: !placed });
      placed = true;
    }
  }
  const clash = err.status === 409 ? clashFields[err.id] : undefined;
  if (clash && fieldNames.includes(clash)) {
    setError(clash as Path<T>, { message: err.message }, { shouldFocus: true });
    return;
  }
  setError('root', { message: writeErrorMessage(err, { fieldsShown: placed }) });
}

export { isConflict };
/**
 * Kept for the set-up screens still importing it from here (catalogue, systems, models,
 * companies); it goes once they import components/api/writeErrors.ts.
 */
export { writeErrorMessage };
