/**
 * The hook the finding routes call when a finding is logged or reassigned: a critical finding
 * assigned to a company mails that company's subcontractor members on the job at once (after the
 * write commits; nothing is sent when it rolls back). The digest service is set on the Express
 * app by createApp (app.set('digests', ...)); without one (a bare test app) nothing is sent.
 */
import type { Request } from 'express';
import type { Transaction } from 'sequelize';
import type { CriticalAssignmentInput, DigestService } from './service';

export function digestsOf(req: Request): DigestService | undefined {
  return req.app.get('digests') as DigestService | undefined;
}

export async function notifyCriticalAssignment(req: Request, transaction: Transaction, input: Omit<CriticalAssignmentInput, 'actorId'>): Promise<void> {
  if (input.severity !== 'critical') return;
  const digests = digestsOf(req);
  if (!digests || !req.user) return;
  await digests.notifyCriticalAssignment({ ...input, actorId: req.user.id }, transaction, req);
}
