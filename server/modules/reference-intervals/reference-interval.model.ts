import {
  DataTypes,
  Model,
  type CreationOptional,
  type InferAttributes,
  type InferCreationAttributes,
  type Sequelize,
} from 'sequelize';
import type { ValueBasis } from '@/schemas/assay';
import type { AssayCode, Measure, SpecimenType } from '@/schemas/common';
import type { IntervalMethod, ReferenceIntervalStatus } from '@/schemas/reference-interval';
import { idColumn, timestampColumns } from '../../db/columns';

/** One version of one reference interval key; see migration 0004 for the meaning of each column. */
export class ReferenceIntervalModel extends Model<
  InferAttributes<ReferenceIntervalModel>,
  InferCreationAttributes<ReferenceIntervalModel>
> {
  declare id: CreationOptional<number>;
  declare intervalKey: string;
  declare version: number;
  declare status: ReferenceIntervalStatus;
  declare setName: string;
  declare assay: AssayCode;
  declare measure: Measure;
  declare specimenType: SpecimenType;
  declare ageLabel: string;
  declare ageMinYears: number;
  declare ageMaxYears: number | null;
  declare lower: number;
  declare upper: number;
  declare mean: number;
  declare sd: number | null;
  declare n: number;
  declare unit: string;
  declare basis: ValueBasis;
  declare method: IntervalMethod;
  declare derivation: string | null;
  declare sourceNote: string;
  declare uploadId: number | null;
  declare effectiveFrom: string;
  declare effectiveTo: string | null;
  declare createdById: number | null;
  declare approvedById: number | null;
  declare approvedAt: Date | null;
  declare retiredById: number | null;
  declare retiredAt: Date | null;
  declare retireReason: string | null;
  declare revision: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
}

export function initReferenceIntervalModel(sequelize: Sequelize): void {
  ReferenceIntervalModel.init(
    {
      id: idColumn,
      intervalKey: { type: DataTypes.STRING(120), allowNull: false },
      version: { type: DataTypes.INTEGER, allowNull: false },
      status: { type: DataTypes.STRING(10), allowNull: false },
      setName: { type: DataTypes.STRING(160), allowNull: false },
      assay: { type: DataTypes.STRING(10), allowNull: false },
      measure: { type: DataTypes.STRING(12), allowNull: false },
      specimenType: { type: DataTypes.STRING(30), allowNull: false },
      ageLabel: { type: DataTypes.STRING(60), allowNull: false },
      ageMinYears: { type: DataTypes.FLOAT, allowNull: false },
      ageMaxYears: { type: DataTypes.FLOAT, allowNull: true },
      lower: { type: DataTypes.FLOAT, allowNull: false },
      upper: { type: DataTypes.FLOAT, allowNull: false },
      mean: { type: DataTypes.FLOAT, allowNull: false },
      sd: { type: DataTypes.FLOAT, allowNull: true },
      n: { type: DataTypes.INTEGER, allowNull: false },
      unit: { type: DataTypes.STRING(40), allowNull: false },
      basis: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'linear_rate' },
      method: { type: DataTypes.STRING(20), allowNull: false },
      derivation: { type: DataTypes.TEXT, allowNull: true },
      sourceNote: { type: DataTypes.TEXT, allowNull: false },
      uploadId: { type: DataTypes.INTEGER, allowNull: true },
      effectiveFrom: { type: DataTypes.STRING(10), allowNull: false },
      effectiveTo: { type: DataTypes.STRING(10), allowNull: true },
      createdById: { type: DataTypes.INTEGER, allowNull: true },
      approvedById: { type: DataTypes.INTEGER, allowNull: true },
      approvedAt: { type: DataTypes.DATE, allowNull: true },
      retiredById: { type: DataTypes.INTEGER, allowNull: true },
      retiredAt: { type: DataTypes.DATE, allowNull: true },
      retireReason: { type: DataTypes.TEXT, allowNull: true },
      revision: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
      ...timestampColumns,
    },
    { sequelize, tableName: 'reference_intervals', modelName: 'ReferenceInterval' },
  );
}
