import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Finding } from './Finding';
import type { Job } from './Job';
import type { User } from './User';

/** A fix sent back for a finding: a note and its photos (photos.fix_id). Written once, never changed. */
export class Fix extends Model<InferAttributes<Fix>, InferCreationAttributes<Fix>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare findingId: ForeignKey<Finding['id']>;
  declare submittedBy: ForeignKey<User['id']>;
  declare note: string;
  declare submittedAt: Date;

  static initModel(sequelize: Sequelize) {
    Fix.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        findingId: { type: DataTypes.UUID, allowNull: false },
        submittedBy: { type: DataTypes.UUID, allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: false },
        submittedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { sequelize, tableName: 'fixes', timestamps: false },
    );
  }
}
