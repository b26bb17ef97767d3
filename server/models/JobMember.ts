import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { Role } from '../../shared/words';
import type { Company } from './Company';
import type { Job } from './Job';
import type { User } from './User';

/**
 * A user's role on one job, and the company they act for there: the company they were invited
 * for (a job's creator: their own). A subcontractor's scope is this company, never the person's
 * home company (users.company_id), which may differ.
 */
export class JobMember extends Model<InferAttributes<JobMember>, InferCreationAttributes<JobMember>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare userId: ForeignKey<User['id']>;
  declare role: Role;
  /** Required on creation (not a ForeignKey<>, which would make it optional): no membership without its company. */
  declare companyId: string;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare job?: NonAttribute<Job>;
  declare user?: NonAttribute<User>;
  declare company?: NonAttribute<Company>;

  static initModel(sequelize: Sequelize) {
    JobMember.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        userId: { type: DataTypes.UUID, allowNull: false },
        role: { type: DataTypes.STRING(20), allowNull: false },
        companyId: { type: DataTypes.UUID, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'job_members' },
    );
  }
}
