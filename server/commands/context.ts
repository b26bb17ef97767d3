/**
 * What every finding command takes instead of the request: the database and the write's
 * transaction, who acts (and their role on the job), what they may see (scope), the clock, and
 * the digest service for the mails a write sends at once. Commands never see `req` or `res`:
 * `contextOf` below is the one place a request becomes a context.
 *
 * Photos are stored before the transaction opens (services/photos.ts withStoredPhotos, through
 * services/idempotency.ts idempotentPhotoWrite), so a command receives them already stored and
 * claims them inside its transaction (`NewPhotos`); it never talks to the photo store itself.
 */
import type { Request } from 'express';
import type { Sequelize, Transaction } from 'sequelize';
import type { Role } from '../../shared/words';
import type { CriticalAssignmentInput, DigestService } from '../digests/service';
import type { FindingScope } from '../services/findingQueries';
import type { StoredPhoto } from '../services/photos';
import { sequelizeOf } from '../services/records';

export interface Actor {
  id: string;
  name: string;
  /** The actor's role on the job of the scope. */
  role: Role;
}

export interface CommandContext {
  sequelize: Sequelize;
  /** The write's one transaction (opened by the caller: idempotentWrite or sequelize.transaction). */
  transaction: Transaction;
  actor: Actor;
  scope: FindingScope;
  /** Now, for logged/submitted times and due dates (tests may pin it). */
  clock: () => Date;
  /** Sends the critical-assignment mails after commit; absent (a bare test app): nothing is sent. */
  digests?: DigestService;
}

/** The context before the transaction opens: checks that must refuse before any photo is stored. */
export type ReadContext = Omit<CommandContext, 'transaction'> & { transaction?: Transaction };

/** Photos already in the store for this write; the command claims them in its transaction. */
export interface NewPhotos {
  stored: readonly StoredPhoto[];
  claim: (transaction: Transaction) => Promise<void>;
}

/** A job member's request → the context of a finding command (after policy.jobMember). */
export function contextOf(req: Request): ReadContext {
  const user = req.user!;
  return {
    sequelize: sequelizeOf(req),
    actor: { id: user.id, name: user.name, role: req.membership!.role },
    scope: req.scope!,
    clock: () => new Date(),
    digests: req.app.get('digests') as DigestService | undefined,
  };
}

/** A critical finding logged for or reassigned to a company mails its subcontractors (after commit). */
export async function notifyCriticalAssignment(ctx: CommandContext, input: Omit<CriticalAssignmentInput, 'actorId'>): Promise<void> {
  if (input.severity !== 'critical' || !ctx.digests) return;
  await ctx.digests.notifyCriticalAssignment({ ...input, actorId: ctx.actor.id }, ctx.transaction);
}
