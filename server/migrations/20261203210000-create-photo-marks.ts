import type { QueryInterface } from 'sequelize';

/**
 * photo_marks: the marks drawn on a photo (arrows, ellipses, rectangles, freehand lines, labels;
 * shared/schemas/photoMarks.ts) as data, beside the untouched original in `photos`. The flattened
 * copy (the marks drawn onto the photo) is stored under marked_key / marked_thumb_key and served
 * where the photo is served; an empty list keeps the row (its version) with no flattened copy.
 * `version` is the ETag the editor sends back in If-Match.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`CREATE TABLE photo_marks (
    photo_id uuid PRIMARY KEY REFERENCES photos (id) ON DELETE CASCADE,
    job_id uuid NOT NULL REFERENCES jobs (id) ON DELETE CASCADE,
    marks jsonb NOT NULL DEFAULT '[]'::jsonb,
    version integer NOT NULL DEFAULT 0,
    marked_key varchar(200),
    marked_thumb_key varchar(200),
    updated_by uuid REFERENCES users (id) ON DELETE SET NULL,
    updated_at timestamptz NOT NULL,
    CHECK ((marked_key IS NULL) = (marked_thumb_key IS NULL))
  )`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query('DROP TABLE photo_marks');
}
