import { Router, type RequestHandler } from 'express';
import type { Sequelize } from 'sequelize';
import {
  createCourseBody,
  joinCodeBody,
  joinCourseBody,
  type CourseDetail,
  type CourseListResponse,
  type Enrollment as EnrollmentDto,
  type MemberListResponse,
} from '../../shared/api.js';
import { notFound } from '../errors.js';
import { currentUser, requireCourseMember, requireCourseRole, requireSignedIn, staffRoles } from '../middleware/auth.js';
import { parseBody } from '../middleware/validate.js';
import { Course } from '../models/index.js';
import {
  changeJoinCode,
  courseDetail,
  createCourse,
  joinWithCode,
  listCourses,
  listMembers,
  toEnrollmentDto,
} from '../services/courses.js';

export function coursesRouter({
  sequelize,
  joinLimiter,
  onJoined,
}: {
  sequelize: Sequelize;
  joinLimiter: RequestHandler;
  onJoined?: (courseId: number, userId: number) => Promise<void>;
}): Router {
  const router = Router();

  router.get('/', requireSignedIn, async (req, res) => {
    const body: CourseListResponse = { courses: await listCourses(currentUser(req).id) };
    res.json(body);
  });

  router.post('/', requireSignedIn, async (req, res) => {
    const input = parseBody(createCourseBody, req.body);
    const body: CourseDetail = await createCourse(sequelize, currentUser(req), input);
    res.status(201).json(body);
  });

  // Before /:courseId so "join" is never read as an id.
  router.post('/join', requireSignedIn, joinLimiter, async (req, res) => {
    const { code } = parseBody(joinCourseBody, req.body);
    const { detail, created } = await joinWithCode(currentUser(req), code);
    if (created && detail.role === 'student' && onJoined) await onJoined(detail.id, currentUser(req).id);
    res.status(created ? 201 : 200).json(detail);
  });

  router.get('/:courseId', requireCourseMember, async (req, res) => {
    const course = await Course.findByPk(req.courseId!);
    if (!course) throw notFound('This course no longer exists');
    const body: CourseDetail = await courseDetail(course, req.enrollment!.role);
    res.json(body);
  });

  router.get('/:courseId/members', requireCourseRole(...staffRoles), async (req, res) => {
    const body: MemberListResponse = { members: await listMembers(req.courseId!) };
    res.json(body);
  });

  router.get('/:courseId/enrollment', requireCourseMember, (req, res) => {
    const body: EnrollmentDto = toEnrollmentDto(req.enrollment!);
    res.json(body);
  });

  router.post('/:courseId/join-code', requireCourseRole('instructor'), async (req, res) => {
    const { action } = parseBody(joinCodeBody, req.body);
    const body: CourseDetail = await changeJoinCode(req.courseId!, action, currentUser(req).id);
    res.json(body);
  });

  return router;
}
