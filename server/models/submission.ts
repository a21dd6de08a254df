import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { ScoreReason, SubmissionStatus } from '../../shared/submission.js';
import type { ScoreReport } from '../../shared/score-report.js';

const ts = { createdAt: DataTypes.DATE, updatedAt: DataTypes.DATE };

/** A student's hand-in: the raw bytes, stored before any scoring. */
export class Submission extends Model<InferAttributes<Submission>, InferCreationAttributes<Submission>> {
  declare id: CreationOptional<number>;
  declare assignmentId: number;
  declare userId: number;
  declare variantId: number;
  declare assignmentVersionId: number;
  declare attempt: number;
  declare status: CreationOptional<SubmissionStatus>;
  declare source: 'file' | 'text';
  declare fileName: string;
  declare bytes: Buffer;
  declare sha256: string;
  declare receivedAt: Date;
  declare dueAt: Date;
  declare late: boolean;
  declare daysLate: number;
  declare returned: CreationOptional<boolean>;
  declare message: string | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Submission.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        assignmentId: { type: DataTypes.INTEGER, allowNull: false },
        userId: { type: DataTypes.INTEGER, allowNull: false },
        variantId: { type: DataTypes.INTEGER, allowNull: false },
        assignmentVersionId: { type: DataTypes.INTEGER, allowNull: false },
        attempt: { type: DataTypes.INTEGER, allowNull: false },
        status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'received' },
        source: { type: DataTypes.STRING(8), allowNull: false },
        fileName: { type: DataTypes.STRING(255), allowNull: false },
        bytes: { type: DataTypes.BLOB, allowNull: false },
        sha256: { type: DataTypes.CHAR(64), allowNull: false },
        receivedAt: { type: DataTypes.DATE, allowNull: false },
        dueAt: { type: DataTypes.DATE, allowNull: false },
        late: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        daysLate: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        returned: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        message: { type: DataTypes.TEXT, allowNull: true },
        ...ts,
      },
      { sequelize, tableName: 'submissions', modelName: 'Submission' },
    );
  }
}

/** One score of a submission. Append-only (a trigger refuses updates): a change is a new row with its reason, author and time. */
export class Score extends Model<InferAttributes<Score>, InferCreationAttributes<Score>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare referenceId: number | null;
  declare gradeKey: string;
  declare points: number;
  declare maxPoints: number;
  declare latePenalty: number;
  declare report: ScoreReport | null;
  declare reason: ScoreReason;
  declare authorId: number | null;
  declare comment: string | null;
  declare assignmentVersion: number;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Score.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        submissionId: { type: DataTypes.INTEGER, allowNull: false },
        referenceId: { type: DataTypes.INTEGER, allowNull: true },
        gradeKey: { type: DataTypes.STRING(80), allowNull: false },
        points: { type: DataTypes.DOUBLE, allowNull: false },
        maxPoints: { type: DataTypes.DOUBLE, allowNull: false },
        latePenalty: { type: DataTypes.DOUBLE, allowNull: false, defaultValue: 0 },
        report: { type: DataTypes.JSONB, allowNull: true },
        reason: { type: DataTypes.STRING(16), allowNull: false },
        authorId: { type: DataTypes.INTEGER, allowNull: true },
        comment: { type: DataTypes.TEXT, allowNull: true },
        assignmentVersion: { type: DataTypes.INTEGER, allowNull: false },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'scores', modelName: 'Score', updatedAt: false },
    );
  }
}

export class Flag extends Model<InferAttributes<Flag>, InferCreationAttributes<Flag>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare scoreId: number | null;
  declare code: string;
  declare message: string;
  declare otherUserId: number | null;
  declare otherSubmissionId: number | null;
  declare open: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Flag.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        submissionId: { type: DataTypes.INTEGER, allowNull: false },
        scoreId: { type: DataTypes.INTEGER, allowNull: true },
        code: { type: DataTypes.STRING(40), allowNull: false },
        message: { type: DataTypes.TEXT, allowNull: false },
        otherUserId: { type: DataTypes.INTEGER, allowNull: true },
        otherSubmissionId: { type: DataTypes.INTEGER, allowNull: true },
        open: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        ...ts,
      },
      { sequelize, tableName: 'flags', modelName: 'Flag' },
    );
  }
}

export class Review extends Model<InferAttributes<Review>, InferCreationAttributes<Review>> {
  declare id: CreationOptional<number>;
  declare submissionId: number;
  declare kind: 'flag' | 'second-look';
  declare state: CreationOptional<'open' | 'accepted' | 'overridden' | 'returned' | 'answered'>;
  declare requestComment: string | null;
  declare requestedById: number | null;
  declare decisionComment: string | null;
  declare decidedById: number | null;
  declare decidedAt: Date | null;
  declare scoreId: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Review.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        submissionId: { type: DataTypes.INTEGER, allowNull: false },
        kind: { type: DataTypes.STRING(16), allowNull: false },
        state: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'open' },
        requestComment: { type: DataTypes.TEXT, allowNull: true },
        requestedById: { type: DataTypes.INTEGER, allowNull: true },
        decisionComment: { type: DataTypes.TEXT, allowNull: true },
        decidedById: { type: DataTypes.INTEGER, allowNull: true },
        decidedAt: { type: DataTypes.DATE, allowNull: true },
        scoreId: { type: DataTypes.INTEGER, allowNull: true },
        ...ts,
      },
      { sequelize, tableName: 'reviews', modelName: 'Review' },
    );
  }
}

export class Extension extends Model<InferAttributes<Extension>, InferCreationAttributes<Extension>> {
  declare id: CreationOptional<number>;
  declare assignmentId: number;
  declare userId: number;
  declare dueAt: Date;
  declare comment: string | null;
  declare grantedById: number | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Extension.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        assignmentId: { type: DataTypes.INTEGER, allowNull: false },
        userId: { type: DataTypes.INTEGER, allowNull: false },
        dueAt: { type: DataTypes.DATE, allowNull: false },
        comment: { type: DataTypes.TEXT, allowNull: true },
        grantedById: { type: DataTypes.INTEGER, allowNull: true },
        ...ts,
      },
      { sequelize, tableName: 'extensions', modelName: 'Extension' },
    );
  }
}

export class Regrade extends Model<InferAttributes<Regrade>, InferCreationAttributes<Regrade>> {
  declare id: CreationOptional<number>;
  declare assignmentId: number;
  declare submissionId: number | null;
  declare assignmentVersionId: number;
  declare reason: string;
  declare requestedById: number | null;
  declare total: number;
  declare failed: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Regrade.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        assignmentId: { type: DataTypes.INTEGER, allowNull: false },
        submissionId: { type: DataTypes.INTEGER, allowNull: true },
        assignmentVersionId: { type: DataTypes.INTEGER, allowNull: false },
        reason: { type: DataTypes.TEXT, allowNull: false },
        requestedById: { type: DataTypes.INTEGER, allowNull: true },
        total: { type: DataTypes.INTEGER, allowNull: false },
        failed: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        ...ts,
      },
      { sequelize, tableName: 'regrades', modelName: 'Regrade' },
    );
  }
}
