import { createHmac } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import express, { type Express, type RequestHandler } from 'express';
import helmet from 'helmet';
import session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import cookieParser from 'cookie-parser';
import { doubleCsrf } from 'csrf-csrf';
import { rateLimit, ipKeyGenerator } from 'express-rate-limit';
import pg from 'pg';
import pino, { type Logger } from 'pino';
import type { Sequelize } from 'sequelize';
import type { ApiError } from '../shared/errors.js';
import type { CsrfTokenResponse } from './types.js';
import { initModels } from './models/index.js';
import { createPassport } from './middleware/auth.js';
import { apiNotFound, errorHandler } from './middleware/errors.js';
import { createMailTransport, type MailTransport } from './mail/transport.js';
import { Mailer, publicUrlFromEnv } from './services/mail.js';
import { authRouter } from './routes/auth.js';
import { usersRouter } from './routes/users.js';
import { coursesRouter } from './routes/courses.js';
import { devMailRouter } from './routes/dev-mail.js';
import { datasetsRouter } from './routes/datasets.js';
import { assignmentsRouter } from './routes/assignments.js';
import { assignmentSubmissionsRouter, courseGradingRouter } from './routes/submissions.js';
import { accountRouter, invitationLinkRouter } from './routes/accounts.js';
import { courseAdminRouter } from './routes/course-admin.js';
import { createEnginePool, type Engine } from './jobs/engine-pool.js';
import type { JobQueue } from './jobs/queue.js';
import { accountRequestSink } from './jobs/accounts.js';

export interface RateLimitOptions {
  /** Attempts allowed per window. */
  limit: number;
  windowMs: number;
}

export interface CreateAppOptions {
  sequelize: Sequelize;
  sessionSecret: string;
  mailTransport?: MailTransport;
  logger?: Logger;
  /** Failed sign-ins per IP and e-mail address (default 10 per 15 minutes). */
  signInRateLimit?: RateLimitOptions;
  /** Join-code attempts per IP and account (default 30 per 15 minutes). */
  joinRateLimit?: RateLimitOptions;
  /** Sign-up and password-reset requests per IP and e-mail address, every one counted (default 5 per 15 minutes). */
  mailRequestRateLimit?: RateLimitOptions;
  /** Where links in e-mail point (default MODEWRIGHT_PUBLIC_URL, else http://127.0.0.1:MODEWRIGHT_PORT). */
  publicUrl?: string;
  /** Cookies with the Secure flag (default: MODEWRIGHT_SECURE_COOKIES=1). */
  secureCookies?: boolean;
  /** GET /api/dev/mail (default: on unless MODEWRIGHT_DEV_MAIL=0). */
  devMail?: boolean;
  /** Base URL of the mail catcher's HTTP side (default MAIL_CATCHER_URL or http://127.0.0.1:5482). */
  mailCatcherUrl?: string;
  /** Built client to serve with an SPA fallback (e.g. dist/client); omitted in API tests. */
  clientDir?: string;
  /** Largest JSON body accepted (default 100kb). */
  jsonLimit?: string;
  /** Where jobs are sent (reference spectra, variants for late joiners); null: nothing is queued (some API tests). */
  queue?: JobQueue | null;
  /** The engine pool for downloads (default: a pool of its own, closed with the app). */
  engine?: Engine;
}

export type ModewrightApp = Express & {
  /** Close what the app opened itself (the session store's pool). */
  close(): Promise<void>;
};

export const SESSION_COOKIE = 'modewright.sid';

export function defaultLogger(): Logger {
  return pino({
    level: process.env.LOG_LEVEL ?? (process.env.NODE_ENV === 'test' ? 'silent' : 'info'),
    redact: ['req.headers.cookie', 'req.headers["x-csrf-token"]', 'password', 'currentPassword', 'newPassword'],
  });
}

function jsonError(code: ApiError['error']['code'], message: string): ApiError {
  return { error: { code, message } };
}

