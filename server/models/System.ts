import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { ConcentrationOverride } from '../../shared/schemas/setup';
import type { ChargeBasisDto } from '../../shared/schemas/testRecords';
import type { Refrigerant } from '../../shared/words';
import type { Job } from './Job';

/** One refrigerant circuit: an outdoor unit and its indoor units. Charges in kg. */
export class System extends Model<InferAttributes<System>, InferCreationAttributes<System>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare name: string;
  declare outdoorModel: string | null;
  declare refrigerant: Refrigerant;
  declare factoryCharge: number | null;
  declare fieldCharge: number | null;
  declare concentrationLimitOverride: ConcentrationOverride | null;
  /** The company responsible for the system's pipework (its test records); null: the job's mechanical companies. */
  declare companyId: CreationOptional<string | null>;
  /** The outdoor unit's factory-charge source and per-size additional-charge factors, from its manual. */
  declare chargeBasis: CreationOptional<ChargeBasisDto | null>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    System.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        name: { type: DataTypes.STRING(80), allowNull: false },
        outdoorModel: { type: DataTypes.STRING(120), allowNull: true },
        refrigerant: { type: DataTypes.STRING(20), allowNull: false },
        factoryCharge: { type: DataTypes.DOUBLE, allowNull: true },
        fieldCharge: { type: DataTypes.DOUBLE, allowNull: true },
        concentrationLimitOverride: { type: DataTypes.JSONB, allowNull: true },
        companyId: { type: DataTypes.UUID, allowNull: true, defaultValue: null },
        chargeBasis: { type: DataTypes.JSONB, allowNull: true, defaultValue: null },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'systems' },
    );
  }
}
