import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { MountPosition } from '../../shared/calc/refrigerant';
import type { UnitKindKey } from '../../shared/words';
import type { Crew } from './Crew';
import type { Job } from './Job';
import type { Level } from './Level';
import type { Space } from './Space';
import type { System } from './System';
import type { UnitModel } from './UnitModel';

/** One indoor unit, known by its tag (unique within the job). capacity in W. */
export class Unit extends Model<InferAttributes<Unit>, InferCreationAttributes<Unit>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare tag: string;
  declare kind: UnitKindKey;
  declare modelId: ForeignKey<UnitModel['id']> | null;
  declare capacity: number | null;
  declare levelId: ForeignKey<Level['id']>;
  declare spaceId: ForeignKey<Space['id']> | null;
  declare systemId: ForeignKey<System['id']> | null;
  /** Pin on the level's plan: fractions of its width and height (0..1), both set or both null. */
  declare pinX: CreationOptional<number | null>;
  declare pinY: CreationOptional<number | null>;
  /** The crew that installed the unit (a crew of a company on the job), or null when not recorded. */
  declare installedByCrewId: CreationOptional<string | null>;
  declare installedByCrew?: NonAttribute<Crew | null>;
  /** Where this unit is mounted, when it differs from its model's position or the model has none. */
  declare mountPosition: CreationOptional<MountPosition | null>;
  /** Excluded from the ceiling rule by a GC manager (all three set, or all null): commands/ceilingExclusion.ts. */
  declare ceilingExcludedReason: CreationOptional<string | null>;
  declare ceilingExcludedBy: CreationOptional<string | null>;
  declare ceilingExcludedAt: CreationOptional<Date | null>;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare level?: NonAttribute<Level>;
  declare space?: NonAttribute<Space | null>;
  declare system?: NonAttribute<System | null>;
  declare model?: NonAttribute<UnitModel | null>;

  static initModel(sequelize: Sequelize) {
    Unit.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        tag: { type: DataTypes.STRING(40), allowNull: false },
        kind: { type: DataTypes.STRING(40), allowNull: false },
        modelId: { type: DataTypes.UUID, allowNull: true },
        capacity: { type: DataTypes.DOUBLE, allowNull: true },
        levelId: { type: DataTypes.UUID, allowNull: false },
        spaceId: { type: DataTypes.UUID, allowNull: true },
        systemId: { type: DataTypes.UUID, allowNull: true },
        pinX: { type: DataTypes.DOUBLE, allowNull: true, defaultValue: null },
        pinY: { type: DataTypes.DOUBLE, allowNull: true, defaultValue: null },
        installedByCrewId: { type: DataTypes.UUID, allowNull: true, defaultValue: null },
        mountPosition: { type: DataTypes.STRING(10), allowNull: true, defaultValue: null },
        ceilingExcludedReason: { type: DataTypes.TEXT, allowNull: true, defaultValue: null },
        ceilingExcludedBy: { type: DataTypes.UUID, allowNull: true, defaultValue: null },
        ceilingExcludedAt: { type: DataTypes.DATE, allowNull: true, defaultValue: null },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'units' },
    );
  }
}
