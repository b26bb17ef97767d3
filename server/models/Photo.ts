import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { PhotoStage } from '../../shared/schemas/findings';
import type { TestPhotoStage } from '../../shared/schemas/testRecords';
import type { PhotoType } from '../services/photos';
import type { Job } from './Job';
import type { User } from './User';

/**
 * A stored photo of a finding or a fix (bytes in object storage, see server/services/photos.ts).
 * Immutable once written (no updated_at, no version), but for `printKey`, which a report fills once
 * for a photo stored before print copies were made. finding_id / fix_id get their foreign keys
 * from the findings and fixes migrations.
 */
export class Photo extends Model<InferAttributes<Photo>, InferCreationAttributes<Photo>> {
  /** The UUID in the object keys (StoredPhoto.id). */
  declare id: string;
  declare jobId: ForeignKey<Job['id']>;
  declare storageKey: string;
  declare thumbKey: string;
  /** The print copy a report embeds (server/services/photos.ts PRINT_SIZE); null until one is made. */
  declare printKey: CreationOptional<string | null>;
  declare contentType: string;
  declare sourceType: PhotoType;
  declare byteSize: number;
  declare width: number;
  declare height: number;
  declare sha256: string;
  declare uploadedBy: ForeignKey<User['id']>;
  declare findingId: CreationOptional<string | null>;
  declare fixId: CreationOptional<string | null>;
  /** A test record's photo (stage gauge_start, gauge_end or test). */
  declare testRecordId: CreationOptional<string | null>;
  /** What the photo shows: the defect, the fixed work, or the inspector's re-inspection (shared PhotoStage). */
  declare stage: CreationOptional<PhotoStage | TestPhotoStage>;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Photo.init(
      {
        id: { type: DataTypes.UUID, primaryKey: true },
        jobId: { type: DataTypes.UUID, allowNull: false },
        storageKey: { type: DataTypes.STRING(200), allowNull: false },
        thumbKey: { type: DataTypes.STRING(200), allowNull: false },
        printKey: { type: DataTypes.STRING(200), allowNull: true, defaultValue: null },
        contentType: { type: DataTypes.STRING(40), allowNull: false },
        sourceType: { type: DataTypes.STRING(40), allowNull: false },
        byteSize: { type: DataTypes.INTEGER, allowNull: false },
        width: { type: DataTypes.INTEGER, allowNull: false },
        height: { type: DataTypes.INTEGER, allowNull: false },
        sha256: { type: DataTypes.STRING(64), allowNull: false },
        uploadedBy: { type: DataTypes.UUID, allowNull: false },
        findingId: { type: DataTypes.UUID, allowNull: true },
        fixId: { type: DataTypes.UUID, allowNull: true },
        testRecordId: { type: DataTypes.UUID, allowNull: true, defaultValue: null },
        stage: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'finding' },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'photos', updatedAt: false },
    );
  }
}
