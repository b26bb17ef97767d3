import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Company } from './Company';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<string>;
  declare companyId: ForeignKey<Company['id']>;
  declare email: string;
  declare name: string;
  declare passwordHash: string | null;
  /** Raised on password change or removal: every session holding an older epoch ends. */
  declare sessionEpoch: CreationOptional<number>;
  declare disabledAt: CreationOptional<Date | null>;
  /** Null until a self-signed-up user follows the confirmation link; now() for everyone else. */
  declare emailConfirmedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    User.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        companyId: { type: DataTypes.UUID, allowNull: false },
        email: {
          type: DataTypes.STRING(254),
          allowNull: false,
          set(value: string) {
            this.setDataValue('email', value.trim().toLowerCase());
          },
        },
        name: { type: DataTypes.STRING(120), allowNull: false },
        passwordHash: { type: DataTypes.STRING(300), allowNull: true },
        sessionEpoch: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        disabledAt: { type: DataTypes.DATE, allowNull: true },
        emailConfirmedAt: { type: DataTypes.DATE, allowNull: true, defaultValue: DataTypes.NOW },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'users' },
    );
  }
}
