/**
 * Limits and the person reference shared by the walk, check and finding schemas.
 */
import { textLimit } from '../fields';

export const FINDINGS_LIST_LIMIT_DEFAULT = 50;
/** Items in one unit check (the catalogue holds far fewer per unit kind). */
export const CHECK_ITEMS_MAX = 200;
export const NOTE_MAX = 2000;
export const MEASURED_TEXT_MAX = 60;

export const REASON_MAX = 1000;

/** What the note and reason boxes count down to (components/ui TextField `limit`). */
export const NOTE_LIMIT = textLimit(NOTE_MAX, 'The note');
export const REASON_LIMIT = textLimit(REASON_MAX, 'The reason');

/** A person as shown beside a record. */
export interface PersonRef {
  id: string;
  name: string;
}
