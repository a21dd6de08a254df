import type { NextFunction, Request, RequestHandler, Response } from 'express';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { Role } from '../../shared/api.js';
import { Enrollment, User as UserModel } from '../models/index.js';
import { badRequest, forbidden, unauthenticated } from '../errors.js';
import { authenticate } from '../services/users.js';
import { findEnrollment } from '../services/courses.js';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends UserModel {}
    interface Request {
      /** Set by requireCourseRole: the caller's enrollment in :courseId. */
      enrollment?: Enrollment;
      /** Set by requireCourseRole: :courseId as a number. */
      courseId?: number;
    }
  }
}

/** One message for an unknown e-mail and a wrong password alike. */
export const SIGN_IN_REFUSED = 'E-mail or password is not right';

/** A passport instance of our own (not the shared singleton), so each app is self-contained. */
export function createPassport(): passport.PassportStatic {
  const p = new passport.Passport() as unknown as passport.PassportStatic;
  p.use(
    new LocalStrategy({ usernameField: 'email', passwordField: 'password', session: true }, (email, password, done) => {
      authenticate(email, password).then(
        (user) => done(null, user ?? false, user ? undefined : { message: SIGN_IN_REFUSED }),
        (err) => done(err),
      );
    }),
  );
  p.serializeUser((user, done) => done(null, user.id));
  p.deserializeUser((id: unknown, done) => {
    UserModel.findByPk(Number(id)).then(
      (user) => done(null, user ?? false),
      (err) => done(err),
    );
  });
  return p;
}

export const requireSignedIn: RequestHandler = (req, _res, next) => {
  if (!req.user) return next(unauthenticated());
  next();
};

/** The signed-in user (after requireSignedIn). */
export function currentUser(req: Request): UserModel {
  if (!req.user) throw unauthenticated();
  return req.user;
}

/** Parse a positive integer route parameter or answer 400 naming it. */
export function idParam(req: Request, name: string): number {
  const raw = req.params[name];
  const n = Number(raw);
  if (typeof raw !== 'string' || !/^[1-9][0-9]{0,9}$/.test(raw) || !Number.isSafeInteger(n) || n > 2_147_483_647) {
    throw badRequest(`${name} must be a positive whole number`, [{ path: name, message: 'Expected a positive whole number' }]);
  }
  return n;
}

/**
 * Guard for /courses/:courseId/... routes. 401 when signed out; 403 when the caller is not
 * enrolled in the course or holds a role not listed. A course that does not exist also answers
 * 403 (as for any non-member), so the answer never tells whether a course id exists.
 */
export function requireCourseRole(...allowed: Role[]): RequestHandler {
  return async (req: Request, _res: Response, next: NextFunction) => {
    if (!req.user) return next(unauthenticated());
    const courseId = idParam(req, 'courseId');
    const enrollment = await findEnrollment(req.user.id, courseId);
    if (!enrollment) return next(forbidden('You are not a member of this course'));
    if (allowed.length > 0 && !allowed.includes(enrollment.role)) {
      return next(forbidden('Your role in this course does not allow this'));
    }
    req.enrollment = enrollment;
    req.courseId = courseId;
    next();
  };
}

/** Any member of the course. */
export const requireCourseMember = requireCourseRole();
export const staffRoles: Role[] = ['instructor', 'teaching_assistant'];
