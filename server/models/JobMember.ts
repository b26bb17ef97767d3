import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { Role } from '../../shared/words';
import type { Job } from './Job';
import type { User } from './User';

/** A user's role on one job. A subcontractor member acts for their own company (the user's). */
export class JobMember extends Model<InferAttributes<JobMember>, InferCreationAttributes<JobMember>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare userId: ForeignKey<User['id']>;
  declare role: Role;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare job?: NonAttribute<Job>;
  declare user?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    JobMember.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        userId: { type: DataTypes.UUID, allowNull: false },
        role: { type: DataTypes.STRING(20), allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'job_members' },
    );
  }
}
