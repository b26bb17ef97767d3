import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Job } from './Job';
import type { Space } from './Space';

/** A permanent opening between two spaces (stored once, spaceAId < spaceBId). */
export class SpaceLink extends Model<InferAttributes<SpaceLink>, InferCreationAttributes<SpaceLink>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare spaceAId: ForeignKey<Space['id']>;
  declare spaceBId: ForeignKey<Space['id']>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    SpaceLink.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        spaceAId: { type: DataTypes.UUID, allowNull: false },
        spaceBId: { type: DataTypes.UUID, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'space_links' },
    );
  }
}
