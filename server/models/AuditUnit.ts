import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** One unit of an audit's frozen lot: its place in the seeded draw, and its tier when it is in the sample. */
export class AuditUnit extends Model<InferAttributes<AuditUnit>, InferCreationAttributes<AuditUnit>> {
  declare auditId: string;
  declare unitId: string;
  declare drawPosition: number;
  declare tier: 1 | 2 | null;

  static initModel(sequelize: Sequelize) {
    AuditUnit.init(
      {
        auditId: { type: DataTypes.UUID, primaryKey: true },
        unitId: { type: DataTypes.UUID, primaryKey: true },
        drawPosition: { type: DataTypes.INTEGER, allowNull: false },
        tier: { type: DataTypes.SMALLINT, allowNull: true },
      },
      { sequelize, tableName: 'audit_units', timestamps: false },
    );
  }
}
