import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Job } from './Job';

/** A floor of a job, ordered by a dense 1-based position. */
export class Level extends Model<InferAttributes<Level>, InferCreationAttributes<Level>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare name: string;
  declare position: number;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Level.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        name: { type: DataTypes.STRING(80), allowNull: false },
        position: { type: DataTypes.INTEGER, allowNull: false },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'levels' },
    );
  }
}
