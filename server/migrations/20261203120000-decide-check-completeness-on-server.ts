import type { QueryInterface } from 'sequelize';

/**
 * A unit check's `complete` is decided by the server from the job's catalogue, not taken from the
 * phone. What the phone said is kept beside it (`complete_sent`, null when it said nothing), so a
 * check the phone called complete and the server did not can still be told apart later.
 *
 * Existing checks are judged again with the same rule the server now applies when saving: every
 * catalogue item of the job that applies to the unit's kind, was in the catalogue when the check
 * was saved, is not retired and is not the "Something else" type has a mark. An item added to the
 * catalogue after the check does not reopen it. `down` puts back what the phone said.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE unit_checks ADD COLUMN complete_sent boolean`);
  await sql(`UPDATE unit_checks SET complete_sent = complete`);
  await sql(`
    UPDATE unit_checks uc SET complete = false
      FROM units u
     WHERE u.id = uc.unit_id AND uc.complete
       AND EXISTS (
         SELECT 1 FROM catalogue_items ci
          WHERE ci.job_id = uc.job_id AND NOT ci.is_other AND ci.retired_at IS NULL
            AND u.kind = ANY (ci.unit_kinds) AND ci.created_at <= uc.checked_at
            AND NOT EXISTS (SELECT 1 FROM unit_check_items i WHERE i.unit_check_id = uc.id AND i.catalogue_item_id = ci.id))`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`UPDATE unit_checks SET complete = complete_sent WHERE complete_sent IS NOT NULL`);
  await sql(`ALTER TABLE unit_checks DROP COLUMN complete_sent`);
}
