/**
 * What every change of one finding does, in one order: lock the finding in the caller's scope
 * (404 when it is not theirs to see), refuse a role that may never do this (403) before anything
 * else is read, check If-Match (428 / 412 with the finding as it is now), then refuse a status
 * that does not allow it (409), and after the change raise the version and save.
 */
import type { WhereOptions } from 'sequelize';
import type { Decision } from '../../shared/findingStatus';
import type { FindingDetail } from '../../shared/schemas/findings';
import type { FindingStatus } from '../../shared/words';
import { notFound } from '../errors';
import { Finding } from '../models';
import { findingDetail } from '../services/findingQueries';
import { refusalError } from '../services/findingStatus';
import { checkVersion, versionMatches } from '../services/versioning';
import type { CommandContext, ReadContext } from './context';

/** The finding in the caller's scope, locked for the rest of the transaction; 404 when it is not theirs to see. */
export async function lockFinding(ctx: CommandContext, findingId: string): Promise<Finding> {
  const { scope, transaction } = ctx;
  const where: WhereOptions<Finding> = { id: findingId, jobId: scope.jobId };
  if (scope.companyId) Object.assign(where, { companyId: scope.companyId });
  const finding = await Finding.findOne({ where, transaction, lock: transaction.LOCK.UPDATE });
  if (!finding) throw notFound('Finding not found.');
  return finding;
}

/** The finding in the caller's scope, unlocked (checks made before the transaction); 404 when not theirs. */
export async function visibleFinding(ctx: ReadContext, findingId: string): Promise<Finding> {
  const { scope } = ctx;
  const finding = await Finding.findOne({
    where: { id: findingId, jobId: scope.jobId, ...(scope.companyId ? { companyId: scope.companyId } : {}) },
    attributes: ['id', 'status', 'loggedBy'],
  });
  if (!finding) throw notFound('Finding not found.');
  return finding;
}

/** `ifMatch`: the If-Match header's value; null when the write takes none (a fix). */
export interface Precondition {
  ifMatch: string | undefined | null;
}

/** 428 without If-Match; 412 with the current finding when it is stale. */
async function requireIfMatch(ctx: CommandContext, finding: Finding, ifMatch: string | undefined): Promise<void> {
  const current = ifMatch && !versionMatches(ifMatch, finding.version) ? await findingDetail(ctx.sequelize, ctx.scope, finding.id, ctx.transaction) : undefined;
  checkVersion(ifMatch, finding.version, current);
}

/** Role first (403, nothing read further), then If-Match (428 / 412), then status (409). Returns the status after. */
export async function authorise(ctx: CommandContext, finding: Finding, decision: Decision, pre: Precondition): Promise<FindingStatus> {
  if (!decision.allowed && decision.code === 403) throw refusalError(decision);
  if (pre.ifMatch !== null) await requireIfMatch(ctx, finding, pre.ifMatch);
  if (!decision.allowed) throw refusalError(decision);
  return decision.to;
}

/** A change of the finding: its version rises (ETag), in the write's transaction. */
export async function saveChange(ctx: CommandContext, finding: Finding): Promise<void> {
  finding.version += 1;
  await finding.save({ transaction: ctx.transaction });
}

/** The finding as the caller sees it now (inside the transaction: with the write's changes). */
export async function detailOf(ctx: CommandContext, findingId: string): Promise<FindingDetail> {
  const detail = await findingDetail(ctx.sequelize, ctx.scope, findingId, ctx.transaction);
  if (!detail) throw notFound('Finding not found.');
  return detail;
}
