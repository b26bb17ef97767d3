/**
 * The server side of the finding status machine (shared/findingStatus.ts): refusals become
 * 403 forbidden or 409 `invalid_transition`.
 */
import { decide, type Decision } from '../../shared/findingStatus';
import type { FindingAction } from '../../shared/schemas/findings';
import type { FindingStatus, Role } from '../../shared/words';
import { conflict, forbidden, type HttpError } from '../errors';

export { decide, type Decision };

/** The HttpError for a refusal: 403 forbidden, or 409 `invalid_transition`. */
export function refusalError(decision: Extract<Decision, { allowed: false }>): HttpError {
  return decision.code === 403 ? forbidden(decision.message) : conflict(decision.message, 'invalid_transition');
}

/** Allowed or throws. Returns the status after the action. */
export function assertAllowed(status: FindingStatus, action: FindingAction, role: Role, isLogger: boolean): FindingStatus {
  const d = decide(status, action, role, isLogger);
  if (!d.allowed) throw refusalError(d);
  return d.to;
}
