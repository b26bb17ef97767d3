import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Job } from './Job';

/** A floor of a job, ordered by a dense 1-based position. */
export class Level extends Model<InferAttributes<Level>, InferCreationAttributes<Level>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare name: string;
  declare position: number;
  /** The plan image: all set, or all null when the level has no plan. */
  declare planKey: CreationOptional<string | null>;
  declare planContentType: CreationOptional<'image/png' | 'image/jpeg' | null>;
  declare planSourceType: CreationOptional<'image/png' | 'image/jpeg' | 'application/pdf' | null>;
  declare planWidth: CreationOptional<number | null>;
  declare planHeight: CreationOptional<number | null>;
  declare planByteSize: CreationOptional<number | null>;
  declare planUploadedAt: CreationOptional<Date | null>;
  declare planUploadedBy: CreationOptional<string | null>;
  /** Uploads so far (0: never had a plan); the cache key of the image URL. */
  declare planVersion: CreationOptional<number>;
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
        planKey: { type: DataTypes.STRING(200), allowNull: true, defaultValue: null },
        planContentType: { type: DataTypes.STRING(20), allowNull: true, defaultValue: null },
        planSourceType: { type: DataTypes.STRING(30), allowNull: true, defaultValue: null },
        planWidth: { type: DataTypes.INTEGER, allowNull: true, defaultValue: null },
        planHeight: { type: DataTypes.INTEGER, allowNull: true, defaultValue: null },
        planByteSize: { type: DataTypes.INTEGER, allowNull: true, defaultValue: null },
        planUploadedAt: { type: DataTypes.DATE, allowNull: true, defaultValue: null },
        planUploadedBy: { type: DataTypes.UUID, allowNull: true, defaultValue: null },
        planVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'levels' },
    );
  }
}
