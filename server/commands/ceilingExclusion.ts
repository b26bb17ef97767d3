/**
 * A GC manager excludes a unit from the ceiling rule (shared/rules/ceilings.ts), with a reason, or
 * lifts the exclusion ("Count it again"). The unit keeps the current exclusion (reason, who, when)
 * and unit_events keeps every exclusion and lift (append-only). Order of refusals, as for the
 * finding writes: unit not on the job 404 (the route's policy already answered 403 to anyone but
 * a GC manager) -> If-Match 428 / 412 with the current state -> a kind the rule does not cover 409
 * -> the write, with a new version.
 */
import type { Transaction } from 'sequelize';
import { isCeilingUnitKind } from '../../shared/rules/ceilings';
import type { CeilingExclusionDto, CeilingExclusionResult } from '../../shared/schemas/setup';
import { unitKindLabel } from '../../shared/words';
import { conflict } from '../errors';
import { Unit, User } from '../models';
import { lockVersioned } from '../services/records';
import { recordUnitEvent, type UnitEventKind } from '../services/unitEvents';
import type { Actor } from './context';

export interface CeilingExclusionContext {
  transaction: Transaction;
  jobId: string;
  actor: Pick<Actor, 'id' | 'name'>;
  /** The client's If-Match (428 without it, 412 with the unit's current exclusion when stale). */
  ifMatch?: string;
  clock: () => Date;
}

async function exclusionOf(unit: Unit, transaction?: Transaction): Promise<CeilingExclusionDto | null> {
  if (!unit.ceilingExcludedReason || !unit.ceilingExcludedBy || !unit.ceilingExcludedAt) return null;
  const by = await User.findByPk(unit.ceilingExcludedBy, { attributes: ['id', 'name'], transaction });
  return { reason: unit.ceilingExcludedReason, by: { id: unit.ceilingExcludedBy, name: by?.name ?? '' }, at: unit.ceilingExcludedAt.toISOString() };
}

export async function presentCeilingExclusion(unit: Unit, transaction?: Transaction): Promise<CeilingExclusionResult> {
  return { unitId: unit.id, tag: unit.tag, version: unit.version, ceilingExclusion: await exclusionOf(unit, transaction) };
}

async function lockCeilingUnit(ctx: CeilingExclusionContext, unitId: string): Promise<Unit> {
  const unit = await lockVersioned(Unit, { id: unitId, jobId: ctx.jobId }, ctx.transaction, 'Unit not found.', ctx.ifMatch, (u) =>
    presentCeilingExclusion(u, ctx.transaction),
  );
  if (!isCeilingUnitKind(unit.kind)) {
    throw conflict(
      `${unit.tag} is a ${unitKindLabel(unit.kind).toLowerCase()}: it does not sit in or above the ceiling, so the ceiling rule does not count it.`,
      'not_a_ceiling_unit',
    );
  }
  return unit;
}

function record(ctx: CeilingExclusionContext, unit: Unit, kind: UnitEventKind, reason: string | null, at: Date) {
  return recordUnitEvent(ctx.transaction, { jobId: ctx.jobId, unitId: unit.id, actorId: ctx.actor.id, kind, reason, at });
}

/** Excludes the unit (or changes the reason of its exclusion: the new reason, who and when replace the old). */
export async function excludeFromCeilingRule(ctx: CeilingExclusionContext, unitId: string, reason: string): Promise<CeilingExclusionResult> {
  const unit = await lockCeilingUnit(ctx, unitId);
  const at = ctx.clock();
  unit.ceilingExcludedReason = reason;
  unit.ceilingExcludedBy = ctx.actor.id;
  unit.ceilingExcludedAt = at;
  unit.version += 1;
  await unit.save({ transaction: ctx.transaction });
  await record(ctx, unit, 'ceiling_excluded', reason, at);
  return presentCeilingExclusion(unit, ctx.transaction);
}

/** Counts the unit again: 409 not_excluded when it is not excluded. */
export async function liftCeilingExclusion(ctx: CeilingExclusionContext, unitId: string): Promise<CeilingExclusionResult> {
  const unit = await lockCeilingUnit(ctx, unitId);
  if (!unit.ceilingExcludedReason) throw conflict(`${unit.tag} is not excluded from the ceiling rule.`, 'not_excluded');
  unit.ceilingExcludedReason = null;
  unit.ceilingExcludedBy = null;
  unit.ceilingExcludedAt = null;
  unit.version += 1;
  await unit.save({ transaction: ctx.transaction });
  await record(ctx, unit, 'ceiling_exclusion_lifted', null, ctx.clock());
  return presentCeilingExclusion(unit, ctx.transaction);
}
