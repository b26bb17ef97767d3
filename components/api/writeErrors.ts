/**
 * The one sentence for a refused write, shown above a form, beside a row or under an action.
 * Decided by status, never by the server's wording: 412 (someone changed it first) and 409
 * (it no longer fits the current state) say that the screen now shows the current version, since
 * every write screen reloads after them (a screen with its own words for that passes them in:
 * `stale`, `afterConflict`); a 400 whose field messages already sit beside their
 * fields points there instead of repeating one of them; anything that is not an API answer
 * (a bug, a body that is not JSON) gets a plain "did not save" rather than a JavaScript message.
 */
import { ApiError } from './client';

export interface WriteErrorWords {
  /** The form already shows the server's field messages at their fields (400). */
  fieldsShown?: boolean;
  /** Said for a 412 instead of the server's sentence, when the screen has its own (e.g. a finding reloaded in place). */
  stale?: string;
  /** Added after the server's words on a 409; '' when those words already say the current state. */
  afterConflict?: string;
}

export const NOT_SAVED = 'That did not save. Try again.';
export const FIELDS_MARKED = 'Check the fields marked below.';
const CURRENT_STATE = 'What you see now is the current state.';

export function writeErrorMessage(err: unknown, words: WriteErrorWords = {}): string {
  if (!(err instanceof ApiError)) return NOT_SAVED;
  if (err.status === 412) return words.stale ?? `${err.message} The current version is shown now.`;
  if (err.status === 409) return [err.message, words.afterConflict ?? CURRENT_STATE].filter(Boolean).join(' ');
  if (words.fieldsShown && err.status === 400) return FIELDS_MARKED;
  return err.message;
}
