import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * A finding's history: append-only events (who, when, what changed from / to, why, which photos).
 * A trigger refuses UPDATE and DELETE on the table, so the history holds up as evidence; a
 * statement-level trigger refuses TRUNCATE too. Deleting a whole job still cascades: the
 * trigger lets a delete through only when the finding itself is already gone in the same
 * statement, which only a job deletion (findings cascade from jobs) does.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('finding_events', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    finding_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'findings', key: 'id' }, onDelete: 'CASCADE' },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    actor_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'RESTRICT' },
    at: { type: DataTypes.DATE, allowNull: false },
    kind: { type: DataTypes.STRING(30), allowNull: false },
    from: { type: DataTypes.JSONB, allowNull: true },
    to: { type: DataTypes.JSONB, allowNull: true },
    reason: { type: DataTypes.TEXT, allowNull: true },
    photo_ids: { type: DataTypes.ARRAY(DataTypes.UUID), allowNull: false, defaultValue: [] },
  });
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`CREATE INDEX finding_events_finding_at ON finding_events (finding_id, at, id)`);
  await sql(`CREATE INDEX finding_events_job_at ON finding_events (job_id, at)`);
  await sql(
    `ALTER TABLE finding_events ADD CONSTRAINT finding_events_kind_check CHECK (kind IN (
       'logged', 'fix_submitted', 'accepted', 'returned', 'closed_on_walk', 'voided', 'reopened',
       'reassigned', 'severity_changed', 'due_changed', 'comment', 'photo_added'))`,
  );
  await sql(`
    CREATE FUNCTION finding_events_append_only() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      IF TG_OP = 'DELETE' AND NOT EXISTS (SELECT 1 FROM findings WHERE id = OLD.finding_id) THEN
        -- the finding is being deleted with its job (ON DELETE CASCADE from jobs)
        RETURN OLD;
      END IF;
      RAISE EXCEPTION 'finding_events is append-only: % is not allowed', TG_OP
        USING ERRCODE = 'P0001', HINT = 'Record a new event instead of changing an old one.';
    END
    $fn$`);
  await sql(`
    CREATE TRIGGER finding_events_no_update_delete
      BEFORE UPDATE OR DELETE ON finding_events
      FOR EACH ROW EXECUTE FUNCTION finding_events_append_only()`);
  await sql(`
    CREATE FUNCTION finding_events_no_truncate() RETURNS trigger LANGUAGE plpgsql AS $fn$
    BEGIN
      RAISE EXCEPTION 'finding_events is append-only: TRUNCATE is not allowed' USING ERRCODE = 'P0001';
    END
    $fn$`);
  await sql(`
    CREATE TRIGGER finding_events_no_truncate
      BEFORE TRUNCATE ON finding_events
      FOR EACH STATEMENT EXECUTE FUNCTION finding_events_no_truncate()`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('finding_events');
  await qi.sequelize.query(`DROP FUNCTION IF EXISTS finding_events_append_only()`);
  await qi.sequelize.query(`DROP FUNCTION IF EXISTS finding_events_no_truncate()`);
}
