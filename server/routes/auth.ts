import { Router, type Request, type Response, type NextFunction, type RequestHandler } from 'express';
import type passport from 'passport';
import type { Sequelize } from 'sequelize';
import { changePasswordBody, signInBody, type MeResponse } from '../../shared/api.js';
import { HttpError, unauthenticated } from '../errors.js';
import { currentUser, requireSignedIn, SIGN_IN_REFUSED } from '../middleware/auth.js';
import { parseBody } from '../middleware/validate.js';
import { changePassword, toUserSummary } from '../services/users.js';
import type { Mailer } from '../services/mail.js';
import type { User } from '../models/index.js';

export interface AuthRouterDeps {
  passport: passport.PassportStatic;
  sequelize: Sequelize;
  mailer: Mailer;
  signInLimiter: RequestHandler;
  sessionCookieName: string;
  /** A CSRF token for the request's current session (sets the CSRF cookie too). */
  csrfToken: (req: Request, res: Response) => string;
}

export function authRouter({ passport, sequelize, mailer, signInLimiter, sessionCookieName, csrfToken }: AuthRouterDeps): Router {
  const router = Router();

  router.post(
    '/sign-in',
    (req, _res, next) => {
      req.body = parseBody(signInBody, req.body);
      next();
    },
    signInLimiter,
    (req: Request, res: Response, next: NextFunction) => {
      passport.authenticate('local', (err: unknown, user: User | false) => {
        if (err) return next(err);
        if (!user) return next(new HttpError(401, 'unauthenticated', SIGN_IN_REFUSED));
        // passport 0.7: req.login regenerates the session (a new session id) before storing the user.
        req.login(user, (loginErr) => {
          if (loginErr) return next(loginErr);
          // The old token belonged to the old session: hand over the new session's token.
          res.set('x-csrf-token', csrfToken(req, res));
          const body: MeResponse = { user: toUserSummary(user) };
          res.json(body);
        });
      })(req, res, next);
    },
  );

  router.post('/sign-out', (req, res, next) => {
    const finish = () => {
      res.clearCookie(sessionCookieName, { path: '/' });
      res.status(204).end();
    };
    if (!req.session) return finish();
    req.logout((logoutErr) => {
      if (logoutErr) return next(logoutErr);
      req.session.destroy((destroyErr) => (destroyErr ? next(destroyErr) : finish()));
    });
  });

  router.get('/me', (req, res) => {
    if (!req.user) throw unauthenticated('You are not signed in');
    const body: MeResponse = { user: toUserSummary(req.user) };
    res.json(body);
  });

  router.post('/password', requireSignedIn, async (req, res) => {
    const { currentPassword, newPassword } = parseBody(changePasswordBody, req.body);
    await changePassword(sequelize, mailer, currentUser(req), currentPassword, newPassword, req.sessionID);
    res.status(204).end();
  });

  return router;
}
