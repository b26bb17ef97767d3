import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { FindingEventKind } from '../../shared/schemas/findings';
import type { Finding } from './Finding';
import type { Job } from './Job';
import type { User } from './User';

/**
 * One entry of a finding's history. Append-only: the database refuses UPDATE and DELETE on
 * finding_events (trigger in migration 20261201040400), so only create() is ever used.
 */
export class FindingEvent extends Model<InferAttributes<FindingEvent>, InferCreationAttributes<FindingEvent>> {
  declare id: CreationOptional<string>;
  declare findingId: ForeignKey<Finding['id']>;
  declare jobId: ForeignKey<Job['id']>;
  declare actorId: ForeignKey<User['id']>;
  declare at: Date;
  declare kind: FindingEventKind;
  declare from: Record<string, unknown> | null;
  declare to: Record<string, unknown> | null;
  declare reason: string | null;
  declare photoIds: CreationOptional<string[]>;

  static initModel(sequelize: Sequelize) {
    FindingEvent.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true, defaultValue: DataTypes.UUIDV4 },
        findingId: { type: DataTypes.UUID, allowNull: false },
        jobId: { type: DataTypes.UUID, allowNull: false },
        actorId: { type: DataTypes.UUID, allowNull: false },
        at: { type: DataTypes.DATE, allowNull: false },
        kind: { type: DataTypes.STRING(30), allowNull: false },
        from: { type: DataTypes.JSONB, allowNull: true },
        to: { type: DataTypes.JSONB, allowNull: true },
        reason: { type: DataTypes.TEXT, allowNull: true },
        photoIds: { type: DataTypes.ARRAY(DataTypes.UUID), allowNull: false, defaultValue: [] },
      },
      { sequelize, tableName: 'finding_events', timestamps: false },
    );
  }
}
