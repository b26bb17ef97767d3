import type { Sequelize } from 'sequelize';
import { AuthToken } from './AuthToken';
import { Company } from './Company';
import { Crew } from './Crew';
import { Job } from './Job';
import { JobMember } from './JobMember';
import { User } from './User';
import { CatalogueItem } from './CatalogueItem';
import { JobCompany } from './JobCompany';
import { Level } from './Level';
import { Space } from './Space';
import { SpaceLink } from './SpaceLink';
import { System } from './System';
import { Unit } from './Unit';
import { UnitModel } from './UnitModel';
import { Photo } from './Photo';
import { Finding } from './Finding';
import { FindingEvent } from './FindingEvent';
import { Fix } from './Fix';
import { UnitCheck } from './UnitCheck';
import { UnitCheckItem } from './UnitCheckItem';
import { Walk } from './Walk';
import { TestRecord } from './TestRecord';
import { Audit } from './Audit';
import { AuditUnit } from './AuditUnit';

export { AuthToken, Company, Job, JobMember, User };
export { CatalogueItem, Crew, JobCompany, Level, Space, SpaceLink, System, Unit, UnitModel };
export { Photo };
export { Finding, FindingEvent, UnitCheck, UnitCheckItem, Walk };
export { Fix };
export { TestRecord };
export { Audit, AuditUnit };

export function initModels(sequelize: Sequelize) {
  Company.initModel(sequelize);
  User.initModel(sequelize);
  Job.initModel(sequelize);
  JobMember.initModel(sequelize);
  AuthToken.initModel(sequelize);
  initSetupModels(sequelize);

  User.belongsTo(Company, { as: 'company', foreignKey: 'companyId' });
  Company.hasMany(User, { as: 'users', foreignKey: 'companyId' });
  Job.belongsTo(Company, { as: 'ownerCompany', foreignKey: 'ownerCompanyId' });
  JobMember.belongsTo(Job, { as: 'job', foreignKey: 'jobId' });
  JobMember.belongsTo(User, { as: 'user', foreignKey: 'userId' });
  JobMember.belongsTo(Company, { as: 'company', foreignKey: 'companyId' });
  Job.hasMany(JobMember, { as: 'members', foreignKey: 'jobId' });
  User.hasMany(JobMember, { as: 'memberships', foreignKey: 'userId' });
  AuthToken.belongsTo(Job, { as: 'job', foreignKey: 'jobId' });
  AuthToken.belongsTo(Company, { as: 'company', foreignKey: 'companyId' });
  AuthToken.belongsTo(User, { as: 'inviter', foreignKey: 'invitedBy' });

  Photo.initModel(sequelize);
  Photo.belongsTo(Job, { as: 'job', foreignKey: 'jobId' });
  Photo.belongsTo(User, { as: 'uploader', foreignKey: 'uploadedBy' });

  // Walks, unit checks and findings; queried mostly in SQL by server/services/findings.ts.
  Walk.initModel(sequelize);
  UnitCheck.initModel(sequelize);
  UnitCheckItem.initModel(sequelize);
  Finding.initModel(sequelize);
  FindingEvent.initModel(sequelize);
  // Correction loop: fixes and the re-inspections that accept or return them.
  Fix.initModel(sequelize);
  // Test records (pressure, evacuation, charge, drain, start-up); their photos are photos rows.
  TestRecord.initModel(sequelize);
  // Sampling audits: a frozen lot, its seeded draw and the sample (services/audits.ts).
  Audit.initModel(sequelize);
  AuditUnit.initModel(sequelize);

  return { Company, User, Job, JobMember, AuthToken, Level, Space, SpaceLink, System, UnitModel, Unit, JobCompany, CatalogueItem, Photo };
}

export type Models = ReturnType<typeof initModels>;

/** Job set-up models (levels, spaces, systems, unit models, units, companies on a job, catalogue). */
function initSetupModels(sequelize: Sequelize) {
  Level.initModel(sequelize);
  Space.initModel(sequelize);
  SpaceLink.initModel(sequelize);
  System.initModel(sequelize);
  UnitModel.initModel(sequelize);
  Unit.initModel(sequelize);
  JobCompany.initModel(sequelize);
  Crew.initModel(sequelize);
  CatalogueItem.initModel(sequelize);

  Space.belongsTo(Level, { as: 'level', foreignKey: 'levelId' });
  Level.hasMany(Space, { as: 'spaces', foreignKey: 'levelId' });
  Unit.belongsTo(Level, { as: 'level', foreignKey: 'levelId' });
  Unit.belongsTo(Space, { as: 'space', foreignKey: 'spaceId' });
  Unit.belongsTo(System, { as: 'system', foreignKey: 'systemId' });
  Unit.belongsTo(UnitModel, { as: 'model', foreignKey: 'modelId' });
  Unit.belongsTo(Crew, { as: 'installedByCrew', foreignKey: 'installedByCrewId' });
  Crew.belongsTo(Company, { as: 'company', foreignKey: 'companyId' });
  JobCompany.belongsTo(Company, { as: 'company', foreignKey: 'companyId' });
}
