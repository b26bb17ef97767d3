import type { QueryInterface } from 'sequelize';

/**
 * Print copies of photos: a small JPEG the size of the largest box a report prints a photo in (at
 * 150 dpi; server/services/photos.ts PRINT_SIZE), stored beside the full photo and the thumbnail,
 * so a report reads it and never decodes the full photo.
 *
 *   photos.print_key             the photo's print copy: `photos/<id>-print.jpg` when made at upload,
 *                                `photos/<id>-print-<uuid>.jpg` when a report made it later for a
 *                                photo stored before this column; NULL until one is made.
 *   photo_marks.marked_print_key the print copy of the flattened (marked) copy; NULL until made,
 *                                and again whenever the marks change (a new flattened copy).
 *
 * Existing photos keep NULL: the first report that prints one makes its copy and records it here
 * (server/services/printCopies.ts), so no migration reads the object store.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE photos ADD COLUMN print_key varchar(200),
    ADD CONSTRAINT photos_print_key_check CHECK (print_key IS NULL OR print_key LIKE 'photos/' || id::text || '-print%.jpg')`);
  await sql(`CREATE UNIQUE INDEX photos_print_key_unique ON photos (print_key) WHERE print_key IS NOT NULL`);
  await sql(`ALTER TABLE photo_marks ADD COLUMN marked_print_key varchar(200),
    ADD CONSTRAINT photo_marks_print_key_check CHECK (marked_print_key IS NULL OR marked_key IS NOT NULL)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  // The print copies stay in the store, named by nothing; they are small and a backup lists them.
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE photo_marks DROP COLUMN marked_print_key`);
  await sql(`DROP INDEX photos_print_key_unique`);
  await sql(`ALTER TABLE photos DROP COLUMN print_key`);
}
