import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';
import type { User } from './user.js';

/** Unique index on ("createdById", lower(code), lower(term)), made by migration 0003. */
export const courseCodeTermIndex = 'courses_creator_code_term_unique';

export class Course extends Model<InferAttributes<Course>, InferCreationAttributes<Course>> {
  declare id: CreationOptional<number>;
  declare title: string;
  declare code: string;
  declare term: string;
  /** Upper case, unique; null when joining by code is disabled. */
  declare joinCode: string | null;
  declare createdById: ForeignKey<User['id']> | null;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize): void {
    Course.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        title: { type: DataTypes.STRING(200), allowNull: false },
        code: { type: DataTypes.STRING(20), allowNull: false },
        term: { type: DataTypes.STRING(40), allowNull: false },
        joinCode: { type: DataTypes.STRING(40), allowNull: true, unique: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      {
        sequelize,
        tableName: 'courses',
        modelName: 'Course',
        indexes: [
          {
            name: courseCodeTermIndex,
            unique: true,
            fields: ['createdById', sequelize.fn('lower', sequelize.col('code')), sequelize.fn('lower', sequelize.col('term'))],
          },
        ],
      },
    );
  }
}
