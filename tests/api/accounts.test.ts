// Sign-up, password reset and course invitations by e-mail link, against the real PostgreSQL
// test database, a real pg-boss queue with the mail job, and the local mail catcher (every
// link is read back from the catcher's HTTP side, as from an inbox). Expectations: the contract
// in shared/accounts.ts, and common web-security practice for one-time links (single use,
// expiry, only a hash stored, no answer that tells whether an address has an account):
// common practice, no source.
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Op, QueryTypes } from 'sequelize';
import { createEnginePool, type Engine } from '../../server/jobs/engine-pool.js';
import { startQueue, type JobQueue } from '../../server/jobs/queue.js';
import { startWorkers } from '../../server/jobs/handlers.js';
import { AuditEvent, Enrollment, OutboxMessage, Token, User } from '../../server/models/index.js';
import type { ModewrightApp } from '../../server/app.js';
import { Mailer } from '../../server/services/mail.js';
import {
  Client,
  DEMO_PASSWORD,
  anonymous,
  courseIdByCode,
  demo,
  catcherMessages,
  mailIds,
  newMailTo,
  setupApi,
  signedIn,
  testDatabaseUrl,
  userIdByEmail,
  type TestContext,
} from './helpers.js';

let ctx: TestContext;
let app: ModewrightApp;
let queue: JobQueue;
let engine: Engine;
let stopWorkers: () => Promise<void>;
let studio: number;
const run = Date.now().toString(36);
const addr = (local: string) => `${local}-${run}@inbox.test`;
const publicUrl = 'http://site.test:5480';

/**
 * The site's own Mailer for the workers' account job. When armed with an address, the next
 * password-reset message to it makes that run fail once its transaction has committed, before the
 * delivery job is queued: what a worker that dies right after its commit leaves behind.
 */
class FailOnceAfterCommit extends Mailer {
  armedFor: string | null = null;
  override passwordReset(...args: Parameters<Mailer['passwordReset']>) {
    const [transaction, , to] = args;
    if (this.armedFor === to) {
      this.armedFor = null;
      transaction.afterCommit(() => {
        throw new Error('the worker stopped after its commit (test)');
      });
    }
    return super.passwordReset(...args);
  }
}
let workerMailer: FailOnceAfterCommit;

beforeAll(async () => {
  ctx = await setupApi();
  queue = await startQueue({ connectionString: testDatabaseUrl(), retryLimit: 2, retryDelaySeconds: 1, pollingIntervalSeconds: 0.2 });
  engine = createEnginePool();
  workerMailer = new FailOnceAfterCommit({ queue, publicUrl });
  stopWorkers = await startWorkers({ sequelize: ctx.sequelize, queue, engine, publicUrl, mailer: workerMailer });
  app = ctx.makeApp({ queue, engine, publicUrl });
  studio = await courseIdByCode('DDS-301');
});
afterAll(async () => {
  await stopWorkers?.();
  await queue?.stop();
  await engine?.close();
  await ctx?.close();
});

/** The one new message to `to` since `before`, and the token of its link (path checked). */
async function linkFrom(to: string, before: Set<string>, path: string): Promise<{ token: string; text: string; subject: string }> {
  const found = await newMailTo(to, before, 100);
  expect(found, `one message to ${to}`).toHaveLength(1);
  const text = found[0]!.text;
  const m = new RegExp(`http://site\\.test:5480${path}\\?token=([A-Za-z0-9_-]{43})`).exec(text);
  expect(m, `a ${path} link in: ${text}`).not.toBeNull();
  return { token: m![1]!, text, subject: found[0]!.subject };
}

const sha256 = (s: string) => createHash('sha256').update(s).digest('hex');

interface AccountJob {
  id: string;
  state: string;
  retryCount: number;
  kind: string;
}

/** The 'account' jobs queued for an address since `since`. */
function accountJobs(email: string, since: Date): Promise<AccountJob[]> {
  return ctx.sequelize.query<AccountJob>(
    `SELECT id::text AS id, state::text AS state, retry_count AS "retryCount", data->>'kind' AS kind
       FROM pgboss.job WHERE name = 'account' AND data->>'email' = :email AND created_on >= :since ORDER BY created_on`,
    { replacements: { email, since }, type: QueryTypes.SELECT },
  );
}

