import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { CatalogueGroup, MeasuredRule } from '../../shared/catalogue/types';
import type { Severity, TradeKey, UnitKindKey } from '../../shared/words';
import type { Job } from './Job';

/** One defect type of a job's catalogue (a copy of a built-in item, or the job's own). */
export class CatalogueItem extends Model<InferAttributes<CatalogueItem>, InferCreationAttributes<CatalogueItem>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare code: string;
  declare group: CatalogueGroup;
  declare title: string;
  declare description: string;
  declare unitKinds: UnitKindKey[];
  declare defaultSeverity: Severity;
  declare trade: TradeKey;
  declare measuredRule: MeasuredRule | null;
  declare fixGuidance: string;
  declare caution: string | null;
  declare needsCeilingAccess: boolean;
  declare builtin: CreationOptional<boolean>;
  /** A built-in copy the job never edited: upgradeBuiltinCatalogues keeps it equal to the built-in item. */
  declare followsBuiltin: CreationOptional<boolean>;
  /** The job's one "other" type: findings of "Something else" (their own title); never in a checklist or the set-up list. */
  declare isOther: CreationOptional<boolean>;
  declare position: number;
  declare retiredAt: CreationOptional<Date | null>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    CatalogueItem.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        code: { type: DataTypes.STRING(10), allowNull: false },
        group: { type: DataTypes.STRING(20), allowNull: false },
        title: { type: DataTypes.STRING(160), allowNull: false },
        description: { type: DataTypes.TEXT, allowNull: false },
        unitKinds: { type: DataTypes.ARRAY(DataTypes.STRING(40)), allowNull: false },
        defaultSeverity: { type: DataTypes.STRING(10), allowNull: false },
        trade: { type: DataTypes.STRING(20), allowNull: false },
        measuredRule: { type: DataTypes.JSONB, allowNull: true },
        fixGuidance: { type: DataTypes.TEXT, allowNull: false },
        caution: { type: DataTypes.TEXT, allowNull: true },
        needsCeilingAccess: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        builtin: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        followsBuiltin: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        isOther: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        position: { type: DataTypes.INTEGER, allowNull: false },
        retiredAt: { type: DataTypes.DATE, allowNull: true },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'catalogue_items' },
    );
  }
}
