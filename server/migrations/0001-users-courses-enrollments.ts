import { DataTypes, type QueryInterface } from 'sequelize';
import type { MigrationParams } from 'umzug';

type Ctx = MigrationParams<QueryInterface>;

export async function up({ context: qi }: Ctx): Promise<void> {
  await qi.sequelize.transaction(async (transaction) => {
    await qi.createTable(
      'users',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(254), allowNull: false },
        displayName: { type: DataTypes.STRING(120), allowNull: false },
        passwordHash: { type: DataTypes.STRING(100), allowNull: false },
        canTeach: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        createdAt: { type: DataTypes.DATE, allowNull: false },
        updatedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { transaction },
    );
    // One account per e-mail address whatever its case.
    await qi.sequelize.query('CREATE UNIQUE INDEX users_email_lower_unique ON users (lower(email))', { transaction });

    await qi.createTable(
      'courses',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        title: { type: DataTypes.STRING(200), allowNull: false },
        code: { type: DataTypes.STRING(20), allowNull: false },
        term: { type: DataTypes.STRING(40), allowNull: false },
        joinCode: { type: DataTypes.STRING(40), allowNull: true, unique: true },
        createdById: {
          type: DataTypes.INTEGER,
          allowNull: true,
          references: { model: 'users', key: 'id' },
          onDelete: 'SET NULL',
          onUpdate: 'CASCADE',
        },
        createdAt: { type: DataTypes.DATE, allowNull: false },
        updatedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { transaction },
    );

    await qi.createTable(
      'enrollments',
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        userId: {
          type: DataTypes.INTEGER,
          allowNull: false,
          references: { model: 'users', key: 'id' },
          onDelete: 'CASCADE',
          onUpdate: 'CASCADE',
        },
        courseId: {
          type: DataTypes.INTEGER,
          allowNull: false,
          references: { model: 'courses', key: 'id' },
          onDelete: 'CASCADE',
          onUpdate: 'CASCADE',
        },
        role: { type: DataTypes.ENUM('instructor', 'teaching_assistant', 'student'), allowNull: false },
        createdAt: { type: DataTypes.DATE, allowNull: false },
        updatedAt: { type: DataTypes.DATE, allowNull: false },
      },
      { transaction },
    );
    await qi.addIndex('enrollments', ['userId', 'courseId'], {
      unique: true,
      name: 'enrollments_user_course_unique',
      transaction,
    });
    await qi.addIndex('enrollments', ['courseId'], { name: 'enrollments_course', transaction });
  });
}

export async function down({ context: qi }: Ctx): Promise<void> {
  await qi.dropTable('enrollments');
  await qi.dropTable('courses');
  await qi.dropTable('users');
  await qi.sequelize.query('DROP TYPE IF EXISTS "enum_enrollments_role"');
}
