import type { Sequelize } from 'sequelize';
import { User } from './user.js';
import { Course } from './course.js';
import { Enrollment } from './enrollment.js';

export { User, Course, Enrollment };

let boundTo: Sequelize | null = null;

/** Define every model on the given instance and wire the associations (idempotent per instance). */
export function initModels(sequelize: Sequelize): void {
  if (boundTo === sequelize) return;
  User.initModel(sequelize);
  Course.initModel(sequelize);
  Enrollment.initModel(sequelize);

  User.hasMany(Enrollment, { foreignKey: 'userId', as: 'enrollments', onDelete: 'CASCADE' });
  Enrollment.belongsTo(User, { foreignKey: 'userId', as: 'user', onDelete: 'CASCADE' });
  Course.hasMany(Enrollment, { foreignKey: 'courseId', as: 'enrollments', onDelete: 'CASCADE' });
  Enrollment.belongsTo(Course, { foreignKey: 'courseId', as: 'course', onDelete: 'CASCADE' });
  Course.belongsTo(User, { foreignKey: 'createdById', as: 'createdBy', onDelete: 'SET NULL' });
  User.hasMany(Course, { foreignKey: 'createdById', as: 'createdCourses', onDelete: 'SET NULL' });
  boundTo = sequelize;
}
