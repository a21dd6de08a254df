import { Router, type Request, type RequestHandler, type Response } from 'express';
import type { Sequelize } from 'sequelize';
import type { MeResponse } from '../../shared/api.js';
import {
  acceptInvitationBody,
  passwordResetBody,
  passwordResetRequestBody,
  signUpBody,
  tokenBody,
  tokenStatusBody,
  type AcceptedResponse,
  type AcceptInvitationResponse,
  type InvitationLookup,
  type TokenStatus,
} from '../../shared/accounts.js';
import type { User } from '../models/index.js';
import { parseBody } from '../middleware/validate.js';
import {
  acceptPasswordReset,
  acceptSignUp,
  completePasswordReset,
  confirmSignUp,
  RESET_ACCEPTED,
  SIGN_UP_ACCEPTED,
  type AccountRequestSink,
} from '../services/accounts.js';
import { acceptInvitation, lookupInvitation } from '../services/invitations.js';
import type { Mailer } from '../services/mail.js';
import { findToken, stateOf } from '../services/tokens.js';
import { toUserSummary } from '../services/users.js';

export interface AccountRouterDeps {
  sequelize: Sequelize;
  mailer: Mailer;
  /** Counts every request (all answers look alike), keyed by address: limits mail sent to one inbox. */
  mailRequestLimiter: RequestHandler;
  csrfToken: (req: Request, res: Response) => string;
  /** Sign-up and password-reset requests go here (the 'account' job), so every address gets the same answer after the same work. */
  accountRequests: AccountRequestSink;
  onJoined?: (courseId: number, userId: number) => Promise<void>;
}

/** Sign the user in on this request (a new session id), then answer with the new session's CSRF token. */
function signInAndAnswer(req: Request, res: Response, user: User, status: number, body: object, csrfToken: AccountRouterDeps['csrfToken']): Promise<void> {
  return new Promise((resolve, reject) => {
    req.login(user, (err) => {
      if (err) return reject(err as Error);
      res.set('x-csrf-token', csrfToken(req, res));
      res.status(status).json(body);
      resolve();
    });
  });
}

/** Mounted at /api/auth beside the sign-in routes: sign-up, confirmation, password reset, link status. */
export function accountRouter({ sequelize, mailer, mailRequestLimiter, csrfToken, accountRequests }: AccountRouterDeps): Router {
  const router = Router();
  const parseFirst =
    (schema: Parameters<typeof parseBody>[0]): RequestHandler =>
    (req, _res, next) => {
      req.body = parseBody(schema, req.body);
      next();
    };

  router.post('/sign-up', parseFirst(signUpBody), mailRequestLimiter, async (req, res) => {
    await acceptSignUp(accountRequests, signUpBody.parse(req.body));
    const body: AcceptedResponse = { message: SIGN_UP_ACCEPTED };
    res.status(202).json(body);
  });

  router.post('/sign-up/confirm', async (req, res) => {
    const { token } = parseBody(tokenBody, req.body);
    const user = await confirmSignUp(sequelize, token);
    const body: MeResponse = { user: toUserSummary(user) };
    await signInAndAnswer(req, res, user, 201, body, csrfToken);
  });

  router.post('/password-reset', parseFirst(passwordResetRequestBody), mailRequestLimiter, async (req, res) => {
    await acceptPasswordReset(accountRequests, passwordResetRequestBody.parse(req.body).email);
    const body: AcceptedResponse = { message: RESET_ACCEPTED };
    res.status(202).json(body);
  });

  router.post('/password-reset/complete', async (req, res) => {
    const { token, newPassword } = parseBody(passwordResetBody, req.body);
    const user = await completePasswordReset(sequelize, mailer, token, newPassword);
    // The session of this request belonged to nobody or to someone now signed out everywhere.
    if (req.user && req.user.id === user.id) await new Promise<void>((resolve) => req.logout(() => resolve()));
    res.status(204).end();
  });

  router.post('/token-status', async (req, res) => {
    const { token, purpose } = parseBody(tokenStatusBody, req.body);
    const row = await findToken(token, purpose);
    const state = stateOf(row);
    const body: TokenStatus = state === 'valid' ? { state, email: row!.email, expiresAt: row!.expiresAt.toISOString() } : { state };
    res.json(body);
  });

  return router;
}

/** Mounted at /api/invitations: what a link offers, and accepting it (signed in or not). */
export function invitationLinkRouter({ sequelize, csrfToken, onJoined }: AccountRouterDeps): Router {
  const router = Router();

  router.post('/lookup', async (req, res) => {
    const { token } = parseBody(tokenBody, req.body);
    const body: InvitationLookup = await lookupInvitation(token);
    res.json(body);
  });

  router.post('/accept', async (req, res) => {
    const input = parseBody(acceptInvitationBody, req.body);
    const result = await acceptInvitation(sequelize, input.token, req.user ?? null, input);
    if (result.joinedAsStudent && onJoined) await onJoined(result.courseId, result.user.id);
    const body: AcceptInvitationResponse = { courseId: result.courseId, role: result.role, accountCreated: result.accountCreated };
    if (result.accountCreated) await signInAndAnswer(req, res, result.user, 201, body, csrfToken);
    else res.json(body);
  });

  return router;
}
