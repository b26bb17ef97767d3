import type { Sequelize } from 'sequelize';
import { Company } from './Company';
import { Job } from './Job';
import { JobMember } from './JobMember';
import { User } from './User';

export { Company, Job, JobMember, User };

export function initModels(sequelize: Sequelize) {
  Company.initModel(sequelize);
  User.initModel(sequelize);
  Job.initModel(sequelize);
  JobMember.initModel(sequelize);

  User.belongsTo(Company, { as: 'company', foreignKey: 'companyId' });
  Company.hasMany(User, { as: 'users', foreignKey: 'companyId' });
  Job.belongsTo(Company, { as: 'ownerCompany', foreignKey: 'ownerCompanyId' });
  JobMember.belongsTo(Job, { as: 'job', foreignKey: 'jobId' });
  JobMember.belongsTo(User, { as: 'user', foreignKey: 'userId' });
  Job.hasMany(JobMember, { as: 'members', foreignKey: 'jobId' });
  User.hasMany(JobMember, { as: 'memberships', foreignKey: 'userId' });

  return { Company, User, Job, JobMember };
}

export type Models = ReturnType<typeof initModels>;
