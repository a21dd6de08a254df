import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { Role } from '../../shared/api.js';

export const tokenPurposes = ['sign-up', 'invitation', 'password-reset'] as const;
export type TokenPurpose = (typeof tokenPurposes)[number];

/** A single-use, expiring link sent by e-mail; only the sha256 of the secret is stored (migration 0005). */
export class Token extends Model<InferAttributes<Token>, InferCreationAttributes<Token>> {
  declare id: CreationOptional<number>;
  declare purpose: TokenPurpose;
  declare hash: string;
  declare email: string;
  declare userId: CreationOptional<number | null>;
  declare courseId: CreationOptional<number | null>;
  declare role: CreationOptional<Role | null>;
  declare createdById: CreationOptional<number | null>;
  /** Sign-up: { displayName, passwordHash } until used (then cleared). */
  declare data: CreationOptional<Record<string, unknown> | null>;
  declare expiresAt: Date;
  declare usedAt: CreationOptional<Date | null>;
  declare usedById: CreationOptional<number | null>;
  declare revokedAt: CreationOptional<Date | null>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Token.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        purpose: { type: DataTypes.STRING(20), allowNull: false },
        hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
        email: {
          type: DataTypes.STRING(254),
          allowNull: false,
          set(value: string) {
            this.setDataValue('email', String(value).trim().toLowerCase());
          },
        },
        userId: { type: DataTypes.INTEGER, allowNull: true },
        courseId: { type: DataTypes.INTEGER, allowNull: true },
        role: { type: DataTypes.STRING(20), allowNull: true },
        createdById: { type: DataTypes.INTEGER, allowNull: true },
        data: { type: DataTypes.JSONB, allowNull: true },
        expiresAt: { type: DataTypes.DATE, allowNull: false },
        usedAt: { type: DataTypes.DATE, allowNull: true },
        usedById: { type: DataTypes.INTEGER, allowNull: true },
        revokedAt: { type: DataTypes.DATE, allowNull: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'tokens', modelName: 'Token' },
    );
  }
}
