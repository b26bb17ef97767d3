import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Job } from './Job';
import type { Level } from './Level';
import type { User } from './User';

/** One inspector's pass over one level. finishedAt is null while the walk runs. */
export class Walk extends Model<InferAttributes<Walk>, InferCreationAttributes<Walk>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare levelId: ForeignKey<Level['id']>;
  declare inspectorId: ForeignKey<User['id']>;
  declare startedAt: Date;
  declare finishedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Walk.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        levelId: { type: DataTypes.UUID, allowNull: false },
        inspectorId: { type: DataTypes.UUID, allowNull: false },
        startedAt: { type: DataTypes.DATE, allowNull: false },
        finishedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'walks' },
    );
  }
}
