/**
 * Brings every job's catalogue up to the built-in catalogue this code ships with. A job's
 * catalogue is a copy made when the job was created (copyBuiltinCatalogue), so defect types added
 * to Trimout later, and corrections to their rules, kinds, cautions or words, reach existing jobs
 * only through here. Run after the migrations by `npm start`, `npm test` and `npm run db:migrate`:
 * a migration is frozen, and one reading shared/catalogue at run time would mean something else
 * each time the catalogue changes.
 *
 * - A built-in code the job lacks is added after the job's items (createCatalogueItem's rule: a
 *   new item goes last, so within its group it follows the group's items), in catalogue order.
 *   Positions already given are never changed.
 * - A copy the job never edited (follows_builtin, not retired) takes the built-in item's current
 *   fields and a new version. Edited and retired items are left as they are.
 * - Nothing is deleted: findings and unit checks refer to the items. Running it again changes
 *   nothing. Jobs holding no built-in copy at all did not start from the catalogue and are skipped.
 */
import { QueryTypes, type Sequelize } from 'sequelize';
import { BUILTIN_CATALOGUE } from '../../shared/catalogue';

export interface CatalogueUpgrade {
  added: number;
  updated: number;
}

/** The built-in items as one JSON parameter; a null field is left out (a missing key reads as NULL). */
function builtinRows(): string {
  return JSON.stringify(
    BUILTIN_CATALOGUE.map((item, ord) => ({
      ord,
      code: item.code,
      group: item.group,
      title: item.title,
      description: item.description,
      unit_kinds: [...item.unitKinds],
      default_severity: item.defaultSeverity,
      trade: item.trade,
      measured_rule: item.measuredRule ?? undefined,
      fix_guidance: item.fixGuidance,
      caution: item.caution ?? undefined,
      needs_ceiling_access: item.needsCeilingAccess,
    })),
  );
}

const BUILTIN = `jsonb_to_recordset($1::jsonb) AS b(
  ord int, code text, "group" text, title text, description text, unit_kinds text[], default_severity text,
  trade text, measured_rule jsonb, fix_guidance text, caution text, needs_ceiling_access boolean)`;

/** `jobIds` limits the upgrade to those jobs (tests; everything else upgrades every job). */
export async function upgradeBuiltinCatalogues(sequelize: Sequelize, options: { jobIds?: string[] } = {}): Promise<CatalogueUpgrade> {
  const bind = [builtinRows(), options.jobIds ?? null];
  const inJobs = (column: string) => `($2::uuid[] IS NULL OR ${column} = ANY($2::uuid[]))`;
  return sequelize.transaction(async (transaction) => {
    // The comparison is the whole diff: rows already equal are not touched (no version raised).
    const updated = await sequelize.query<{ id: string }>(
      `UPDATE catalogue_items ci
          SET "group" = b."group", title = b.title, description = b.description, unit_kinds = b.unit_kinds,
              default_severity = b.default_severity, trade = b.trade, measured_rule = b.measured_rule,
              fix_guidance = b.fix_guidance, caution = b.caution, needs_ceiling_access = b.needs_ceiling_access,
              version = ci.version + 1, updated_at = now()
         FROM ${BUILTIN}
        WHERE ci.code = b.code AND ci.builtin AND ci.follows_builtin AND NOT ci.is_other AND ci.retired_at IS NULL
          AND ${inJobs('ci.job_id')}
          AND (ci."group", ci.title, ci.description, ci.unit_kinds::text[], ci.default_severity, ci.trade, ci.measured_rule,
               ci.fix_guidance, ci.caution, ci.needs_ceiling_access)
              IS DISTINCT FROM
              (b."group", b.title, b.description, b.unit_kinds, b.default_severity, b.trade, b.measured_rule,
               b.fix_guidance, b.caution, b.needs_ceiling_access)
      RETURNING ci.id`,
      { bind, transaction, type: QueryTypes.SELECT },
    );
    const added = await sequelize.query<{ id: string }>(
      `INSERT INTO catalogue_items (id, job_id, code, "group", title, description, unit_kinds, default_severity, trade,
                                    measured_rule, fix_guidance, caution, needs_ceiling_access, builtin, follows_builtin,
                                    is_other, position, version, created_at, updated_at)
       SELECT gen_random_uuid(), j.job_id, b.code, b."group", b.title, b.description, b.unit_kinds, b.default_severity, b.trade,
              b.measured_rule, b.fix_guidance, b.caution, b.needs_ceiling_access, true, true, false,
              j.last + row_number() OVER (PARTITION BY j.job_id ORDER BY b.ord), 1, now(), now()
         FROM (SELECT job_id, max(position) AS last FROM catalogue_items
                WHERE ${inJobs('job_id')} GROUP BY job_id HAVING bool_or(builtin)) j
        CROSS JOIN ${BUILTIN}
        WHERE NOT EXISTS (SELECT 1 FROM catalogue_items c WHERE c.job_id = j.job_id AND c.code = b.code)
       ON CONFLICT (job_id, code) DO NOTHING
       RETURNING id`,
      { bind, transaction, type: QueryTypes.SELECT },
    );
    return { added: added.length, updated: updated.length };
  });
}
