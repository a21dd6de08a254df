import type { DatasetPreview } from '../../shared/assignment.js';
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export interface ScenarioRecipe {
  name: 'linear-field' | 'drift-map' | 'wave-field' | 'vibration';
  seed: number;
  noise: number;
  samples?: number;
}

/** A snapshot dataset of a course: its bytes (and Y for explicit pairs) with their sha256, checked by the engine's readers before it is stored. */
export class Dataset extends Model<InferAttributes<Dataset>, InferCreationAttributes<Dataset>> {
  declare id: CreationOptional<number>;
  declare courseId: number;
  declare name: string;
  declare source: 'upload' | 'scenario';
  declare format: 'npy' | 'csv';
  declare layout: 'columns' | 'rows';
  declare fileName: string;
  declare n: number;
  declare snapshots: number;
  declare pairs: boolean;
  declare dt: number | null;
  declare bytes: Buffer;
  declare bytesY: Buffer | null;
  declare byteSize: number;
  declare sha256: string;
  declare scenario: ScenarioRecipe | null;
  declare preview: DatasetPreview;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Dataset.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        courseId: { type: DataTypes.INTEGER, allowNull: false },
        name: { type: DataTypes.STRING(120), allowNull: false },
        source: { type: DataTypes.STRING(16), allowNull: false },
        format: { type: DataTypes.STRING(8), allowNull: false },
        layout: { type: DataTypes.STRING(8), allowNull: false },
        fileName: { type: DataTypes.STRING(255), allowNull: false },
        n: { type: DataTypes.INTEGER, allowNull: false },
        snapshots: { type: DataTypes.INTEGER, allowNull: false },
        pairs: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        dt: { type: DataTypes.DOUBLE, allowNull: true },
        bytes: { type: DataTypes.BLOB, allowNull: false },
        bytesY: { type: DataTypes.BLOB, allowNull: true },
        byteSize: { type: DataTypes.INTEGER, allowNull: false },
        sha256: { type: DataTypes.CHAR(64), allowNull: false },
        scenario: { type: DataTypes.JSONB, allowNull: true },
        preview: { type: DataTypes.JSONB, allowNull: false },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'datasets', modelName: 'Dataset' },
    );
  }
}

/** Every column but the bytes: for lists and summaries. */
export const datasetSummaryAttributes = ['id', 'courseId', 'name', 'source', 'format', 'layout', 'fileName', 'n', 'snapshots', 'pairs', 'dt', 'byteSize', 'sha256', 'scenario', 'preview', 'createdById', 'createdAt', 'updatedAt'] as const;
