import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { MountPosition } from '../../shared/calc/refrigerant';
import type { ModelLimitKey } from '../../shared/catalogue/types';
import type { StatedLimitDto } from '../../shared/schemas/setup';
import type { UnitKindKey } from '../../shared/words';
import type { Job } from './Job';

/** An indoor unit model with limits entered from its installation manual. nominalCapacity in W. */
export class UnitModel extends Model<InferAttributes<UnitModel>, InferCreationAttributes<UnitModel>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare name: string;
  declare modelNumber: string | null;
  declare unitKind: UnitKindKey;
  declare nominalCapacity: number | null;
  declare limits: CreationOptional<Partial<Record<ModelLimitKey, StatedLimitDto>>>;
  /** Installation position from the manual (A2L release height); null when not recorded. */
  declare mountPosition: CreationOptional<MountPosition | null>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    UnitModel.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        modelNumber: { type: DataTypes.STRING(80), allowNull: true },
        unitKind: { type: DataTypes.STRING(40), allowNull: false },
        nominalCapacity: { type: DataTypes.DOUBLE, allowNull: true },
        limits: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        mountPosition: { type: DataTypes.STRING(10), allowNull: true, defaultValue: null },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'unit_models' },
    );
  }
}
