import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { CodeEditions, RecurringThresholdsInput, SeverityDueDays, StatedLimitDto } from '../../shared/schemas/setup';
import type { JobSettingKey } from '../../shared/catalogue/types';
import type { TestSettingsDto } from '../../shared/schemas/testRecords';
import type { Company } from './Company';

export class Job extends Model<InferAttributes<Job>, InferCreationAttributes<Job>> {
  declare id: CreationOptional<string>;
  /** The GC company that runs the job. */
  declare ownerCompanyId: ForeignKey<Company['id']>;
  declare name: string;
  declare number: CreationOptional<string | null>;
  declare address: CreationOptional<string | null>;
  declare startsOn: CreationOptional<string | null>;
  declare endsOn: CreationOptional<string | null>;
  declare timeZone: CreationOptional<string>;
  declare unitSystem: CreationOptional<'imperial' | 'metric'>;
  /** Job set-up (migration 20261201010000). */
  declare codeEditions: CreationOptional<CodeEditions>;
  declare severityDueDays: CreationOptional<SeverityDueDays>;
  declare recurringThresholds: CreationOptional<RecurringThresholdsInput>;
  declare settings: CreationOptional<Partial<Record<JobSettingKey, StatedLimitDto>>>;
  /** Settings that decide test records (shared/schemas/testRecords.ts), each with its source. */
  declare testSettings: CreationOptional<TestSettingsDto>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Job.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        ownerCompanyId: { type: DataTypes.UUID, allowNull: false },
        name: { type: DataTypes.STRING(160), allowNull: false },
        number: { type: DataTypes.STRING(40), allowNull: true },
        address: { type: DataTypes.STRING(300), allowNull: true },
        startsOn: { type: DataTypes.DATEONLY, allowNull: true },
        endsOn: { type: DataTypes.DATEONLY, allowNull: true },
        timeZone: { type: DataTypes.STRING(64), allowNull: false, defaultValue: 'UTC' },
        unitSystem: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'imperial' },
        codeEditions: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        severityDueDays: { type: DataTypes.JSONB, allowNull: false, defaultValue: { critical: 2, major: 7, minor: 14 } },
        recurringThresholds: { type: DataTypes.JSONB, allowNull: false, defaultValue: { minUnits: 3, minShare: 0.1 } },
        settings: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        testSettings: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'jobs' },
    );
  }
}
