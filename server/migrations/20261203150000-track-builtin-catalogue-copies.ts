import type { QueryInterface } from 'sequelize';

/**
 * A job's copy of a built-in defect type follows the built-in catalogue until the job edits it:
 * `follows_builtin` says so, and upgradeBuiltinCatalogues (server/services/catalogueUpgrade.ts)
 * brings only those copies up to date. A flag rather than "version = 1": the upgrade raises the
 * version of what it changes (so a screen holding the old text gets 412, not a silent overwrite),
 * and the copy must still be known as unedited afterwards.
 *
 * Existing copies follow when nothing ever changed them: every edit and every retirement raised
 * their version, so version 1 and not retired is a copy as it was made.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE catalogue_items ADD COLUMN follows_builtin boolean NOT NULL DEFAULT false`);
  await sql(`UPDATE catalogue_items SET follows_builtin = true
    WHERE builtin AND NOT is_other AND version = 1 AND retired_at IS NULL`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`ALTER TABLE catalogue_items DROP COLUMN follows_builtin`);
}
