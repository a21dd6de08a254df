import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/**
 * One student's copy of an assignment's dataset, as a recipe (dataset, seed,
 * noise, jitter) plus the checksum of the bytes it produces. userId null is
 * the dataset as the instructor gave it (used for the preview).
 */
export class Variant extends Model<InferAttributes<Variant>, InferCreationAttributes<Variant>> {
  declare id: CreationOptional<number>;
  declare assignmentId: number;
  declare userId: number | null;
  declare datasetId: number;
  declare recipeKey: string;
  declare mode: 'same' | 'per-student';
  declare seed: number;
  declare noise: number;
  declare jitter: number;
  declare parameters: Record<string, number> | null;
  declare checksum: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Variant.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        assignmentId: { type: DataTypes.INTEGER, allowNull: false },
        userId: { type: DataTypes.INTEGER, allowNull: true },
        datasetId: { type: DataTypes.INTEGER, allowNull: false },
        recipeKey: { type: DataTypes.CHAR(64), allowNull: false },
        mode: { type: DataTypes.STRING(16), allowNull: false },
        seed: { type: DataTypes.INTEGER, allowNull: false },
        noise: { type: DataTypes.DOUBLE, allowNull: false },
        jitter: { type: DataTypes.DOUBLE, allowNull: false },
        parameters: { type: DataTypes.JSONB, allowNull: true },
        checksum: { type: DataTypes.CHAR(64), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'variants', modelName: 'Variant' },
    );
  }
}
