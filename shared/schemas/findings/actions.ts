/**
 * The actions of the finding status machine and the words used when one is refused.
 */

/** The actions of the status machine (shared/findingStatus.ts, enforced by server/services/findingStatus.ts). */
export const FINDING_ACTIONS = ['submit_fix', 'accept', 'return', 'close', 'void', 'reopen', 'reassign', 'change_severity', 'change_due'] as const;
export type FindingAction = (typeof FINDING_ACTIONS)[number];
/** Words used in refusals: "This finding is closed; it cannot be voided." */
export const FINDING_ACTION_WORDS: Record<FindingAction, string> = {
  submit_fix: 'given a fix',
  accept: 'accepted',
  return: 'returned',
  close: 'closed',
  void: 'voided',
  reopen: 'reopened',
  reassign: 'reassigned',
  change_severity: 'given another severity',
  change_due: 'given another due date',
};
