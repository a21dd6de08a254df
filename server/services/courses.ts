import { UniqueConstraintError, type Sequelize } from 'sequelize';
import type { CourseDetail, CourseSummary, CreateCourseBody, Enrollment as EnrollmentDto, Member, Role } from '../../shared/api.js';
import { Course, Enrollment, User } from '../models/index.js';
import { courseCodeTermIndex } from '../models/course.js';
import { conflict, forbidden, notFound } from '../errors.js';
import { normaliseJoinCode, randomJoinCode } from './join-codes.js';
import { audit } from './audit.js';

async function memberCounts(courseIds: number[]): Promise<Map<number, number>> {
  const counts = new Map<number, number>();
  if (courseIds.length === 0) return counts;
  const rows = (await Enrollment.count({ where: { courseId: courseIds }, group: ['courseId'] })) as unknown as {
    courseId: number;
    count: number | string;
  }[];
  for (const r of rows) counts.set(Number(r.courseId), Number(r.count));
  return counts;
}

function summary(course: Course, role: Role, memberCount: number): CourseSummary {
  return { id: course.id, title: course.title, code: course.code, term: course.term, role, memberCount };
}

export async function courseDetail(course: Course, role: Role): Promise<CourseDetail> {
  const counts = await memberCounts([course.id]);
  const detail: CourseDetail = {
    ...summary(course, role, counts.get(course.id) ?? 0),
    createdAt: course.createdAt.toISOString(),
  };
  if (role === 'instructor') detail.joinCode = course.joinCode;
  return detail;
}

/** Courses the user is enrolled in, newest first. */
export async function listCourses(userId: number): Promise<CourseSummary[]> {
  const enrollments = await Enrollment.findAll({
    where: { userId },
    include: [{ model: Course, as: 'course', required: true }],
    order: [[{ model: Course, as: 'course' }, 'createdAt', 'DESC'], ['courseId', 'DESC']],
  });
  const counts = await memberCounts(enrollments.map((e) => e.courseId));
  return enrollments.map((e) => {
    const course = (e as Enrollment & { course: Course }).course;
    return summary(course, e.role, counts.get(course.id) ?? 0);
  });
}

export function findEnrollment(userId: number, courseId: number): Promise<Enrollment | null> {
  return Enrollment.findOne({ where: { userId, courseId } });
}

export const toEnrollmentDto = (e: Enrollment): EnrollmentDto => ({
  courseId: e.courseId,
  userId: e.userId,
  role: e.role,
  joinedAt: e.createdAt.toISOString(),
});

const roleOrder: Record<Role, number> = { instructor: 0, teaching_assistant: 1, student: 2 };

export async function listMembers(courseId: number): Promise<Member[]> {
  const rows = await Enrollment.findAll({
    where: { courseId },
    include: [{ model: User, as: 'user', required: true }],
  });
  return rows
    .map((e) => {
      const user = (e as Enrollment & { user: User }).user;
      return {
        userId: user.id,
        displayName: user.displayName,
        email: user.email,
        role: e.role,
        joinedAt: e.createdAt.toISOString(),
      };
    })
    .sort((a, b) => roleOrder[a.role] - roleOrder[b.role] || a.displayName.localeCompare(b.displayName));
}

/** A fresh join code no other course holds (retries on the rare collision). */
async function withFreshJoinCode<T>(attempt: (code: string) => Promise<T>): Promise<T> {
  for (let i = 0; ; i++) {
    try {
      return await attempt(randomJoinCode());
    } catch (err) {
      if (err instanceof UniqueConstraintError && i < 20) continue;
      throw err;
    }
  }
}

const violates = (err: unknown, index: string): boolean =>
  err instanceof UniqueConstraintError && (err.parent as { constraint?: string } | undefined)?.constraint === index;

