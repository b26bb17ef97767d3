/**
 * Limits both sides resolve the same way:
 * - how many rows a list page holds (the server's paging and the client's "fetch every page");
 * - which limit a unit's measured item is checked against (its model's limits, then the job's
 *   settings, then the code edition the job uses), on the phone as the inspector types and on
 *   the server when the check is saved.
 * Written once, with named arguments, so the two sides cannot drift or swap their inputs.
 */
import { makeLimitResolver, type LimitResolver, type LimitSources } from '../calc/rules';
import type { EditionChoice, JobSettingKey, ModelLimitKey, StatedLimit } from '../catalogue/types';
import { LIST_LIMIT_DEFAULT, LIST_LIMIT_MAX, type StatedLimitDto } from '../schemas/setup';

/** Rows in one list page: the requested count, else the list's default, never above LIST_LIMIT_MAX. */
export function listLimit({ requested, fallback = LIST_LIMIT_DEFAULT }: { requested?: number | null; fallback?: number }): number {
  return Math.min(requested ?? fallback, LIST_LIMIT_MAX);
}

export interface UnitLimitInputs {
  /** The unit's model (its name and the limits entered from its installation manual), if it has one. */
  model?: { name: string; limits?: Partial<Record<ModelLimitKey, StatedLimitDto>> | null } | null;
  /** The job: its settings and the code editions it uses. */
  job?: { settings?: Partial<Record<JobSettingKey, StatedLimitDto>> | null; codeEditions?: EditionChoice | null } | null;
  /** The unit itself: its capacity (W) sizes its drain (IMC Table 307.2.2). */
  unit?: { capacity?: number | null } | null;
}

function stated<K extends string>(limits: Partial<Record<K, StatedLimitDto>> | null | undefined): Partial<Record<K, StatedLimit>> {
  const out: Partial<Record<K, StatedLimit>> = {};
  for (const key of Object.keys(limits ?? {}) as K[]) {
    const dto = limits![key];
    if (dto) out[key] = { value: dto.stated, unit: dto.unit, source: dto.source };
  }
  return out;
}

/** The limit sources of one unit: its model's limits, the job's settings and code editions. */
export function unitLimitSources({ model, job, unit }: UnitLimitInputs): LimitSources {
  return {
    unit: { capacity: unit?.capacity ?? null },
    model: model ? { name: model.name, limits: stated<ModelLimitKey>(model.limits) } : undefined,
    job: stated<JobSettingKey>(job?.settings),
    editions: job?.codeEditions ?? {},
  };
}

/** The resolver one unit's measured items are evaluated with. */
export function unitLimitResolver(inputs: UnitLimitInputs): LimitResolver {
  return makeLimitResolver(unitLimitSources(inputs));
}
