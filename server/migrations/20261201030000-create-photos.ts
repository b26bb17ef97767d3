import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * Photos of findings and fixes. The bytes live in object storage (server/storage) under
 * server-made keys (`photos/<id>.jpg`, `photos/<id>-thumb.jpg`); a row is written in the same
 * transaction as the finding or fix it belongs to, after the objects were stored (see the
 * contract at the top of server/services/photos.ts). Rows never change once written.
 *
 * finding_id and fix_id are the owners. They have NO foreign keys yet because the findings and
 * fixes tables do not exist yet: the migration that creates findings (and the one that creates
 * fixes) adds `photos_finding_id_fkey` / `photos_fix_id_fkey` with ON DELETE CASCADE.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('photos', {
    id: { type: DataTypes.UUID, primaryKey: true },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    storage_key: { type: DataTypes.STRING(200), allowNull: false },
    thumb_key: { type: DataTypes.STRING(200), allowNull: false },
    content_type: { type: DataTypes.STRING(40), allowNull: false },
    /** The type of the uploaded bytes (image/jpeg, image/png, image/webp, image/heic). */
    source_type: { type: DataTypes.STRING(40), allowNull: false },
    byte_size: { type: DataTypes.INTEGER, allowNull: false },
    width: { type: DataTypes.INTEGER, allowNull: false },
    height: { type: DataTypes.INTEGER, allowNull: false },
    /** Hex SHA-256 of the stored full-size object. */
    sha256: { type: DataTypes.STRING(64), allowNull: false },
    uploaded_by: { type: DataTypes.UUID, allowNull: false, references: { model: 'users', key: 'id' }, onDelete: 'RESTRICT' },
    finding_id: { type: DataTypes.UUID, allowNull: true },
    fix_id: { type: DataTypes.UUID, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  });
  await qi.addIndex('photos', ['storage_key'], { unique: true, name: 'photos_storage_key_unique' });
  await qi.addIndex('photos', ['thumb_key'], { unique: true, name: 'photos_thumb_key_unique' });
  await qi.addIndex('photos', ['job_id', 'created_at'], { name: 'photos_job_created' });
  await qi.addIndex('photos', ['finding_id'], { name: 'photos_finding_id' });
  await qi.addIndex('photos', ['fix_id'], { name: 'photos_fix_id' });
  await qi.sequelize.query(`
    ALTER TABLE photos
      ADD CONSTRAINT photos_content_type_check CHECK (content_type = 'image/jpeg'),
      ADD CONSTRAINT photos_source_type_check CHECK (source_type IN ('image/jpeg', 'image/png', 'image/webp', 'image/heic')),
      ADD CONSTRAINT photos_sizes_check CHECK (byte_size > 0 AND width > 0 AND height > 0),
      ADD CONSTRAINT photos_sha256_check CHECK (sha256 ~ '^[0-9a-f]{64}$'),
      ADD CONSTRAINT photos_keys_check CHECK (
        storage_key = 'photos/' || id::text || '.jpg' AND thumb_key = 'photos/' || id::text || '-thumb.jpg'
      ),
      ADD CONSTRAINT photos_one_owner_check CHECK (finding_id IS NULL OR fix_id IS NULL)`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('photos');
}