/** Waits until every 'account' job for these addresses since `since` is completed (the jobs run in this process's workers). */
async function accountJobsDone(emails: string[], since: Date): Promise<void> {
  for (let i = 0; i < 200; i++) {
    const jobs = (await Promise.all(emails.map((e) => accountJobs(e, since)))).flat();
    if (jobs.length >= emails.length && jobs.every((j) => j.state === 'completed')) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`account jobs for ${emails.join(', ')} did not complete`);
}

/** Waits until no message to `to` is queued or being sent, then returns what the catcher holds for it since `before`. */
async function settledMailTo(to: string, before: Set<string>): Promise<{ subject: string; text: string }[]> {
  for (let i = 0; i < 200; i++) {
    const pending = await OutboxMessage.count({ where: { to, state: ['queued', 'sending'] } });
    if (pending === 0) break;
    await new Promise((r) => setTimeout(r, 100));
  }
  return (await catcherMessages()).filter((m) => !before.has(m.id) && m.to.includes(to));
}

/**
 * A response's headers without the date and cookies, and with the rate limiter's partition key masked:
 * that key is a hash of the client address and the e-mail address as sent (the limiter's key), so it
 * differs between any two addresses whether or not they have accounts.
 */
function comparableHeaders(res: { headers: Record<string, unknown> }): Record<string, unknown> {
  const { date: _date, 'set-cookie': _cookies, ...rest } = res.headers;
  const policy = rest['ratelimit-policy'];
  if (typeof policy === 'string') rest['ratelimit-policy'] = policy.replace(/; pk=:[^:]*:/, '; pk=(masked)');
  return rest;
}

async function expire(token: string) {
  await Token.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { hash: sha256(token) } });
}

