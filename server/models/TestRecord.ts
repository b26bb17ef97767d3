import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { TestRecordKind, TestResult } from '../../shared/schemas/testRecords';
import type { Company } from './Company';
import type { Job } from './Job';
import type { System } from './System';
import type { Unit } from './Unit';
import type { User } from './User';

/**
 * A test record (pressure, evacuation, charge, drain, start-up): what was typed in `data`, what
 * Trimout computed in `figures`, the verdict in `result`. Witnessed records are locked (a database
 * trigger refuses any change); a correction is a new record naming the old one in supersedesId.
 */
export class TestRecord extends Model<InferAttributes<TestRecord>, InferCreationAttributes<TestRecord>> {
  declare id: string;
  declare jobId: ForeignKey<Job['id']>;
  declare kind: TestRecordKind;
  declare systemId: ForeignKey<System['id']> | null;
  declare unitId: ForeignKey<Unit['id']> | null;
  declare companyId: ForeignKey<Company['id']> | null;
  declare levelIds: string[] | null;
  declare recordedBy: ForeignKey<User['id']>;
  declare recordedAt: Date;
  declare witnessedBy: CreationOptional<string | null>;
  declare witnessedAt: CreationOptional<Date | null>;
  declare witnessNote: CreationOptional<string | null>;
  declare supersedesId: string | null;
  declare result: TestResult;
  declare reasons: string[];
  declare data: Record<string, unknown>;
  declare figures: Record<string, unknown>;
  declare note: string | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    TestRecord.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true },
        jobId: { type: DataTypes.UUID, allowNull: false },
        kind: { type: DataTypes.STRING(20), allowNull: false },
        systemId: { type: DataTypes.UUID, allowNull: true },
        unitId: { type: DataTypes.UUID, allowNull: true },
        companyId: { type: DataTypes.UUID, allowNull: true },
        levelIds: { type: DataTypes.ARRAY(DataTypes.UUID), allowNull: true },
        recordedBy: { type: DataTypes.UUID, allowNull: false },
        recordedAt: { type: DataTypes.DATE, allowNull: false },
        witnessedBy: { type: DataTypes.UUID, allowNull: true, defaultValue: null },
        witnessedAt: { type: DataTypes.DATE, allowNull: true, defaultValue: null },
        witnessNote: { type: DataTypes.TEXT, allowNull: true, defaultValue: null },
        supersedesId: { type: DataTypes.UUID, allowNull: true },
        result: { type: DataTypes.STRING(10), allowNull: false },
        reasons: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
        data: { type: DataTypes.JSONB, allowNull: false },
        figures: { type: DataTypes.JSONB, allowNull: false },
        note: { type: DataTypes.TEXT, allowNull: true },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'test_records' },
    );
  }
}
