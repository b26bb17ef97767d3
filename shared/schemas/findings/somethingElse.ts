/**
 * "Something else" on POST /findings: a defect the catalogue lacks, named in free text with the
 * trade that usually fixes it. The body then has no catalogueItemId; the server logs it against
 * the job's other defect type (shared/rules/somethingElse.ts).
 */
import { z } from 'zod';
import { DEFECT_TITLE_MAX } from '../../rules/somethingElse';
import { limited, textLimit } from '../fields';
import { TRADE_KEYS } from '../../words';

/** Said when the defect type is missing or not one the job has: the list, or Something else. */
export const DEFECT_TYPE_CHOICE = 'Choose the defect from the list, or describe it under Something else.';

/** What the Something else title box counts down to. */
export const DEFECT_TITLE_LIMIT = textLimit(DEFECT_TITLE_MAX, 'The title');

export const defectTitle = limited(z.string({ error: 'Say what is wrong, in a few words.' }).trim().min(1, 'Say what is wrong, in a few words.'), DEFECT_TITLE_LIMIT);

export const somethingElseTrade = z.enum(TRADE_KEYS, { error: 'Choose the trade that usually fixes it.' });

interface SomethingElseFields {
  catalogueItemId?: string;
  title?: string;
  trade?: string;
  severity?: string;
  measuredText?: string | null;
}

/**
 * Either a defect type, or a title with its trade and severity (no default to take them from).
 * A body with neither is asked for the defect type; one with a trade or title but no type is
 * "Something else" and is asked for what it lacks.
 */
export function refineSomethingElse(f: SomethingElseFields, ctx: z.RefinementCtx) {
  const issue = (path: string, message: string) => ctx.addIssue({ code: 'custom', path: [path], message });
  if (f.catalogueItemId) {
    if (f.title !== undefined) issue('title', 'A defect type from the catalogue has its own title; leave this out.');
    if (f.trade !== undefined) issue('trade', 'A defect type from the catalogue has its own trade; leave this out.');
    return;
  }
  if (f.title === undefined && f.trade === undefined) {
    issue('catalogueItemId', DEFECT_TYPE_CHOICE);
    return;
  }
  if (f.title === undefined) issue('title', 'Say what is wrong, in a few words.');
  if (f.trade === undefined) issue('trade', 'Choose the trade that usually fixes it.');
  if (f.severity === undefined) issue('severity', 'Choose the severity.');
  if (f.measuredText) issue('measuredText', 'Something else takes no measured value.');
}