function limiter(opts: RateLimitOptions, key: (req: express.Request) => string, message: string, countAll = false): RequestHandler {
  return rateLimit({
    windowMs: opts.windowMs,
    limit: opts.limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests: !countAll,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '0.0.0.0')}|${key(req)}`,
    handler: (_req, res) => {
      res.status(429).json(jsonError('rate-limited', message));
    },
  });
}

/** Logs each request once it is answered: method, path (no query string), status, time. Never bodies or cookies. */
function requestLogger(logger: Logger): RequestHandler {
  return (req, res, next) => {
    const started = process.hrtime.bigint();
    res.on('finish', () => {
      const ms = Number(process.hrtime.bigint() - started) / 1e6;
      logger.info({ method: req.method, path: req.path, status: res.statusCode, ms: Math.round(ms * 10) / 10 }, 'request');
    });
    next();
  };
}

export function createApp(options: CreateAppOptions): ModewrightApp {
  const { sequelize, sessionSecret } = options;
  if (!sessionSecret || sessionSecret.length < 16) throw new Error('sessionSecret must have at least 16 characters');
  initModels(sequelize);
  const logger = options.logger ?? defaultLogger();
  const secure = options.secureCookies ?? process.env.MODEWRIGHT_SECURE_COOKIES === '1';
  const devMail = options.devMail ?? process.env.MODEWRIGHT_DEV_MAIL !== '0';
  const catcherUrl = options.mailCatcherUrl ?? process.env.MAIL_CATCHER_URL ?? 'http://127.0.0.1:5482';
  const queue = options.queue ?? null;
  // Mail goes through the outbox; with no queue (some tests) it is delivered at once through this transport.
  const mailer = new Mailer({ queue, transport: options.mailTransport ?? createMailTransport(), logger, publicUrl: options.publicUrl ?? publicUrlFromEnv() });

  const app = express() as ModewrightApp;
  app.disable('x-powered-by');
  app.set('query parser', 'simple');

  app.use(requestLogger(logger));
  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: true,
        directives: {
          defaultSrc: ["'self'"],
          scriptSrc: ["'self'"],
          // KaTeX writes inline style attributes.
          styleSrc: ["'self'", "'unsafe-inline'"],
          fontSrc: ["'self'", 'data:'],
          imgSrc: ["'self'", 'data:', 'blob:'],
          connectSrc: ["'self'"],
          objectSrc: ["'none'"],
          baseUri: ["'self'"],
          formAction: ["'self'"],
          frameAncestors: ["'none'"],
          upgradeInsecureRequests: secure ? [] : null,
        },
      },
      strictTransportSecurity: secure,
    }),
  );

  // ---- API
  const api = express.Router();
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use(express.json({ limit: options.jsonLimit ?? '100kb' }));
  api.use(cookieParser());

  const { username: user, password, host, port, database } = sequelize.config;
  const pool = new pg.Pool({ user, password: password || undefined, host, port: Number(port), database, max: 5 });
  pool.on('error', (err) => logger.error({ err: err.message }, 'session pool error'));
  const PgStore = connectPgSimple(session);
  const store = new PgStore({ pool, tableName: 'session', createTableIfMissing: false, pruneSessionInterval: 15 * 60 });

  api.use(
    session({
      name: SESSION_COOKIE,
      secret: sessionSecret,
      store,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: { httpOnly: true, sameSite: 'lax', secure, path: '/', maxAge: 7 * 24 * 3600 * 1000 },
    }),
  );
  const passport = createPassport();
  api.use(passport.initialize());
  api.use(passport.session());

  const csrfSecret = createHmac('sha256', sessionSecret).update('modewright csrf').digest('base64url');
  const { doubleCsrfProtection, generateCsrfToken } = doubleCsrf({
    getSecret: () => csrfSecret,
    // Tokens belong to one session; a new session (sign-in, sign-out) needs a new token.
    getSessionIdentifier: (req) => req.sessionID ?? '',
    cookieName: secure ? '__Host-modewright.csrf' : 'modewright.csrf',
    cookieOptions: { httpOnly: true, sameSite: 'lax', secure, path: '/' },
    getCsrfTokenFromRequest: (req) => req.get('x-csrf-token'),
    errorConfig: { statusCode: 403, code: 'EBADCSRFTOKEN', message: 'invalid csrf token' },
  });

  api.get('/csrf', (req, res) => {
    // Keep the (possibly anonymous) session so its id, which the token is bound to, lasts.
    (req.session as unknown as { csrf?: boolean }).csrf = true;
    const body: CsrfTokenResponse = { token: generateCsrfToken(req, res, { overwrite: false }) };
    res.json(body);
  });
  api.use(doubleCsrfProtection);

  const signInLimit = options.signInRateLimit ?? { limit: 10, windowMs: 15 * 60 * 1000 };
  const signInLimiter = limiter(
    signInLimit,
    (req) => String((req.body as { email?: unknown })?.email ?? ''),
    'Too many sign-in attempts for this e-mail address; wait a few minutes and try again',
  );
  const joinLimiter = limiter(
    options.joinRateLimit ?? { limit: 30, windowMs: 15 * 60 * 1000 },
    (req) => String(req.user?.id ?? ''),
    'Too many join-code attempts; wait a few minutes and try again',
  );
  const mailRequestLimiter = limiter(
    options.mailRequestRateLimit ?? { limit: 5, windowMs: 15 * 60 * 1000 },
    (req) => String((req.body as { email?: unknown })?.email ?? ''),
    'Too many requests for this e-mail address; wait a few minutes, and check the inbox (and spam folder) for the messages already sent',
    true,
  );
  // A student who joins after publishing (join code, invitation, role change) gets variants and references through a job.
  const onJoined = async (courseId: number, userId: number) => {
    if (queue) await queue.send('variants', { courseId, userId });
  };
  const csrfToken = (req: express.Request, res: express.Response) => generateCsrfToken(req, res, { overwrite: true });
  const accountRequests = accountRequestSink(queue, { sequelize, mailer, logger });

  api.use(
    '/auth',
    authRouter({
      passport,
      sequelize,
      mailer,
      signInLimiter,
      sessionCookieName: SESSION_COOKIE,
      csrfToken,
    }),
  );
  api.use('/auth', accountRouter({ sequelize, mailer, mailRequestLimiter, csrfToken, accountRequests, onJoined }));
  api.use('/invitations', invitationLinkRouter({ sequelize, mailer, mailRequestLimiter, csrfToken, accountRequests, onJoined }));
  api.use('/users', usersRouter({ mailer }));
  const engine = options.engine ?? createEnginePool();
  api.use('/courses/:courseId/datasets', datasetsRouter());
  const mailDeps = { queue, transport: options.mailTransport, logger };
  const siteUrl = options.publicUrl ?? publicUrlFromEnv();
  api.use('/courses/:courseId/assignments/:assignmentId', assignmentSubmissionsRouter({ sequelize, queue, mail: mailDeps, siteUrl }));
  api.use('/courses/:courseId/assignments', assignmentsRouter({ sequelize, queue, engine }));
  api.use('/courses/:courseId', courseGradingRouter({ sequelize, queue, mail: mailDeps, siteUrl }));
  api.use('/courses/:courseId', courseAdminRouter({ sequelize, mailer, onJoined }));
  api.use('/courses', coursesRouter({ sequelize, joinLimiter, onJoined }));
  if (devMail) api.use('/dev', devMailRouter({ catcherUrl }));
  api.use(apiNotFound);

  app.use('/api', api);

  // ---- Built client, with the single-page fallback for every other GET
  if (options.clientDir) {
    const dir = path.resolve(options.clientDir);
    const indexHtml = path.join(dir, 'index.html');
    app.use(express.static(dir, { index: false, maxAge: '1h' }));
    app.use((req, res, next) => {
      if ((req.method !== 'GET' && req.method !== 'HEAD') || req.path.startsWith('/api')) return next();
      if (!fs.existsSync(indexHtml)) {
        res.status(503).type('text/plain').send('The client is not built yet; run `npm run build`.');
        return;
      }
      res.set('Cache-Control', 'no-cache');
      res.sendFile(indexHtml);
    });
  }

  app.use(errorHandler(logger));

  app.close = async () => {
    store.close();
    await pool.end().catch(() => {});
    if (!options.engine) await engine.close().catch(() => {});
  };
  return app;
}
