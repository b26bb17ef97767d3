import { DataTypes, type QueryInterface } from 'sequelize';

/**
 * A unit's pin on its level's plan, like findings.pin_x / pin_y: fractions of the
 * plan image's width and height (0..1), both set or both null.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  await qi.addColumn('units', 'pin_x', { type: DataTypes.DOUBLE, allowNull: true });
  await qi.addColumn('units', 'pin_y', { type: DataTypes.DOUBLE, allowNull: true });
  await qi.sequelize.query(
    `ALTER TABLE units ADD CONSTRAINT units_pin_check CHECK ((pin_x IS NULL) = (pin_y IS NULL)
       AND (pin_x IS NULL OR (pin_x BETWEEN 0 AND 1 AND pin_y BETWEEN 0 AND 1)))`,
  );
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query(`ALTER TABLE units DROP CONSTRAINT IF EXISTS units_pin_check`);
  await qi.removeColumn('units', 'pin_y');
  await qi.removeColumn('units', 'pin_x');
}
