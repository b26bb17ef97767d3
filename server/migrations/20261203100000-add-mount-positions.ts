import type { QueryInterface } from 'sequelize';

/**
 * Where a unit is mounted (floor, wall or ceiling) sets its refrigerant release height for the
 * A2L floor-area check (IEC 60335-2-40 Annex GG: 0.6, 1.8 and 2.2 m). A ducted unit or a coil kit
 * may stand on the floor in a closet or hang above a ceiling, so the kind alone cannot say:
 * a model records its installation position, and a unit may record its own, which wins.
 * Both nullable: null means not recorded (the kind decides where it can).
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE unit_models ADD COLUMN mount_position varchar(10)
    CONSTRAINT unit_models_mount_position_check CHECK (mount_position IN ('floor', 'wall', 'ceiling'))`);
  await sql(`ALTER TABLE units ADD COLUMN mount_position varchar(10)
    CONSTRAINT units_mount_position_check CHECK (mount_position IN ('floor', 'wall', 'ceiling'))`);
}

export async function down({ context: qi }: { context: QueryInterface }) {
  const sql = (q: string) => qi.sequelize.query(q);
  await sql(`ALTER TABLE units DROP COLUMN mount_position`);
  await sql(`ALTER TABLE unit_models DROP COLUMN mount_position`);
}
