/**
 * The server side of shared/rules/pastDue.ts: a due date sent in a body is checked against today
 * on the job's clock (its time zone), at the time of the write.
 */
import { todayIn } from '../../shared/rules/dates';
import { dueOnProblem } from '../../shared/rules/pastDue';
import type { Role } from '../../shared/words';
import { badRequest, forbidden } from '../errors';

/**
 * Refuses a due date before today unless a GC manager back-dates it (400 on `field`), and the
 * back-dating flag from anyone else (403 `backdate_forbidden`). Returns whether the date is
 * back-dated (before today), for the event.
 */
export function checkDueOn(field: string, input: { dueOn: string; backdated?: boolean }, role: Role, timeZone: string, now: Date): { backdated: boolean } {
  const today = todayIn(timeZone, now);
  const problem = dueOnProblem({ ...input, role, today });
  if (problem?.kind === 'forbidden') throw forbidden(problem.message, 'backdate_forbidden');
  if (problem) throw badRequest(`${field}: ${problem.message}`, { [field]: problem.message });
  return { backdated: input.dueOn < today };
}
