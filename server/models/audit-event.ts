import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

/** Who changed what in a course, when, with the value before and after (migration 0006). Never updated. */
export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
  declare id: CreationOptional<string>;
  declare courseId: number;
  declare actorId: number | null;
  declare action: string;
  declare subjectType: string;
  declare subjectId: string | null;
  declare before: unknown;
  declare after: unknown;
  declare createdAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    AuditEvent.init(
      {
        id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
        courseId: { type: DataTypes.INTEGER, allowNull: false },
        actorId: { type: DataTypes.INTEGER, allowNull: true },
        action: { type: DataTypes.STRING(60), allowNull: false },
        subjectType: { type: DataTypes.STRING(40), allowNull: false },
        subjectId: { type: DataTypes.STRING(80), allowNull: true },
        before: { type: DataTypes.JSONB, allowNull: true },
        after: { type: DataTypes.JSONB, allowNull: true },
        createdAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'audit_events', modelName: 'AuditEvent', updatedAt: false },
    );
  }
}
