import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { RuleResult } from '../../shared/calc/rules';
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
  /** The new measurement of a measured defect (null when the defect takes none). */
  declare measuredText: CreationOptional<string | null>;
  declare measuredValue: CreationOptional<number | null>;
  declare ruleResult: CreationOptional<RuleResult | null>;

  static initModel(sequelize: Sequelize) {
    Fix.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        findingId: { type: DataTypes.UUID, allowNull: false },
        submittedBy: { type: DataTypes.UUID, allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: false },
        submittedAt: { type: DataTypes.DATE, allowNull: false },
        measuredText: { type: DataTypes.STRING(60), allowNull: true },
        measuredValue: { type: DataTypes.DOUBLE, allowNull: true },
        ruleResult: { type: DataTypes.JSONB, allowNull: true },
      },
      { sequelize, tableName: 'fixes', timestamps: false },
    );
  }
}
