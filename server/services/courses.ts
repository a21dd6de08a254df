import { UniqueConstraintError, type Sequelize } from 'sequelize';
import type { CourseDetail, CourseSummary, CreateCourseBody, Enrollment as EnrollmentDto, Member, Role } from '../../shared/api.js';
import { Course, Enrollment, User } from '../models/index.js';
import { courseCodeTermIndex } from '../models/course.js';
import { conflict, forbidden, notFound } from '../errors.js';
import { normaliseJoinCode, randomJoinCode } from './join-codes.js';

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

export async function changeJoinCode(courseId: number, action: 'rotate' | 'disable'): Promise<CourseDetail> {
  const course = await Course.findByPk(courseId);
  if (!course) throw notFound('This course no longer exists');
  if (action === 'disable') {
    course.joinCode = null;
    await course.save();
  } else {
    const old = course.joinCode;
    await withFreshJoinCode(async (code) => {
      if (code === old) throw new UniqueConstraintError({});
      course.joinCode = code;
      return course.save();
    });
  }
  return courseDetail(course, 'instructor');
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
