/**
 * The finding status machine, in ONE place. Pure: (status, action, role, isLogger) → allowed
 * (with the status after) or a refusal (403 when the role may never do this, 409 when the
 * finding's status does not allow it now). The server's routes call it through server/services/findingStatus.ts; the screens call it to
 * offer only what the role may do (the server stays the authority).
 *
 *   open ──submit_fix──▶ fix_submitted ──accept──▶ closed ──reopen──▶ open
 *     ▲                        │
 *     └───────return───────────┘           (return_count + 1, reason required)
 *   open ──close (inspector: "closed on walk")──▶ closed
 *   open | fix_submitted ──void (GC manager, or the inspector who logged it)──▶ voided
 *   open | fix_submitted: reassign, change_severity, change_due (GC manager, inspector), same status
 *
 * Who (before status): submit_fix → the subcontractor of the finding's company (a subcontractor
 * only ever sees their own company's findings) or a GC manager; accept / return → inspector,
 * GC manager; close → inspector; void → GC manager, the inspector who logged it; reopen → GC
 * manager; reassign / severity / due date → GC manager, inspector.
 *
 * The plan pin (where a finding is drawn on its level's plan) is no status change: GC managers and
 * inspectors place, move or remove it in any status but voided (a voided finding is not drawn).
 */
import { FINDING_ACTION_WORDS, type FindingAction } from './schemas/findings';
import type { FindingStatus, Role } from './words';

export type Decision =
  | { allowed: true; to: FindingStatus }
  | { allowed: false; code: 403 | 409; message: string };

const WHO: Record<FindingAction, (role: Role, isLogger: boolean) => boolean> = {
  submit_fix: (r) => r === 'subcontractor' || r === 'gc_manager',
  accept: (r) => r === 'inspector' || r === 'gc_manager',
  return: (r) => r === 'inspector' || r === 'gc_manager',
  close: (r) => r === 'inspector',
  void: (r, logger) => r === 'gc_manager' || (r === 'inspector' && logger),
  reopen: (r) => r === 'gc_manager',
  reassign: (r) => r === 'inspector' || r === 'gc_manager',
  change_severity: (r) => r === 'inspector' || r === 'gc_manager',
  change_due: (r) => r === 'inspector' || r === 'gc_manager',
};

/** From which status each action is allowed, and the status after. */
const TRANSITIONS: Record<FindingAction, Partial<Record<FindingStatus, FindingStatus>>> = {
  submit_fix: { open: 'fix_submitted' },
  accept: { fix_submitted: 'closed' },
  return: { fix_submitted: 'open' },
  close: { open: 'closed' },
  void: { open: 'voided', fix_submitted: 'voided' },
  reopen: { closed: 'open' },
  reassign: { open: 'open', fix_submitted: 'fix_submitted' },
  change_severity: { open: 'open', fix_submitted: 'fix_submitted' },
  change_due: { open: 'open', fix_submitted: 'fix_submitted' },
};

const WHO_MESSAGE: Record<FindingAction, string> = {
  submit_fix: 'Only the responsible company or a GC manager can submit a fix.',
  accept: 'Only an inspector or a GC manager can re-inspect a fix.',
  return: 'Only an inspector or a GC manager can re-inspect a fix.',
  close: 'Only an inspector can close a finding on a walk.',
  void: 'Only a GC manager or the inspector who logged this finding can void it.',
  reopen: 'Only a GC manager can reopen a closed finding.',
  reassign: 'Only a GC manager or an inspector can reassign a finding.',
  change_severity: 'Only a GC manager or an inspector can change the severity.',
  change_due: 'Only a GC manager or an inspector can change the due date.',
};

const STATUS_WORDS: Record<FindingStatus, string> = {
  open: 'open',
  fix_submitted: 'fix submitted',
  closed: 'closed',
  voided: 'voided',
};

export function decide(status: FindingStatus, action: FindingAction, role: Role, isLogger: boolean): Decision {
  if (!WHO[action](role, isLogger)) return { allowed: false, code: 403, message: WHO_MESSAGE[action] };
  const to = TRANSITIONS[action][status];
  if (to === undefined) {
    return { allowed: false, code: 409, message: `This finding is ${STATUS_WORDS[status]}; it cannot be ${FINDING_ACTION_WORDS[action]}.` };
  }
  return { allowed: true, to };
}

/** Who may place, move or remove a finding's pin on the level's plan. */
export const PIN_ROLES: readonly Role[] = ['gc_manager', 'inspector'];

/** The pin rule: the status stays as it is; a voided finding is no longer drawn, so it takes no pin. */
export function decidePin(status: FindingStatus, role: Role): Decision {
  if (!PIN_ROLES.includes(role)) return { allowed: false, code: 403, message: 'Only the GC manager and inspectors place findings on the plan.' };
  if (status === 'voided') return { allowed: false, code: 409, message: 'This finding is voided; it cannot be placed on the plan.' };
  return { allowed: true, to: status };
}

/** Who may add photos of the defect to a finding after logging it: those who may log one. */
export const ADD_PHOTO_ROLES: readonly Role[] = ['gc_manager', 'inspector'];

/**
 * Adding photos of the defect: only while the finding is open (a returned finding is open again);
 * once a fix is submitted the photos to judge are the fix's, and a closed or voided finding is
 * evidence that no longer changes. The status stays as it is.
 */
export function decideAddPhotos(status: FindingStatus, role: Role): Decision {
  if (!ADD_PHOTO_ROLES.includes(role)) return { allowed: false, code: 403, message: 'Only the GC manager and inspectors add photos to a finding.' };
  if (status !== 'open') return { allowed: false, code: 409, message: `This finding is ${STATUS_WORDS[status]}; photos can be added only while it is open.` };
  return { allowed: true, to: status };
}
