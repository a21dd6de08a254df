import type { Sequelize } from 'sequelize';
import { User } from './user.js';
import { Course } from './course.js';
import { Enrollment } from './enrollment.js';
import { Dataset } from './dataset.js';
import { Assignment, AssignmentVersion } from './assignment.js';
import { Variant } from './variant.js';
import { ReferenceSpectrum } from './reference-spectrum.js';
import { OutboxMessage } from './outbox.js';
import { Token } from './token.js';
import { AuditEvent } from './audit-event.js';
import { Extension, Flag, Regrade, Review, Score, Submission } from './submission.js';

export { User, Course, Enrollment, Dataset, Assignment, AssignmentVersion, Variant, ReferenceSpectrum, OutboxMessage, Token, AuditEvent, Submission, Score, Flag, Review, Extension, Regrade };

let boundTo: Sequelize | null = null;

/** Define every model on the given instance and wire the associations (idempotent per instance). */
export function initModels(sequelize: Sequelize): void {
  if (boundTo === sequelize) return;
  User.initModel(sequelize);
  Course.initModel(sequelize);
  Enrollment.initModel(sequelize);
  Dataset.initModel(sequelize);
  Assignment.initModel(sequelize);
  AssignmentVersion.initModel(sequelize);
  Variant.initModel(sequelize);
  ReferenceSpectrum.initModel(sequelize);
  OutboxMessage.initModel(sequelize);
  Token.initModel(sequelize);
  AuditEvent.initModel(sequelize);
  for (const m of [Submission, Score, Flag, Review, Extension, Regrade]) m.initModel(sequelize);

  User.hasMany(Enrollment, { foreignKey: 'userId', as: 'enrollments', onDelete: 'CASCADE' });
  Enrollment.belongsTo(User, { foreignKey: 'userId', as: 'user', onDelete: 'CASCADE' });
  Course.hasMany(Enrollment, { foreignKey: 'courseId', as: 'enrollments', onDelete: 'CASCADE' });
  Enrollment.belongsTo(Course, { foreignKey: 'courseId', as: 'course', onDelete: 'CASCADE' });
  Course.belongsTo(User, { foreignKey: 'createdById', as: 'createdBy', onDelete: 'SET NULL' });
  User.hasMany(Course, { foreignKey: 'createdById', as: 'createdCourses', onDelete: 'SET NULL' });
  Course.hasMany(Dataset, { foreignKey: 'courseId', as: 'datasets', onDelete: 'CASCADE' });
  Course.hasMany(Assignment, { foreignKey: 'courseId', as: 'assignments', onDelete: 'CASCADE' });
  Assignment.belongsTo(Course, { foreignKey: 'courseId', as: 'course' });
  Assignment.hasMany(AssignmentVersion, { foreignKey: 'assignmentId', as: 'versions', onDelete: 'CASCADE' });
  AssignmentVersion.belongsTo(Assignment, { foreignKey: 'assignmentId', as: 'assignment' });
  AssignmentVersion.belongsTo(User, { foreignKey: 'createdById', as: 'author' });
  AssignmentVersion.belongsTo(Dataset, { foreignKey: 'datasetId', as: 'dataset' });
  Assignment.hasMany(Variant, { foreignKey: 'assignmentId', as: 'variants', onDelete: 'CASCADE' });
  Variant.belongsTo(Assignment, { foreignKey: 'assignmentId', as: 'assignment' });
  Variant.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  Variant.belongsTo(Dataset, { foreignKey: 'datasetId', as: 'dataset' });
  Variant.hasMany(ReferenceSpectrum, { foreignKey: 'variantId', as: 'references', onDelete: 'CASCADE' });
  ReferenceSpectrum.belongsTo(Variant, { foreignKey: 'variantId', as: 'variant' });
  ReferenceSpectrum.belongsTo(AssignmentVersion, { foreignKey: 'assignmentVersionId', as: 'assignmentVersion' });
  AuditEvent.belongsTo(User, { foreignKey: 'actorId', as: 'actor' });
  Token.belongsTo(User, { foreignKey: 'usedById', as: 'usedBy' });
  Assignment.hasMany(Submission, { foreignKey: 'assignmentId', as: 'submissions', onDelete: 'CASCADE' });
  Submission.belongsTo(Assignment, { foreignKey: 'assignmentId', as: 'assignment' });
  Submission.belongsTo(User, { foreignKey: 'userId', as: 'user' });
  Submission.belongsTo(Variant, { foreignKey: 'variantId', as: 'variant' });
  Submission.hasMany(Score, { foreignKey: 'submissionId', as: 'scores', onDelete: 'CASCADE' });
  Submission.hasMany(Flag, { foreignKey: 'submissionId', as: 'flags', onDelete: 'CASCADE' });
  Submission.hasMany(Review, { foreignKey: 'submissionId', as: 'reviews', onDelete: 'CASCADE' });
  Score.belongsTo(Submission, { foreignKey: 'submissionId', as: 'submission' });
  Score.belongsTo(User, { foreignKey: 'authorId', as: 'author' });
  Flag.belongsTo(Submission, { foreignKey: 'submissionId', as: 'submission' });
  Flag.belongsTo(User, { foreignKey: 'otherUserId', as: 'otherUser' });
  Review.belongsTo(Submission, { foreignKey: 'submissionId', as: 'submission' });
  Review.belongsTo(User, { foreignKey: 'decidedById', as: 'decidedBy' });
  boundTo = sequelize;
}
