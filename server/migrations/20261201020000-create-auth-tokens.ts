import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * One-time tokens sent by mail: invitations (7 days), password resets (1 hour) and e-mail
 * confirmations (24 hours). Only the SHA-256 of a token is stored, never the token. A token is
 * used at most once: it is consumed by UPDATE ... WHERE used_at IS NULL AND expires_at > now().
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('auth_tokens', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    purpose: { type: DataTypes.STRING(24), allowNull: false },
    token_hash: { type: DataTypes.STRING(64), allowNull: false },
    /** Password reset and e-mail confirmation: whose. Invitation: the user once accepted. */
    user_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
    // Invitation payload
    email: { type: DataTypes.STRING(254), allowNull: true },
    name: { type: DataTypes.STRING(120), allowNull: true },
    job_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    role: { type: DataTypes.STRING(20), allowNull: true },
    company_id: { type: DataTypes.UUID, allowNull: true, references: { model: 'companies', key: 'id' }, onDelete: 'CASCADE' },
    invited_by: { type: DataTypes.UUID, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'SET NULL' },
    expires_at: { type: DataTypes.DATE, allowNull: false },
    used_at: { type: DataTypes.DATE, allowNull: true },
    revoked_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
    updated_at: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
  });
  await qi.addIndex('auth_tokens', ['token_hash'], { unique: true, name: 'auth_tokens_token_hash_unique' });
  await qi.addIndex('auth_tokens', ['job_id', 'created_at'], { name: 'auth_tokens_job_created' });
  await qi.addIndex('auth_tokens', ['user_id'], { name: 'auth_tokens_user_id' });
  await qi.sequelize.query(`
    ALTER TABLE auth_tokens
      ADD CONSTRAINT auth_tokens_purpose_check CHECK (purpose IN ('invitation', 'password_reset', 'email_confirmation')),
      ADD CONSTRAINT auth_tokens_role_check CHECK (role IS NULL OR role IN ('gc_manager', 'inspector', 'subcontractor')),
      ADD CONSTRAINT auth_tokens_payload_check CHECK (
        (purpose = 'invitation' AND email IS NOT NULL AND job_id IS NOT NULL AND role IS NOT NULL AND company_id IS NOT NULL)
        OR (purpose <> 'invitation' AND user_id IS NOT NULL)
      )`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('auth_tokens');
}
