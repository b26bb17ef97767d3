import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { RuleResult } from '../../shared/calc/rules';
import type { FindingStatus, Severity } from '../../shared/words';
import type { CatalogueItem } from './CatalogueItem';
import type { Company } from './Company';
import type { Job } from './Job';
import type { Level } from './Level';
import type { Space } from './Space';
import type { Unit } from './Unit';
import type { UnitCheck } from './UnitCheck';
import type { User } from './User';
import type { Walk } from './Walk';

/**
 * One logged defect, numbered per job (#214). Attached to a unit, a space or a level; the level
 * is always set. companyId is the responsible company (a company on the job). Versioned for
 * If-Match; every change is a FindingEvent.
 */
export class Finding extends Model<InferAttributes<Finding>, InferCreationAttributes<Finding>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare number: number;
  declare unitId: ForeignKey<Unit['id']> | null;
  declare spaceId: ForeignKey<Space['id']> | null;
  declare levelId: ForeignKey<Level['id']>;
  declare catalogueItemId: ForeignKey<CatalogueItem['id']>;
  /** "Something else" (the job's other defect type): the defect in the inspector's words; null otherwise. */
  declare title: CreationOptional<string | null>;
  declare walkId: ForeignKey<Walk['id']> | null;
  declare unitCheckId: ForeignKey<UnitCheck['id']> | null;
  declare severity: Severity;
  declare status: CreationOptional<FindingStatus>;
  declare companyId: ForeignKey<Company['id']>;
  declare dueOn: string;
  declare note: CreationOptional<string>;
  declare measuredText: string | null;
  declare measuredValue: number | null;
  declare ruleResult: RuleResult | null;
  declare returnCount: CreationOptional<number>;
  declare loggedBy: ForeignKey<User['id']>;
  declare loggedAt: Date;
  declare pinX: number | null;
  declare pinY: number | null;
  declare voidedReason: CreationOptional<string | null>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Finding.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        number: { type: DataTypes.INTEGER, allowNull: false },
        unitId: { type: DataTypes.UUID, allowNull: true },
        spaceId: { type: DataTypes.UUID, allowNull: true },
        levelId: { type: DataTypes.UUID, allowNull: false },
        catalogueItemId: { type: DataTypes.UUID, allowNull: false },
        title: { type: DataTypes.STRING(160), allowNull: true },
        walkId: { type: DataTypes.UUID, allowNull: true },
        unitCheckId: { type: DataTypes.UUID, allowNull: true },
        severity: { type: DataTypes.STRING(10), allowNull: false },
        status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'open' },
        companyId: { type: DataTypes.UUID, allowNull: false },
        dueOn: { type: DataTypes.DATEONLY, allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
        measuredText: { type: DataTypes.STRING(60), allowNull: true },
        measuredValue: { type: DataTypes.DOUBLE, allowNull: true },
        ruleResult: { type: DataTypes.JSONB, allowNull: true },
        returnCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        loggedBy: { type: DataTypes.UUID, allowNull: false },
        loggedAt: { type: DataTypes.DATE, allowNull: false },
        pinX: { type: DataTypes.DOUBLE, allowNull: true },
        pinY: { type: DataTypes.DOUBLE, allowNull: true },
        voidedReason: { type: DataTypes.TEXT, allowNull: true },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'findings' },
    );
  }
}
