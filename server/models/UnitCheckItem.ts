import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { RuleResult } from '../../shared/calc/rules';
import type { CheckMark } from '../../shared/words';
import type { CatalogueItem } from './CatalogueItem';
import type { UnitCheck } from './UnitCheck';

/** One catalogue item marked within a unit check; measuredValue in base units. */
export class UnitCheckItem extends Model<InferAttributes<UnitCheckItem>, InferCreationAttributes<UnitCheckItem>> {
  declare id: CreationOptional<string>;
  declare unitCheckId: ForeignKey<UnitCheck['id']>;
  declare catalogueItemId: ForeignKey<CatalogueItem['id']>;
  declare mark: CheckMark;
  declare measuredText: string | null;
  declare measuredValue: number | null;
  declare result: RuleResult | null;
  declare position: number;

  static initModel(sequelize: Sequelize) {
    UnitCheckItem.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        unitCheckId: { type: DataTypes.UUID, allowNull: false },
        catalogueItemId: { type: DataTypes.UUID, allowNull: false },
        mark: { type: DataTypes.STRING(20), allowNull: false },
        measuredText: { type: DataTypes.STRING(60), allowNull: true },
        measuredValue: { type: DataTypes.DOUBLE, allowNull: true },
        result: { type: DataTypes.JSONB, allowNull: true },
        position: { type: DataTypes.INTEGER, allowNull: false },
      },
      { sequelize, tableName: 'unit_check_items', timestamps: false },
    );
  }
}
