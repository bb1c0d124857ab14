import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import { editVersionColumn, idColumn, timestampColumns } from '../../db/columns';

/** One signed version of a case's report, with the PDF rendered at signing. */
export class ReportModel extends Model<InferAttributes<ReportModel>, InferCreationAttributes<ReportModel>> {
  declare id: CreationOptional<number>;
  declare caseId: number;
  declare version: number;
  declare kind: 'final' | 'corrected';
  declare specimenId: number | null;
  declare patternSummary: string | null;
  declare interpretation: string;
  declare meaning: string;
  declare signedById: number;
  declare signerName: string;
  declare signerTitle: string;
  declare signedAt: Date;
  declare supersedesReportId: number | null;
  declare supersededByReportId: CreationOptional<number | null>;
  declare supersededAt: CreationOptional<Date | null>;
  declare correctionReason: string | null;
  declare changesSummary: string | null;
  declare document: string;
  declare documentSha256: string;
  declare pdf: Buffer;
  declare pdfSha256: string;
  declare pdfSizeBytes: number;
  declare createdAt: CreationOptional<Date>;
}

/** The director's unsigned working text of an interpretation, one per case. */
export class InterpretationDraftModel extends Model<
  InferAttributes<InterpretationDraftModel>,
  InferCreationAttributes<InterpretationDraftModel>
> {
  declare caseId: number;
  declare text: string;
  declare updatedById: number | null;
  declare version: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initReportModels(sequelize: Sequelize): void {
  ReportModel.init(
    {
      id: idColumn,
      caseId: { type: DataTypes.INTEGER, allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      kind: { type: DataTypes.STRING(12), allowNull: false },
      specimenId: { type: DataTypes.INTEGER, allowNull: true },
      patternSummary: { type: DataTypes.TEXT, allowNull: true },
      interpretation: { type: DataTypes.TEXT, allowNull: false },
      meaning: { type: DataTypes.STRING(200), allowNull: false },
      signedById: { type: DataTypes.INTEGER, allowNull: false },
      signerName: { type: DataTypes.STRING(120), allowNull: false },
      signerTitle: { type: DataTypes.STRING(120), allowNull: false },
      signedAt: { type: DataTypes.DATE, allowNull: false },
      supersedesReportId: { type: DataTypes.INTEGER, allowNull: true },
      supersededByReportId: { type: DataTypes.INTEGER, allowNull: true },
      supersededAt: { type: DataTypes.DATE, allowNull: true },
      correctionReason: { type: DataTypes.TEXT, allowNull: true },
      changesSummary: { type: DataTypes.TEXT, allowNull: true },
      document: { type: DataTypes.TEXT, allowNull: false },
      documentSha256: { type: DataTypes.STRING(64), allowNull: false },
      pdf: { type: DataTypes.BLOB, allowNull: false },
      pdfSha256: { type: DataTypes.STRING(64), allowNull: false },
      pdfSizeBytes: { type: DataTypes.INTEGER, allowNull: false },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'reports', modelName: 'Report', updatedAt: false },
  );
  InterpretationDraftModel.init(
    {
      caseId: { type: DataTypes.INTEGER, primaryKey: true },
      text: { type: DataTypes.TEXT, allowNull: false },
      updatedById: { type: DataTypes.INTEGER, allowNull: true },
      version: editVersionColumn,
      ...timestampColumns,
    },
    { sequelize, tableName: 'interpretation_drafts', modelName: 'InterpretationDraft' },
  );
}
