import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type NonAttribute, type Sequelize } from 'sequelize';
import type { AssignmentConfig, AssignmentStatus } from '../../shared/assignment.js';

/** An assignment of a course; its configuration lives in versions (currentVersion is the one in force). */
export class Assignment extends Model<InferAttributes<Assignment>, InferCreationAttributes<Assignment>> {
  declare id: CreationOptional<number>;
  declare courseId: number;
  declare title: string;
  declare status: CreationOptional<AssignmentStatus>;
  declare dueAt: Date;
  declare timeZone: string;
  declare method: string;
  declare currentVersion: CreationOptional<number>;
  declare publishedAt: Date | null;
  declare closedAt: Date | null;
  /** When the scores were last released (null: provisional, not visible to students); how many times. */
  declare releasedAt: CreationOptional<Date | null>;
  declare releaseCount: CreationOptional<number>;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;
  declare versions?: NonAttribute<AssignmentVersion[]>;

  static initModel(sequelize: Sequelize): void {
    Assignment.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        courseId: { type: DataTypes.INTEGER, allowNull: false },
        title: { type: DataTypes.STRING(200), allowNull: false },
        status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'draft' },
        dueAt: { type: DataTypes.DATE, allowNull: false },
        timeZone: { type: DataTypes.STRING(64), allowNull: false },
        method: { type: DataTypes.STRING(16), allowNull: false },
        currentVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1 },
        publishedAt: { type: DataTypes.DATE, allowNull: true },
        closedAt: { type: DataTypes.DATE, allowNull: true },
        releasedAt: { type: DataTypes.DATE, allowNull: true },
        releaseCount: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'assignments', modelName: 'Assignment' },
    );
  }
}

/** One version of an assignment's configuration: validated JSON, never edited once published. */
export class AssignmentVersion extends Model<InferAttributes<AssignmentVersion>, InferCreationAttributes<AssignmentVersion>> {
  declare id: CreationOptional<number>;
  declare assignmentId: number;
  declare version: number;
  declare config: AssignmentConfig;
  declare datasetId: number;
  /** sha256 of what makes the variants (dataset, its bytes, variant settings). */
  declare recipeKey: string;
  /** sha256 of everything that changes a reference (recipe, method, parameters, dt, ordering, parts). */
  declare referenceKey: string;
  declare createdById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    AssignmentVersion.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        assignmentId: { type: DataTypes.INTEGER, allowNull: false },
        version: { type: DataTypes.INTEGER, allowNull: false },
        config: { type: DataTypes.JSONB, allowNull: false },
        datasetId: { type: DataTypes.INTEGER, allowNull: false },
        recipeKey: { type: DataTypes.CHAR(64), allowNull: false },
        referenceKey: { type: DataTypes.CHAR(64), allowNull: false },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'assignment_versions', modelName: 'AssignmentVersion' },
    );
  }
}