describe('sign-up', () => {
  it('creates the account only when the link is opened, signs in, and the link works once', async () => {
    const email = addr('ada');
    const before = await mailIds();
    const c = await anonymous(app);
    const res = await c.post('/api/auth/sign-up', { displayName: 'Ada Quillfeather', email: email.toUpperCase(), password: 'a long passphrase' }).expect(202);
    expect(res.body.message).toMatch(/confirmation link/);
    // Nothing to sign in with yet.
    expect(await User.count({ where: { email } })).toBe(0);
    const refused = await c.post('/api/auth/sign-in', { email, password: 'a long passphrase' });
    expect(refused.status).toBe(401);

    const { token, subject } = await linkFrom(email, before, '/confirm');
    expect(subject).toBe('Confirm your Modewright account');
    // Only the hash is stored, never the token itself.
    const row = await Token.findOne({ where: { hash: sha256(token) } });
    expect(row?.purpose).toBe('sign-up');
    const leaked = await ctx.sequelize.query(`SELECT count(*)::int AS n FROM tokens WHERE hash = :t OR data::text LIKE :like`, {
      replacements: { t: token, like: `%${token}%` },
      type: QueryTypes.SELECT,
    });
    expect(leaked).toEqual([{ n: 0 }]);

    const status = await c.post('/api/auth/token-status', { token, purpose: 'sign-up' }).expect(200);
    expect(status.body).toMatchObject({ state: 'valid', email });

    const confirm = await c.post('/api/auth/sign-up/confirm', { token }).expect(201);
    expect(confirm.body.user).toMatchObject({ email, displayName: 'Ada Quillfeather', canTeach: false });
    c.csrf = String(confirm.headers['x-csrf-token']);
    const me = await c.get('/api/auth/me').expect(200);
    expect(me.body.user.email).toBe(email);
    // The stored sign-up data (the password hash) is cleared once used.
    await row!.reload();
    expect(row!.usedAt).not.toBeNull();
    expect(row!.data).toBeNull();

    const again = await (await anonymous(app)).post('/api/auth/sign-up/confirm', { token });
    expect(again.status).toBe(409);
    expect(again.body.error.message).toMatch(/used already/);
    expect(await User.count({ where: { email } })).toBe(1);

    const other = new Client(app);
    expect((await other.signIn(email, 'a long passphrase')).status).toBe(200);
  });

  it('answers an address with an account exactly like a new one after the same work (one job each), and tells the owner instead', async () => {
    const before = await mailIds();
    const since = new Date();
    const fresh = addr('fresh');
    // A fresh app: its rate-limit counts start at zero for both addresses.
    const c = await anonymous(ctx.makeApp({ queue, engine, publicUrl }));
    const newRes = await c.post('/api/auth/sign-up', { displayName: 'New Person', email: fresh, password: 'a long passphrase' }).expect(202);
    const taken = await c.post('/api/auth/sign-up', { displayName: 'Impostor', email: demo.student, password: 'a long passphrase' }).expect(202);
    expect(taken.body).toEqual(newRes.body);
    expect(comparableHeaders(taken)).toEqual(comparableHeaders(newRes));
    // The route queued exactly one job for each, and carried no password, only its hash.
    expect((await accountJobs(fresh, since)).map((j) => j.kind)).toEqual(['sign-up']);
    expect((await accountJobs(demo.student, since)).map((j) => j.kind)).toEqual(['sign-up']);
    const leaked = await ctx.sequelize.query(`SELECT count(*)::int AS n FROM pgboss.job WHERE name = 'account' AND data::text LIKE '%a long passphrase%'`, {
      type: QueryTypes.SELECT,
    });
    expect(leaked).toEqual([{ n: 0 }]);
    await accountJobsDone([fresh, demo.student], since);

    const mail = await settledMailTo(demo.student, before);
    expect(mail).toHaveLength(1);
    expect(mail[0]!.subject).toBe('You already have a Modewright account');
    expect(mail[0]!.text).not.toMatch(/token=/);
    expect((await settledMailTo(fresh, before)).map((m) => m.subject)).toEqual(['Confirm your Modewright account']);
    // The demo account is unchanged: the old password still works.
    expect((await new Client(app).signIn(demo.student, DEMO_PASSWORD)).status).toBe(200);
  });

  it('refuses an expired link, and a second sign-up withdraws the first link', async () => {
    const email = addr('late');
    let before = await mailIds();
    const c = await anonymous(app);
    await c.post('/api/auth/sign-up', { displayName: 'Late Comer', email, password: 'a long passphrase' }).expect(202);
    const first = await linkFrom(email, before, '/confirm');
    before = await mailIds();
    await c.post('/api/auth/sign-up', { displayName: 'Late Comer', email, password: 'another passphrase' }).expect(202);
    const second = await linkFrom(email, before, '/confirm');
    const withdrawn = await c.post('/api/auth/sign-up/confirm', { token: first.token });
    expect(withdrawn.status).toBe(409);
    expect(withdrawn.body.error.message).toMatch(/newer confirmation link/);

    await expire(second.token);
    expect((await c.post('/api/auth/token-status', { token: second.token, purpose: 'sign-up' })).body).toEqual({ state: 'expired' });
    const expired = await c.post('/api/auth/sign-up/confirm', { token: second.token });
    expect(expired.status).toBe(409);
    expect(expired.body.error.message).toMatch(/expired/);
    expect(await User.count({ where: { email } })).toBe(0);
  });

  it('refuses unknown and malformed tokens with a located error, and bad fields by name', async () => {
    const c = await anonymous(app);
    const unknown = await c.post('/api/auth/sign-up/confirm', { token: 'A'.repeat(43) });
    expect(unknown.status).toBe(404);
    const short = await c.post('/api/auth/sign-up/confirm', { token: 'abc' });
    expect(short.status).toBe(400);
    expect(short.body.error.details).toEqual([{ path: 'token', message: expect.stringMatching(/not complete/) }]);
    const bad = await c.post('/api/auth/sign-up', { displayName: 'X', email: 'not-an-address', password: 'short' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['displayName', 'email', 'password']);
  });
});

describe('password reset', () => {
  it('answers a known and an unknown address alike after the same work (one job each); only the account gets one mail', async () => {
    const before = await mailIds();
    const since = new Date();
    const nobody = addr('nobody');
    const c = await anonymous(ctx.makeApp({ queue, engine, publicUrl }));
    const unknown = await c.post('/api/auth/password-reset', { email: nobody }).expect(202);
    const known = await c.post('/api/auth/password-reset', { email: demo.student2 }).expect(202);
    expect(known.body).toEqual(unknown.body);
    expect(comparableHeaders(known)).toEqual(comparableHeaders(unknown));
    expect((await accountJobs(nobody, since)).map((j) => j.kind)).toEqual(['password-reset']);
    expect((await accountJobs(demo.student2, since)).map((j) => j.kind)).toEqual(['password-reset']);
    await accountJobsDone([nobody, demo.student2], since);

    const mail = await settledMailTo(demo.student2, before);
    expect(mail.map((m) => m.subject)).toEqual(['Set a new Modewright password']);
    expect(mail[0]!.text).toMatch(/http:\/\/site\.test:5480\/reset-password\?token=[A-Za-z0-9_-]{43}/);
    expect(await settledMailTo(nobody, before)).toEqual([]);
    expect(await Token.count({ where: { email: nobody } })).toBe(0);
    expect(await OutboxMessage.count({ where: { to: nobody } })).toBe(0);
  });

  it('sends nothing to an address whose sign-up was never confirmed (no account yet)', async () => {
    const email = addr('unconfirmed');
    const c = await anonymous(app);
    const since = new Date();
    await c.post('/api/auth/sign-up', { displayName: 'Not Yet', email, password: 'a long passphrase' }).expect(202);
    await accountJobsDone([email], since);
    expect((await settledMailTo(email, new Set())).map((m) => m.subject)).toEqual(['Confirm your Modewright account']);
    const before = await mailIds();
    const later = new Date();
    await c.post('/api/auth/password-reset', { email }).expect(202);
    await accountJobsDone([email], later);
    expect(await settledMailTo(email, before)).toEqual([]);
    expect(await Token.count({ where: { email, purpose: 'password-reset' } })).toBe(0);
  });

  it('a job that fails after its commit is retried and sends once; the link in that one mail works', async () => {
    const email = demo.assistant;
    const before = await mailIds();
    const since = new Date();
    workerMailer.armedFor = email;
    await (await anonymous(app)).post('/api/auth/password-reset', { email }).expect(202);
    await accountJobsDone([email], since);
    const [job] = await accountJobs(email, since);
    expect(job).toMatchObject({ state: 'completed', retryCount: 1 });
    expect(workerMailer.armedFor).toBeNull();

    const mail = await settledMailTo(email, before);
    expect(mail.map((m) => m.subject)).toEqual(['Set a new Modewright password']);
    expect(await OutboxMessage.count({ where: { to: email, kind: 'password-reset', createdAt: { [Op.gte]: since } } })).toBe(1);
    const token = /reset-password\?token=([A-Za-z0-9_-]{43})/.exec(mail[0]!.text)![1]!;
    // The retry neither withdrew this link nor made another.
    expect((await (await anonymous(app)).post('/api/auth/token-status', { token, purpose: 'password-reset' })).body.state).toBe('valid');
    expect(await Token.count({ where: { email, purpose: 'password-reset', createdAt: { [Op.gte]: since } } })).toBe(1);
  });

  it('sets the password once, ends every session, tells the owner; an expired link does nothing', async () => {
    const email = demo.assistant2;
    const session = await signedIn(app, email);
    let before = await mailIds();
    const c = await anonymous(app);
    await c.post('/api/auth/password-reset', { email }).expect(202);
    const { token } = await linkFrom(email, before, '/reset-password');
    expect((await c.post('/api/auth/token-status', { token, purpose: 'password-reset' })).body.state).toBe('valid');

    before = await mailIds();
    await c.post('/api/auth/password-reset/complete', { token, newPassword: 'brand new passphrase' }).expect(204);
    const notice = await newMailTo(email, before, 100);
    expect(notice.map((m) => m.subject)).toEqual(['Your Modewright password was changed']);
    await session.get('/api/auth/me').expect(401);
    expect((await new Client(app).signIn(email, DEMO_PASSWORD)).status).toBe(401);
    expect((await new Client(app).signIn(email, 'brand new passphrase')).status).toBe(200);

    const twice = await c.post('/api/auth/password-reset/complete', { token, newPassword: 'yet another passphrase' });
    expect(twice.status).toBe(409);
    expect((await new Client(app).signIn(email, 'brand new passphrase')).status).toBe(200);

    before = await mailIds();
    await c.post('/api/auth/password-reset', { email }).expect(202);
    const late = await linkFrom(email, before, '/reset-password');
    await expire(late.token);
    const expired = await c.post('/api/auth/password-reset/complete', { token: late.token, newPassword: 'too late passphrase' });
    expect(expired.status).toBe(409);
    expect(expired.body.error.message).toMatch(/expired/);
    expect((await new Client(app).signIn(email, 'brand new passphrase')).status).toBe(200);
    // Put the demo password back for the other tests.
    await User.update({ passwordHash: (await User.findOne({ where: { email: demo.assistant } }))!.passwordHash }, { where: { email } });
  });

  it('limits how many requests one address gets, counting every request', async () => {
    const limited = ctx.makeApp({ queue, engine, mailRequestRateLimit: { limit: 2, windowMs: 60_000 } });
    const c = await anonymous(limited);
    const email = addr('flood');
    await c.post('/api/auth/password-reset', { email }).expect(202);
    await c.post('/api/auth/password-reset', { email }).expect(202);
    const third = await c.post('/api/auth/password-reset', { email });
    expect(third.status).toBe(429);
    expect(third.body.error.code).toBe('rate-limited');
  });
});

describe('invitations', () => {
  it('invites new addresses as students: the link creates the account, enrolls it and asks for variants', async () => {
    const mara = await signedIn(app, demo.instructor);
    const newcomer = addr('newcomer');
    const startedAt = new Date();
    const before = await mailIds();
    const res = await mara.post(`/api/courses/${studio}/invitations`, { emails: [newcomer, demo.student], role: 'student' }).expect(201);
    expect(res.body.skipped).toEqual([{ email: demo.student, reason: 'already in the course as a student' }]);
    expect(res.body.invitations).toEqual([expect.objectContaining({ email: newcomer, role: 'student', state: 'pending', invitedBy: 'Mara Lindqvist' })]);
    const { token, subject } = await linkFrom(newcomer, before, '/invitation');
    expect(subject).toBe('Invitation to DDS-301 on Modewright');

    const c = await anonymous(app);
    const lookup = await c.post('/api/invitations/lookup', { token }).expect(200);
    expect(lookup.body).toMatchObject({ state: 'valid', email: newcomer, role: 'student', accountExists: false, invitedBy: 'Mara Lindqvist' });
    expect(lookup.body.course).toMatchObject({ id: studio, code: 'DDS-301' });

    const missing = await c.post('/api/invitations/accept', { token });
    expect(missing.status).toBe(400);
    expect(missing.body.error.details.map((d: { path: string }) => d.path)).toEqual(['displayName', 'password']);

    const accepted = await c.post('/api/invitations/accept', { token, displayName: 'Nel Newcomer', password: 'a long passphrase' }).expect(201);
    expect(accepted.body).toEqual({ courseId: studio, role: 'student', accountCreated: true });
    c.csrf = String(accepted.headers['x-csrf-token']);
    const courses = await c.get('/api/courses').expect(200);
    expect(courses.body.courses.map((x: { id: number; role: string }) => [x.id, x.role])).toEqual([[studio, 'student']]);

    // The same hook as the join-code route: a 'variants' job for this student and course.
    const uid = await userIdByEmail(newcomer);
    const jobs = await ctx.sequelize.query<{ n: number }>(
      `SELECT count(*)::int AS n FROM pgboss.job WHERE name = 'variants' AND (data->>'userId')::int = :uid AND (data->>'courseId')::int = :cid AND created_on >= :startedAt`,
      { replacements: { uid, cid: studio, startedAt }, type: QueryTypes.SELECT },
    );
    expect(jobs[0]!.n).toBe(1);

    const again = await (await anonymous(app)).post('/api/invitations/accept', { token, displayName: 'Someone Else', password: 'a long passphrase' });
    expect(again.status).toBe(409);
    expect((await c.post('/api/invitations/lookup', { token })).body).toEqual({ state: 'used' });

    const list = await mara.get(`/api/courses/${studio}/invitations`).expect(200);
    const mine = list.body.invitations.find((i: { email: string }) => i.email === newcomer);
    expect(mine).toMatchObject({ state: 'accepted', mail: { state: 'sent', lastError: null, attempts: 1 } });
    expect(mine.acceptedAt).not.toBeNull();
  });

  it('promotes an existing student to teaching assistant only when signed in with the invited address', async () => {
    const mara = await signedIn(app, demo.instructor);
    const before = await mailIds();
    // mateo is a student of the course; invited as teaching assistant.
    await mara.post(`/api/courses/${studio}/invitations`, { emails: [demo.student2], role: 'teaching_assistant' }).expect(201);
    const { token } = await linkFrom(demo.student2, before, '/invitation');

    const signedOut = await anonymous(app);
    expect((await signedOut.post('/api/invitations/lookup', { token })).body.accountExists).toBe(true);
    const needsSignIn = await signedOut.post('/api/invitations/accept', { token, displayName: 'X Y', password: 'a long passphrase' });
    expect(needsSignIn.status).toBe(409);
    expect(needsSignIn.body.error.message).toMatch(/sign in/);

    const wrong = await signedIn(app, demo.student);
    const wrongRes = await wrong.post('/api/invitations/accept', { token });
    expect(wrongRes.status).toBe(409);
    expect(wrongRes.body.error.message).toContain(`sent to ${demo.student2}`);

    const mateo = await signedIn(app, demo.student2);
    const ok = await mateo.post('/api/invitations/accept', { token }).expect(200);
    expect(ok.body).toEqual({ courseId: studio, role: 'teaching_assistant', accountCreated: false });
    const uid = await userIdByEmail(demo.student2);
    expect((await Enrollment.findOne({ where: { userId: uid, courseId: studio } }))!.role).toBe('teaching_assistant');
    const events = await AuditEvent.findAll({ where: { courseId: studio, action: 'role.changed', subjectId: String(uid) } });
    expect(events.map((e) => [e.before, e.after])).toEqual([
      [
        { userId: uid, email: demo.student2, role: 'student' },
        { userId: uid, email: demo.student2, role: 'teaching_assistant', through: expect.stringMatching(/^invitation \d+$/) },
      ],
    ]);
  });

  it('a newer invitation withdraws the older; an instructor can withdraw one; an expired one is refused', async () => {
    const mara = await signedIn(app, demo.instructor);
    const email = addr('twice');
    let before = await mailIds();
    await mara.post(`/api/courses/${studio}/invitations`, { emails: [email], role: 'student' }).expect(201);
    const first = await linkFrom(email, before, '/invitation');
    before = await mailIds();
    const second = await mara.post(`/api/courses/${studio}/invitations`, { emails: [email], role: 'student' }).expect(201);
    const secondLink = await linkFrom(email, before, '/invitation');
    expect((await (await anonymous(app)).post('/api/invitations/lookup', { token: first.token })).body).toEqual({ state: 'revoked' });

    const id = second.body.invitations[0].id;
    const revoked = await mara.post(`/api/courses/${studio}/invitations/${id}/revoke`).expect(200);
    expect(revoked.body.state).toBe('revoked');
    const refused = await (await anonymous(app)).post('/api/invitations/accept', { token: secondLink.token, displayName: 'Twice Invited', password: 'a long passphrase' });
    expect(refused.status).toBe(409);
    expect(refused.body.error.message).toMatch(/withdrawn/);

    before = await mailIds();
    await mara.post(`/api/courses/${studio}/invitations`, { emails: [email], role: 'student' }).expect(201);
    const third = await linkFrom(email, before, '/invitation');
    await expire(third.token);
    const expired = await (await anonymous(app)).post('/api/invitations/accept', { token: third.token, displayName: 'Twice Invited', password: 'a long passphrase' });
    expect(expired.status).toBe(409);
    expect(expired.body.error.message).toMatch(/expired/);
    expect(await User.count({ where: { email } })).toBe(0);
  });

  it('only the course instructor may invite, list or withdraw', async () => {
    const tomasz = await signedIn(app, demo.assistant);
    expect((await tomasz.post(`/api/courses/${studio}/invitations`, { emails: [addr('x')], role: 'student' })).status).toBe(403);
    expect((await tomasz.get(`/api/courses/${studio}/invitations`)).status).toBe(403);
    const jonas = await signedIn(app, demo.otherInstructor);
    expect((await jonas.get(`/api/courses/${studio}/invitations`)).status).toBe(403);
    const mara = await signedIn(app, demo.instructor);
    const bad = await mara.post(`/api/courses/${studio}/invitations`, { emails: ['fine@inbox.test', 'broken'], role: 'instructor' });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details.map((d: { path: string }) => d.path).sort()).toEqual(['emails.1', 'role']);
  });
});

