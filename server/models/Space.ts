import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { Occupancy } from '../../shared/schemas/setup';
import type { Job } from './Job';
import type { Level } from './Level';

/** A room or area on a level. floorArea in m², ceilingHeight in mm. */
export class Space extends Model<InferAttributes<Space>, InferCreationAttributes<Space>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare levelId: ForeignKey<Level['id']>;
  declare name: string;
  declare floorArea: number | null;
  declare ceilingHeight: number | null;
  declare occupancy: CreationOptional<Occupancy>;
  declare enclosed: CreationOptional<boolean>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare level?: NonAttribute<Level>;

  static initModel(sequelize: Sequelize) {
    Space.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        levelId: { type: DataTypes.UUID, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        floorArea: { type: DataTypes.DOUBLE, allowNull: true },
        ceilingHeight: { type: DataTypes.DOUBLE, allowNull: true },
        occupancy: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'general' },
        enclosed: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'spaces' },
    );
  }
}
