import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { TradeKey } from '../../shared/words';
import type { Company } from './Company';
import type { Job } from './Job';

/** A company working on a job, with the trades it covers there. */
export class JobCompany extends Model<InferAttributes<JobCompany>, InferCreationAttributes<JobCompany>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare companyId: ForeignKey<Company['id']>;
  declare trades: TradeKey[];
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare company?: NonAttribute<Company>;

  static initModel(sequelize: Sequelize) {
    JobCompany.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        companyId: { type: DataTypes.UUID, allowNull: false },
        trades: { type: DataTypes.ARRAY(DataTypes.STRING(20)), allowNull: false, defaultValue: [] },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'job_companies' },
    );
  }
}
