import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Job } from './Job';
import type { Unit } from './Unit';
import type { User } from './User';
import type { Walk } from './Walk';

/** One unit check event; the latest per unit (checkedAt, id) is the unit's current check. */
export class UnitCheck extends Model<InferAttributes<UnitCheck>, InferCreationAttributes<UnitCheck>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare unitId: ForeignKey<Unit['id']>;
  declare walkId: ForeignKey<Walk['id']> | null;
  declare checkedBy: ForeignKey<User['id']>;
  declare checkedAt: Date;
  /** Decided by the server from the job's catalogue when the check is saved (commands/recordUnitCheck.ts). */
  declare complete: boolean;
  /** What the phone said (never trusted); null when it said nothing. */
  declare completeSent: CreationOptional<boolean | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    UnitCheck.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        unitId: { type: DataTypes.UUID, allowNull: false },
        walkId: { type: DataTypes.UUID, allowNull: true },
        checkedBy: { type: DataTypes.UUID, allowNull: false },
        checkedAt: { type: DataTypes.DATE, allowNull: false },
        complete: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        completeSent: { type: DataTypes.BOOLEAN, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'unit_checks' },
    );
  }
}
