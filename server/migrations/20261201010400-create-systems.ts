import { DataTypes, type QueryInterface } from 'sequelize';

/** Refrigerant circuits. Charges in kg. */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.createTable('systems', {
    id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
    job_id: { type: DataTypes.UUID, allowNull: false, references: { model: 'jobs', key: 'id' }, onDelete: 'CASCADE' },
    name: { type: DataTypes.STRING(80), allowNull: false },
    outdoor_model: { type: DataTypes.STRING(120), allowNull: true },
    refrigerant: { type: DataTypes.STRING(20), allowNull: false },
    factory_charge: { type: DataTypes.DOUBLE, allowNull: true },
    field_charge: { type: DataTypes.DOUBLE, allowNull: true },
    concentration_limit_override: { type: DataTypes.JSONB, allowNull: true },
    version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  });
  await qi.sequelize.query(`CREATE UNIQUE INDEX systems_job_name_unique ON systems (job_id, lower(name))`);
  await qi.sequelize.query(
    `ALTER TABLE systems ADD CONSTRAINT systems_charge_check CHECK ((factory_charge IS NULL OR factory_charge >= 0) AND (field_charge IS NULL OR field_charge >= 0))`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.dropTable('systems');
}
