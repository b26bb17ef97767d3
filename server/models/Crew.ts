import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { Company } from './Company';
import type { Job } from './Job';

/** A named team within a company on a job; units record which crew installed them. */
export class Crew extends Model<InferAttributes<Crew>, InferCreationAttributes<Crew>> {
  declare id: CreationOptional<string>;
  declare jobId: ForeignKey<Job['id']>;
  declare companyId: ForeignKey<Company['id']>;
  declare name: string;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare company?: NonAttribute<Company>;

  static initModel(sequelize: Sequelize) {
    Crew.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        jobId: { type: DataTypes.UUID, allowNull: false },
        companyId: { type: DataTypes.UUID, allowNull: false },
        name: { type: DataTypes.STRING(80), allowNull: false },
        version: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'crews' },
    );
  }
}
