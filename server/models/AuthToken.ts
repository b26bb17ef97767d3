import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { Role } from '../../shared/words';
import type { Company } from './Company';
import type { Job } from './Job';
import type { User } from './User';

export const TOKEN_PURPOSES = ['invitation', 'password_reset', 'email_confirmation'] as const;
export type TokenPurpose = (typeof TOKEN_PURPOSES)[number];

/** A one-time token sent by mail; only its SHA-256 is stored (see server/services/tokens.ts). */
export class AuthToken extends Model<InferAttributes<AuthToken>, InferCreationAttributes<AuthToken>> {
  declare id: CreationOptional<string>;
  declare purpose: TokenPurpose;
  declare tokenHash: string;
  declare userId: CreationOptional<ForeignKey<User['id']> | null>;
  declare email: CreationOptional<string | null>;
  declare name: CreationOptional<string | null>;
  declare jobId: CreationOptional<ForeignKey<Job['id']> | null>;
  declare role: CreationOptional<Role | null>;
  declare companyId: CreationOptional<ForeignKey<Company['id']> | null>;
  declare invitedBy: CreationOptional<ForeignKey<User['id']> | null>;
  /** E-mail confirmation: the password chosen with that sign-up (hashed), applied on confirming. */
  declare passwordHash: CreationOptional<string | null>;
  /** E-mail confirmation: the company name typed with that sign-up. */
  declare companyName: CreationOptional<string | null>;
  declare expiresAt: Date;
  declare usedAt: CreationOptional<Date | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare job?: NonAttribute<Job>;
  declare company?: NonAttribute<Company>;
  declare inviter?: NonAttribute<User>;

  static initModel(sequelize: Sequelize) {
    AuthToken.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        purpose: { type: DataTypes.STRING(24), allowNull: false },
        tokenHash: { type: DataTypes.STRING(64), allowNull: false },
        userId: { type: DataTypes.UUID, allowNull: true },
        email: { type: DataTypes.STRING(254), allowNull: true },
        name: { type: DataTypes.STRING(120), allowNull: true },
        jobId: { type: DataTypes.UUID, allowNull: true },
        role: { type: DataTypes.STRING(20), allowNull: true },
        companyId: { type: DataTypes.UUID, allowNull: true },
        invitedBy: { type: DataTypes.UUID, allowNull: true },
        passwordHash: { type: DataTypes.STRING(300), allowNull: true },
        companyName: { type: DataTypes.STRING(120), allowNull: true },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        usedAt: { type: DataTypes.DATE, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'auth_tokens' },
    );
  }
}
