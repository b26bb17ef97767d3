/**
 * A level's units with their state at a glance: the walk screen's list.
 */
import { z } from 'zod';
import { UNIT_KIND_KEYS, type Severity, type UnitKindKey } from '../../words';
import type { PersonRef } from './common';
import { id, pageQuery } from './fields';
import type { Coverage } from './walks';

/**
 * - not_checked:   no unit check yet
 * - in_progress:   the latest unit check is not complete
 * - checked_ok:    the latest unit check is complete and the unit has no open finding
 * - open_findings: the unit has at least one open or fix-submitted finding (whatever its checks)
 */
export const UNIT_WALK_STATES = ['not_checked', 'in_progress', 'checked_ok', 'open_findings'] as const;
export type UnitWalkState = (typeof UNIT_WALK_STATES)[number];
export const UNIT_WALK_STATE_LABELS: Record<UnitWalkState, string> = {
  not_checked: 'Not checked yet',
  in_progress: 'Check in progress',
  checked_ok: 'Checked OK',
  open_findings: 'Open findings',
};

/** GET /levels/:levelId/walk-units → WalkUnitsResponse, ordered by tag. */
export const walkUnitsQuerySchema = z
  .object({
    spaceId: id('space id').optional(),
    systemId: id('system id').optional(),
    kind: z.enum(UNIT_KIND_KEYS, { error: 'Choose a unit kind from the list.' }).optional(),
    /** Tag contains (case-insensitive). */
    q: z.string().trim().max(40, 'At most 40 characters.').optional(),
    state: z.enum(UNIT_WALK_STATES, { error: `One of ${UNIT_WALK_STATES.join(', ')}.` }).optional(),
    ...pageQuery,
  })
  .strict();
export type WalkUnitsQuery = z.input<typeof walkUnitsQuerySchema>;
export type WalkUnitsQueryParsed = z.output<typeof walkUnitsQuerySchema>;

export interface WalkUnitDto {
  id: string;
  tag: string;
  kind: UnitKindKey;
  modelName: string | null;
  spaceId: string | null;
  spaceName: string | null;
  systemId: string | null;
  systemName: string | null;
  state: UnitWalkState;
  /** Open + fix-submitted findings on this unit. */
  openFindings: number;
  /** Worst severity among those, or null. */
  worstSeverity: Severity | null;
  lastCheck: { id: string; checkedAt: string; checkedBy: PersonRef; complete: boolean } | null;
}

export interface WalkUnitsResponse {
  items: WalkUnitDto[];
  nextCursor: string | null;
  /** Over the filters given (space, system, kind, q, state), all pages. */
  counts: { total: number; checked: number; notChecked: number; inProgress: number; withOpenFindings: number };
  /** The whole level, whatever the filters. */
  coverage: Coverage;
}
