import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { ReferenceStatus } from '../../shared/assignment.js';
import type { ReferenceSpectrum as ReferenceJson } from '../../shared/reference.js';
import type { ReferenceExtras } from '../../shared/score-report.js';

/** The reference spectrum of one variant under one reference-altering configuration (unique), written by the reference job. */
export class ReferenceSpectrum extends Model<InferAttributes<ReferenceSpectrum>, InferCreationAttributes<ReferenceSpectrum>> {
  declare id: CreationOptional<number>;
  declare variantId: number;
  declare assignmentVersionId: number;
  declare referenceKey: string;
  declare status: CreationOptional<ReferenceStatus>;
  declare attempts: CreationOptional<number>;
  declare message: string | null;
  declare reference: ReferenceJson | null;
  declare extras: ReferenceExtras | null;
  declare singularValues: number[] | null;
  declare modeShapes: { re: number[]; im: number[] }[] | null;
  declare checksum: string | null;
  declare computedAt: Date | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    ReferenceSpectrum.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        variantId: { type: DataTypes.INTEGER, allowNull: false },
        assignmentVersionId: { type: DataTypes.INTEGER, allowNull: false },
        referenceKey: { type: DataTypes.CHAR(64), allowNull: false },
        status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'queued' },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        message: { type: DataTypes.TEXT, allowNull: true },
        reference: { type: DataTypes.JSONB, allowNull: true },
        extras: { type: DataTypes.JSONB, allowNull: true },
        singularValues: { type: DataTypes.JSONB, allowNull: true },
        modeShapes: { type: DataTypes.JSONB, allowNull: true },
        checksum: { type: DataTypes.CHAR(64), allowNull: true },
        computedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'reference_spectra', modelName: 'ReferenceSpectrum' },
    );
  }
}
