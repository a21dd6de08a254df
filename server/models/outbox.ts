import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const outboxStates = ['queued', 'sending', 'sent', 'failed'] as const;
export type OutboxState = (typeof outboxStates)[number];

/** One e-mail, sent at most once per key (migration 0005). */
export class OutboxMessage extends Model<InferAttributes<OutboxMessage>, InferCreationAttributes<OutboxMessage>> {
  declare id: CreationOptional<number>;
  declare key: string;
  declare to: string;
  declare subject: string;
  declare text: string;
  declare html: CreationOptional<string | null>;
  declare state: CreationOptional<OutboxState>;
  declare attempts: CreationOptional<number>;
  declare lastError: CreationOptional<string | null>;
  declare sentAt: CreationOptional<Date | null>;
  declare courseId: CreationOptional<number | null>;
  declare kind: CreationOptional<string | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    OutboxMessage.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        key: { type: DataTypes.STRING(200), allowNull: false, unique: true },
        to: { type: DataTypes.STRING(254), allowNull: false },
        subject: { type: DataTypes.STRING(300), allowNull: false },
        text: { type: DataTypes.TEXT, allowNull: false },
        html: { type: DataTypes.TEXT, allowNull: true },
        state: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'queued' },
        attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        lastError: { type: DataTypes.TEXT, allowNull: true },
        sentAt: { type: DataTypes.DATE, allowNull: true },
        courseId: { type: DataTypes.INTEGER, allowNull: true },
        kind: { type: DataTypes.STRING(40), allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'outbox', modelName: 'OutboxMessage' },
    );
  }
}
