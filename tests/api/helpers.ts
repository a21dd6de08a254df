/**
 * API test helpers: the real PostgreSQL test database (DATABASE_URL must name a *_test
 * database), migrated, emptied and seeded with the demo data at the start of each file;
 * supertest agents that carry the session cookie and the CSRF token.
 */
import request from 'supertest';
import type { Sequelize } from 'sequelize';
import { createApp, type CreateAppOptions, type ModewrightApp } from '../../server/app.js';
import { createSequelize } from '../../server/db/sequelize.js';
import { migrate } from '../../server/db/migrate.js';
import { DEMO_PASSWORD, seedDemo } from '../../server/db/seed.js';
import { Course, User, initModels } from '../../server/models/index.js';
import { hashPassword } from '../../server/services/passwords.js';
import type { MailMessage } from '../../shared/api.js';

export { DEMO_PASSWORD };
export const SESSION_SECRET = 'test-secret-for-api-tests-only-0123456789';
export const MAIL_CATCHER_URL = process.env.MAIL_CATCHER_URL ?? 'http://127.0.0.1:5482';

process.env.BCRYPT_ROUNDS ??= '4';
process.env.SMTP_HOST ??= '127.0.0.1';
process.env.SMTP_PORT ??= '5481';

export const demo = {
  instructor: 'mara@modewright.test',
  otherInstructor: 'jonas@modewright.test',
  assistant: 'tomasz@modewright.test',
  assistant2: 'ines@modewright.test',
  student: 'priya@modewright.test',
  student2: 'mateo@modewright.test',
};

export function testDatabaseUrl(): string {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('Set DATABASE_URL to the test database (postgres://postgres@127.0.0.1:5479/modewright_test)');
  const name = new URL(url).pathname.replace(/^\//, '');
  if (!name.endsWith('_test')) throw new Error(`Refusing to empty database "${name}": API tests need a database whose name ends in _test`);
  return url;
}

export async function resetDatabase(sequelize: Sequelize): Promise<void> {
  await migrate(sequelize);
  await sequelize.query('TRUNCATE TABLE enrollments, courses, users, "session" RESTART IDENTITY CASCADE');
  // Jobs left by an earlier file would point at ids that RESTART IDENTITY hands out again.
  await sequelize.query(`DO $$ BEGIN IF EXISTS (SELECT 1 FROM information_schema.schemata WHERE schema_name = 'pgboss') THEN EXECUTE 'DELETE FROM pgboss.job'; END IF; END $$`);
  await seedDemo(sequelize, { assignments: false });
}

export interface TestContext {
  sequelize: Sequelize;
  app: ModewrightApp;
  /** Another app on the same database, e.g. with a small rate limit. */
  makeApp(extra?: Partial<CreateAppOptions>): ModewrightApp;
  close(): Promise<void>;
}

/** Call in beforeAll: a migrated, emptied and seeded test database and an app over it. */
export async function setupApi(extra: Partial<CreateAppOptions> = {}): Promise<TestContext> {
  const sequelize = createSequelize(testDatabaseUrl());
  initModels(sequelize);
  await resetDatabase(sequelize);
  const apps: ModewrightApp[] = [];
  const makeApp = (more: Partial<CreateAppOptions> = {}) => {
    const app = createApp({ sequelize, sessionSecret: SESSION_SECRET, mailCatcherUrl: MAIL_CATCHER_URL, ...extra, ...more });
    apps.push(app);
    return app;
  };
  const app = makeApp();
  return {
    sequelize,
    app,
    makeApp,
    async close() {
      for (const a of apps) await a.close();
      await sequelize.close();
    },
  };
}

/** A supertest agent (cookies kept) with the CSRF token of its current session. */
export class Client {
  readonly agent: ReturnType<typeof request.agent>;
  csrf = '';
  constructor(app: ModewrightApp) {
    this.agent = request.agent(app);
  }

  async refreshCsrf(): Promise<string> {
    const res = await this.agent.get('/api/csrf').expect(200);
    this.csrf = (res.body as { token: string }).token;
    return this.csrf;
  }

  get(path: string) {
    return this.agent.get(path);
  }
  post(path: string, body?: object) {
    const req = this.agent.post(path).set('x-csrf-token', this.csrf);
    return body === undefined ? req : req.send(body);
  }

  /** Sign in (fetching a token first) and fetch the new session's token; returns the response. */
  async signIn(email: string, password = DEMO_PASSWORD) {
    await this.refreshCsrf();
    const res = await this.post('/api/auth/sign-in', { email, password });
    await this.refreshCsrf();
    return res;
  }
}

export async function anonymous(app: ModewrightApp): Promise<Client> {
  const c = new Client(app);
  await c.refreshCsrf();
  return c;
}

export async function signedIn(app: ModewrightApp, email: string, password = DEMO_PASSWORD): Promise<Client> {
  const c = new Client(app);
  const res = await c.signIn(email, password);
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return c;
}

/** The value of a cookie set by a response, or undefined. */
export function setCookie(res: { headers: Record<string, unknown> }, name: string): string | undefined {
  const raw = res.headers['set-cookie'];
  const list = Array.isArray(raw) ? (raw as string[]) : typeof raw === 'string' ? [raw] : [];
  const hit = list.find((c) => c.startsWith(`${name}=`));
  return hit ? hit.slice(name.length + 1).split(';')[0] : undefined;
}

export function rawSetCookies(res: { headers: Record<string, unknown> }): string[] {
  const raw = res.headers['set-cookie'];
  return Array.isArray(raw) ? (raw as string[]) : typeof raw === 'string' ? [raw] : [];
}

export async function courseIdByCode(code: string): Promise<number> {
  const c = await Course.findOne({ where: { code } });
  if (!c) throw new Error(`no course ${code}`);
  return c.id;
}

export async function userIdByEmail(email: string): Promise<number> {
  const u = await User.findOne({ where: { email } });
  if (!u) throw new Error(`no user ${email}`);
  return u.id;
}

/** A new account in no course (the seed has none). */
export async function createOutsider(local: string, password = DEMO_PASSWORD): Promise<string> {
  const email = `${local}@outside.test`;
  await User.create({ email, displayName: `Outsider ${local}`, passwordHash: await hashPassword(password) });
  return email;
}

/** Every message the mail catcher holds (read over its HTTP side, as a person's inbox would be). */
export async function catcherMessages(): Promise<MailMessage[]> {
  const res = await fetch(`${MAIL_CATCHER_URL}/messages`);
  if (!res.ok) throw new Error(`mail catcher answered ${res.status}`);
  return ((await res.json()) as { messages: MailMessage[] }).messages;
}

/** Messages to `to` that arrived after the ids in `before`, waiting briefly for delivery. */
export async function newMailTo(to: string, before: Set<string>, tries = 40): Promise<MailMessage[]> {
  for (let i = 0; i < tries; i++) {
    const found = (await catcherMessages()).filter((m) => !before.has(m.id) && m.to.includes(to));
    if (found.length) return found;
    await new Promise((r) => setTimeout(r, 100));
  }
  return [];
}

export async function mailIds(): Promise<Set<string>> {
  return new Set((await catcherMessages()).map((m) => m.id));
}
