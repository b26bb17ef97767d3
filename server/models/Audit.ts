import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { AuditPlan, ClassRules, InspectionLevel } from '../../shared/calc/sampling';
import type { AuditLotFilters } from '../../shared/schemas/audits';
import type { Job } from './Job';
import type { User } from './User';

/** A sampling audit of a frozen lot of units; its units and their draw are AuditUnit rows. */
export class Audit extends Model<InferAttributes<Audit>, InferCreationAttributes<Audit>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare number: number;
  declare name: string;
  declare scheme: 'z14' | 'tiered';
  declare inspectionLevel: InspectionLevel | null;
  declare lotFilters: AuditLotFilters;
  declare classRules: ClassRules;
  declare plan: AuditPlan;
  declare lotSize: number;
  declare sampleSize: number;
  declare seed: string;
  declare plannedBy: ForeignKey<User['id']>;
  declare startedAt: Date;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Audit.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        number: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        scheme: { type: DataTypes.STRING(10), allowNull: false },
        inspectionLevel: { type: DataTypes.STRING(3), allowNull: true },
        lotFilters: { type: DataTypes.JSONB, allowNull: false },
        classRules: { type: DataTypes.JSONB, allowNull: false },
        plan: { type: DataTypes.JSONB, allowNull: false },
        lotSize: { type: DataTypes.INTEGER, allowNull: false },
        sampleSize: { type: DataTypes.INTEGER, allowNull: false },
        seed: { type: DataTypes.STRING(64), allowNull: false },
        plannedBy: { type: DataTypes.UUID, allowNull: false },
        startedAt: { type: DataTypes.DATE, allowNull: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'audits' },
    );
  }
}