export async function createCourse(sequelize: Sequelize, creator: User, body: CreateCourseBody): Promise<CourseDetail> {
  if (!creator.canTeach) throw forbidden('Your account is not allowed to create courses; ask an instructor to grant teaching');
  const course = await withFreshJoinCode((joinCode) =>
    sequelize.transaction(async (transaction) => {
      try {
        const c = await Course.create({ ...body, joinCode, createdById: creator.id }, { transaction });
        await Enrollment.create({ userId: creator.id, courseId: c.id, role: 'instructor' }, { transaction });
        return c;
      } catch (err) {
        // Code and term are unique per instructor, whatever the case (migration 0003).
        if (violates(err, courseCodeTermIndex)) {
          const message = `You already teach ${body.code} in ${body.term}`;
          throw conflict(`${message}; give this course another code or term`, [{ path: 'code', message }]);
        }
        throw err;
      }
    }),
  );
  return courseDetail(course, 'instructor');
}

export async function changeJoinCode(courseId: number, action: 'rotate' | 'disable', actorId: number | null = null): Promise<CourseDetail> {
  const sequelize = Course.sequelize!;
  const course = await withFreshJoinCode((fresh) =>
    sequelize.transaction(async (transaction) => {
      const c = await Course.findByPk(courseId, { transaction, lock: transaction.LOCK.UPDATE });
      if (!c) throw notFound('This course no longer exists');
      const old = c.joinCode;
      if (action === 'disable') {
        if (old === null) return c;
        c.joinCode = null;
      } else {
        if (fresh === old) throw new UniqueConstraintError({});
        c.joinCode = fresh;
      }
      await c.save({ transaction });
      await audit(transaction, {
        courseId,
        actorId,
        action: action === 'disable' ? 'join-code.disabled' : 'join-code.rotated',
        subjectType: 'course',
        subjectId: courseId,
        before: { joinCode: old },
        after: { joinCode: c.joinCode },
      });
      return c;
    }),
  );
  return courseDetail(course, 'instructor');
}

/**
 * An instructor changes a member's role. Nobody changes their own role (another instructor
 * must), and a course always keeps at least one instructor. Returns the member and whether
 * they became a student (then variants are due).
 */
export async function changeRole(actor: User, courseId: number, userId: number, role: Role): Promise<{ member: Member; becameStudent: boolean }> {
  const sequelize = Course.sequelize!;
  return sequelize.transaction(async (transaction) => {
    if (userId === actor.id) throw conflict('You cannot change your own role; ask another instructor of the course');
    const enrollment = await Enrollment.findOne({
      where: { userId, courseId },
      include: [{ model: User, as: 'user', required: true }],
      transaction,
      lock: { level: transaction.LOCK.UPDATE, of: Enrollment },
    });
    if (!enrollment) throw notFound('This person is not a member of this course');
    const user = (enrollment as Enrollment & { user: User }).user;
    const before = enrollment.role;
    if (before !== role) {
      if (before === 'instructor') {
        const instructors = await Enrollment.count({ where: { courseId, role: 'instructor' }, transaction });
        if (instructors <= 1) throw conflict('A course needs at least one instructor; make someone else instructor first');
      }
      enrollment.role = role;
      await enrollment.save({ transaction });
      await audit(transaction, {
        courseId,
        actorId: actor.id,
        action: 'role.changed',
        subjectType: 'enrollment',
        subjectId: userId,
        before: { userId, email: user.email, role: before },
        after: { userId, email: user.email, role },
      });
    }
    return {
      member: { userId: user.id, displayName: user.displayName, email: user.email, role: enrollment.role, joinedAt: enrollment.createdAt.toISOString() },
      becameStudent: before !== role && role === 'student',
    };
  });
}

/** Join as a student with a course's join code; someone already enrolled keeps their role. */
export async function joinWithCode(user: User, code: string): Promise<{ detail: CourseDetail; created: boolean }> {
  const course = await Course.findOne({ where: { joinCode: normaliseJoinCode(code) } });
  if (!course) throw notFound('No course has that join code; check it with your instructor');
  const [enrollment, created] = await Enrollment.findOrCreate({
    where: { userId: user.id, courseId: course.id },
    defaults: { userId: user.id, courseId: course.id, role: 'student' },
  });
  return { detail: await courseDetail(course, enrollment.role), created };
}
