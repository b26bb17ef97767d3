/**
 * A due date before today (in the job's time zone) is refused: a finding logged or moved to a
 * date already past would count as overdue against the company at once, for work it was never
 * given time to do. A GC manager may still back-date on purpose (a finding entered late from a
 * paper list, a date agreed on site) by saying so with `backdated: true`; the flag is their
 * authority, so anyone else sending it is refused (403), whatever the date.
 * One rule for the forms and the server, so the field message is the same on both sides.
 */
import type { Role } from '../words';

/** Who may back-date a due date. */
export const BACKDATE_ROLES: readonly Role[] = ['gc_manager'];

export const BACKDATE_FORBIDDEN_MESSAGE = 'Only a GC manager can back-date a due date. Choose today or a later date.';

export function pastDueMessage(today: string): string {
  return `The due date is before today (${today} on this job's clock). Choose today or a later date.`;
}

export type DueOnProblem = { kind: 'forbidden'; message: string } | { kind: 'past'; message: string };

/**
 * What is wrong with a due date sent by `role` on a job whose today is `today` (YYYY-MM-DD), or
 * null. `backdated` is the body's explicit flag.
 */
export function dueOnProblem(input: { dueOn: string; backdated?: boolean; role: Role; today: string }): DueOnProblem | null {
  if (input.backdated && !BACKDATE_ROLES.includes(input.role)) return { kind: 'forbidden', message: BACKDATE_FORBIDDEN_MESSAGE };
  if (input.dueOn < input.today && !input.backdated) return { kind: 'past', message: pastDueMessage(input.today) };
  return null;
}
