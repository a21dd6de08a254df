import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  /** Stored lowercased; the table also has a unique index on lower(email). */
  declare email: string;
  declare displayName: string;
  declare passwordHash: string;
  declare canTeach: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    User.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        email: {
          type: DataTypes.STRING(254),
          allowNull: false,
          set(value: string) {
            this.setDataValue('email', String(value).trim().toLowerCase());
          },
        },
        displayName: { type: DataTypes.STRING(120), allowNull: false },
        passwordHash: { type: DataTypes.STRING(100), allowNull: false },
        canTeach: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'users', modelName: 'User' },
    );
  }
}
