import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { idColumn } from '../../db/columns';

/** An uploaded file, kept byte for byte with its SHA-256, downloadable from its case. */
export class UploadModel extends Model<InferAttributes<UploadModel>, InferCreationAttributes<UploadModel>> {
  declare id: CreationOptional<number>;
  declare caseId: number | null;
  declare kind: string;
  declare filename: string;
  declare mimeType: string;
  declare sizeBytes: number;
  declare sha256: string;
  declare content: Buffer;
  declare uploadedById: number | null;
  declare createdAt: CreationOptional<Date>;
}

export function initUploadModel(sequelize: Sequelize): void {
  UploadModel.init(
    {
      id: idColumn,
      caseId: { type: DataTypes.INTEGER, allowNull: true },
      kind: { type: DataTypes.STRING(20), allowNull: false },
      filename: { type: DataTypes.STRING(255), allowNull: false },
      mimeType: { type: DataTypes.STRING(100), allowNull: false },
      sizeBytes: { type: DataTypes.INTEGER, allowNull: false },
      sha256: { type: DataTypes.STRING(64), allowNull: false },
      content: { type: DataTypes.BLOB, allowNull: false },
      uploadedById: { type: DataTypes.INTEGER, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'uploads', modelName: 'Upload', updatedAt: false },
  );
}