describe('roles, join codes and the audit log', () => {
  it('records role changes and join-code changes with who, before and after; filters work', async () => {
    const mara = await signedIn(app, demo.instructor);
    const maraId = await userIdByEmail(demo.instructor);
    const priyaId = await userIdByEmail(demo.student);
    const since = new Date().toISOString();
    const oldCode = (await mara.get(`/api/courses/${studio}`).expect(200)).body.joinCode;
    const rotated = await mara.post(`/api/courses/${studio}/join-code`, { action: 'rotate' }).expect(200);
    await mara.post(`/api/courses/${studio}/members/${priyaId}/role`, { role: 'teaching_assistant' }).expect(200);
    await mara.post(`/api/courses/${studio}/members/${priyaId}/role`, { role: 'student' }).expect(200);
    expect((await mara.post(`/api/courses/${studio}/members/${maraId}/role`, { role: 'student' })).status).toBe(409);

    const log = await mara.get(`/api/courses/${studio}/audit?since=${encodeURIComponent(since)}`).expect(200);
    expect(log.body.events.map((e: { action: string }) => e.action)).toEqual(['role.changed', 'role.changed', 'join-code.rotated']);
    const [back, up, code] = log.body.events;
    expect(code).toMatchObject({ actor: { id: maraId, displayName: 'Mara Lindqvist' }, before: { joinCode: oldCode }, after: { joinCode: rotated.body.joinCode } });
    expect(up).toMatchObject({ subjectType: 'enrollment', subjectId: String(priyaId), before: { role: 'student' }, after: { role: 'teaching_assistant' } });
    expect(back).toMatchObject({ before: { role: 'teaching_assistant' }, after: { role: 'student' } });
    expect(log.body.actions).toEqual(expect.arrayContaining(['invitation.sent', 'invitation.accepted', 'role.changed', 'join-code.rotated']));

    const onlyCodes = await mara.get(`/api/courses/${studio}/audit?action=join-code.rotated`).expect(200);
    expect(onlyCodes.body.events.every((e: { action: string }) => e.action === 'join-code.rotated')).toBe(true);
    const byMara = await mara.get(`/api/courses/${studio}/audit?actor=${maraId}&limit=2`).expect(200);
    expect(byMara.body.events).toHaveLength(2);
    expect(byMara.body.nextBefore).not.toBeNull();
    const older = await mara.get(`/api/courses/${studio}/audit?actor=${maraId}&limit=2&before=${byMara.body.nextBefore}`).expect(200);
    expect(Number(older.body.events[0].id)).toBeLessThan(Number(byMara.body.events[1].id));
    expect((await mara.get(`/api/courses/${studio}/audit?since=yesterday`)).status).toBe(400);

    const tomasz = await signedIn(app, demo.assistant);
    expect((await tomasz.get(`/api/courses/${studio}/audit`)).status).toBe(403);
  });

  it('shows the course outbox to instructors: every invitation message and its state', async () => {
    const mara = await signedIn(app, demo.instructor);
    const all = await mara.get(`/api/courses/${studio}/outbox?state=all`).expect(200);
    expect(all.body.messages.length).toBeGreaterThan(0);
    expect(all.body.messages.every((m: { kind: string }) => m.kind === 'invitation')).toBe(true);
    expect(all.body.counts.sent).toBe(await OutboxMessage.count({ where: { courseId: studio, state: 'sent' } }));
    expect((await mara.get(`/api/courses/${studio}/outbox?state=nonsense`)).status).toBe(400);
    expect((await (await signedIn(app, demo.student)).get(`/api/courses/${studio}/outbox`)).status).toBe(403);
  });
});
