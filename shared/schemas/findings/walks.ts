/**
 * Walks: start, finish, list (docs/api-findings.md).
 */
import { z } from 'zod';
import type { Severity } from '../../words';
import type { PersonRef } from './common';
import { id, pageQuery, booleanQuery } from './fields';

/**
 * POST /walks (inspector, GC manager) → 201 WalkDetail. Idempotency-Key honoured.
 * `id`: optional, made on the phone (UUID) when a walk starts with no signal, so the unit checks
 * queued after it can name it; the same id from the same person on the same level is that walk
 * again, an id naming anything else is refused (409).
 */
export const createWalkSchema = z.object({ levelId: id('level'), id: id('walk id').optional() }).strict();
export type CreateWalkInput = z.input<typeof createWalkSchema>;

/** POST /walks/:walkId/finish (the walk's inspector or a GC manager), no body → 200 WalkDetail. */
export const finishWalkSchema = z.object({}).strict();

/** GET /walks → ListResponse<WalkDto>, newest first. */
export const walkListQuerySchema = z
  .object({
    levelId: id('level id').optional(),
    inspectorId: id('inspector id').optional(),
    /** true: only walks not finished yet; false: only finished ones. */
    open: booleanQuery.optional(),
    ...pageQuery,
  })
  .strict();
export type WalkListQuery = z.input<typeof walkListQuerySchema>;
export type WalkListQueryParsed = z.output<typeof walkListQuerySchema>;

export interface WalkDto {
  id: string;
  levelId: string;
  levelName: string;
  inspector: PersonRef;
  /** ISO 8601 */
  startedAt: string;
  finishedAt: string | null;
  /** Unit checks recorded within this walk (saves of a check, finished or not). */
  checkCount: number;
  /** Units with a complete unit check recorded within this walk. */
  unitsChecked: number;
  /** Units the walk touched (a check saved unfinished, or a finding logged on the unit) without a complete check in it. */
  unitsInProgress: number;
  /** Findings logged within this walk (voided ones left out). */
  findingCount: number;
}

/** Units on the level whose current (latest) unit check is complete, of all units on the level. */
export interface Coverage {
  checked: number;
  total: number;
  /** Units on the level with at least one open or fix-submitted finding. */
  withOpenFindings: number;
  /** Units with a current check that is not complete yet. */
  inProgress: number;
}

/** What finishing a walk shows before it ends: what was found on it, and what is left on the level. */
export interface WalkSummary {
  /** Findings logged within this walk, by severity (voided ones left out). */
  findingsBySeverity: Record<Severity, number>;
  /** Units on the level whose current unit check is not complete (never checked, or not finished), by tag. */
  unchecked: { id: string; tag: string; inProgress: boolean }[];
}

/** GET /walks/:walkId, POST /walks (201), POST /walks/:walkId/finish. */
export interface WalkDetail extends WalkDto {
  /** The level's coverage now (all walks), and the units checked within this walk. */
  coverage: Coverage;
  checkedInWalk: number;
  summary: WalkSummary;
}
