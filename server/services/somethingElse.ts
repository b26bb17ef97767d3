/**
 * The job's "other" defect type, under which "Something else" findings are logged
 * (shared/rules/somethingElse.ts). It is made the first time a job needs it, inside the finding's
 * transaction, so a refused finding leaves no trace; the partial unique index keeps it one per job.
 */
import type { Transaction } from 'sequelize';
import type { CatalogueGroup } from '../../shared/catalogue/types';
import { OTHER_DEFECT_CODE, OTHER_DEFECT_TITLE } from '../../shared/rules/somethingElse';
import { CatalogueItem } from '../models';

/** Not a group of the catalogue's sections: the other type is never listed among them. */
const OTHER_GROUP = 'other' as CatalogueGroup;

export async function otherDefectType(jobId: string, transaction: Transaction): Promise<CatalogueItem> {
  const found = await CatalogueItem.findOne({ where: { jobId, isOther: true }, transaction });
  if (found) return found;
  await CatalogueItem.sequelize!.query(
    `INSERT INTO catalogue_items (id, job_id, code, "group", title, description, unit_kinds, default_severity, trade, fix_guidance,
                                  needs_ceiling_access, builtin, is_other, position, version, created_at, updated_at)
     VALUES (gen_random_uuid(), $1, $2, $3, $4, $5, '{}', 'minor', 'general', $6, false, false, true,
             (SELECT coalesce(max(position), 0) + 1 FROM catalogue_items WHERE job_id = $1), 1, now(), now())
     ON CONFLICT DO NOTHING`,
    {
      bind: [
        jobId,
        OTHER_DEFECT_CODE,
        OTHER_GROUP,
        OTHER_DEFECT_TITLE,
        'A defect the catalogue does not list; each finding names it in its own title.',
        'As the finding says.',
      ],
      transaction,
    },
  );
  return (await CatalogueItem.findOne({ where: { jobId, isOther: true }, transaction }))!;
}
