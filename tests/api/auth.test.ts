// API behaviour of sign-in, sign-out, sessions, CSRF, rate limits, validation and password
// changes, against the real PostgreSQL test database and the local mail catcher.
// Source for the expectations: the HTTP contract in shared/api.ts and shared/errors.ts, and
// common web-security practice (fact of the trade: common practice, no source).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import { SESSION_COOKIE } from '../../server/app.js';
import {
  Client,
  DEMO_PASSWORD,
  anonymous,
  demo,
  mailIds,
  newMailTo,
  rawSetCookies,
  setCookie,
  setupApi,
  signedIn,
  type TestContext,
} from './helpers.js';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await setupApi();
});
afterAll(async () => {
  await ctx?.close();
});

describe('sign-in and sign-out', () => {
  it('signs in with the demo password (e-mail in any case) and reports the user', async () => {
    const c = new Client(ctx.app);
    const res = await c.signIn('  MARA@Modewright.TEST ');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({
      user: { id: expect.any(Number), email: demo.instructor, displayName: 'Mara Lindqvist', canTeach: true },
    });
    expect(res.body.user).not.toHaveProperty('passwordHash');
    const me = await c.get('/api/auth/me').expect(200);
    expect(me.body.user.email).toBe(demo.instructor);
  });

  it('answers 401 on /me when signed out', async () => {
    const c = await anonymous(ctx.app);
    const res = await c.get('/api/auth/me').expect(401);
    expect(res.body.error.code).toBe('unauthenticated');
  });

  it('gives the same 401 answer for a wrong password and an unknown e-mail', async () => {
    const c = await anonymous(ctx.app);
    const wrong = await c.post('/api/auth/sign-in', { email: demo.student, password: 'not-the-password' });
    const unknown = await c.post('/api/auth/sign-in', { email: 'nobody@modewright.test', password: 'not-the-password' });
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    expect(wrong.body).toEqual(unknown.body);
    expect(wrong.body).toEqual({ error: { code: 'unauthenticated', message: 'E-mail or password is not right' } });
    await c.get('/api/auth/me').expect(401);
  });

  it('sign-out ends the session: the cookie is cleared and the old session no longer works', async () => {
    const c = new Client(ctx.app);
    const signInRes = await c.signIn(demo.student);
    const signedInCookie = `${SESSION_COOKIE}=${setCookie(signInRes, SESSION_COOKIE)}`;
    expect(signedInCookie).toMatch(/^modewright\.sid=s%3A/);
    const me = await c.get('/api/auth/me').expect(200);
    expect(me.body.user.email).toBe(demo.student);
    // The cookie alone (another client) is signed in before the sign-out...
    await new Client(ctx.app).agent.get('/api/auth/me').set('Cookie', signedInCookie).expect(200);
    const res = await c.post('/api/auth/sign-out').expect(204);
    const cleared = rawSetCookies(res).find((s) => s.startsWith(`${SESSION_COOKIE}=`));
    expect(cleared).toBeDefined();
    expect(cleared).toMatch(/Expires=Thu, 01 Jan 1970/);
    await c.get('/api/auth/me').expect(401);
    // ...and replaying it after the sign-out gets nowhere: the session row is gone.
    const replay = new Client(ctx.app);
    await replay.agent.get('/api/auth/me').set('Cookie', signedInCookie).expect(401);
  });

  it('gives a new session id at sign-in (no session fixation)', async () => {
    const c = new Client(ctx.app);
    const first = await c.agent.get('/api/csrf').expect(200);
    const before = setCookie(first, SESSION_COOKIE);
    expect(before).toBeDefined();
    c.csrf = first.body.token;
    const res = await c.post('/api/auth/sign-in', { email: demo.student, password: DEMO_PASSWORD }).expect(200);
    const after = setCookie(res, SESSION_COOKIE);
    expect(after).toBeDefined();
    expect(after).not.toBe(before);
    const sid = (v: string) => decodeURIComponent(v).replace(/^s:/, '').split('.')[0];
    const rows = await ctx.sequelize.query<{ sid: string }>('SELECT sid FROM "session" WHERE sid IN (:a, :b)', {
      replacements: { a: sid(before!), b: sid(after!) },
      type: QueryTypes.SELECT,
    });
    expect(rows.map((r) => r.sid)).toEqual([sid(after!)]);
    // An attacker holding the pre-sign-in cookie is still anonymous.
    const attacker = new Client(ctx.app);
    await attacker.agent.get('/api/auth/me').set('Cookie', `${SESSION_COOKIE}=${before}`).expect(401);
  });

  it('sets the session cookie HttpOnly and SameSite=Lax, not Secure by default', async () => {
    const c = new Client(ctx.app);
    const res = await c.signIn(demo.student);
    const cookie = rawSetCookies(res).find((s) => s.startsWith(`${SESSION_COOKIE}=`))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).not.toMatch(/;\s*Secure/i);
  });

  it('marks cookies Secure when secure cookies are on', async () => {
    const app = ctx.makeApp({ secureCookies: true });
    const res = await new Client(app).agent.get('/api/csrf').expect(200);
    for (const cookie of rawSetCookies(res)) expect(cookie).toMatch(/;\s*Secure/i);
  });
});

describe('CSRF protection', () => {
  it('refuses sign-in without a token', async () => {
    const c = new Client(ctx.app);
    await c.refreshCsrf();
    const res = await c.agent.post('/api/auth/sign-in').send({ email: demo.student, password: DEMO_PASSWORD });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });

  it('refuses a state-changing route with a missing, wrong or foreign token', async () => {
    const c = await signedIn(ctx.app, demo.instructor);
    const body = { title: 'Spectral Lab', code: 'SPL-100', term: 'Summer 2027' };
    const none = await c.agent.post('/api/courses').send(body);
    expect(none.status).toBe(403);
    expect(none.body.error.code).toBe('csrf');
    const wrong = await c.agent.post('/api/courses').set('x-csrf-token', 'forged').send(body);
    expect(wrong.status).toBe(403);
    expect(wrong.body.error.code).toBe('csrf');
    const other = await signedIn(ctx.app, demo.otherInstructor);
    const foreign = await c.agent.post('/api/courses').set('x-csrf-token', other.csrf).send(body);
    expect(foreign.status).toBe(403);
    expect(foreign.body.error.code).toBe('csrf');
    const list = await c.get('/api/courses').expect(200);
    expect(list.body.courses.map((x: { code: string }) => x.code)).not.toContain('SPL-100');
  });

  it('needs a fresh token after sign-in (tokens belong to one session)', async () => {
    const c = await anonymous(ctx.app);
    const oldToken = c.csrf;
    await c.post('/api/auth/sign-in', { email: demo.student, password: DEMO_PASSWORD }).expect(200);
    const res = await c.agent.post('/api/courses/join').set('x-csrf-token', oldToken).send({ code: 'ORBIT-4821' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });

  it('hands the new session\'s token over in the sign-in response header', async () => {
    const c = await anonymous(ctx.app);
    const signIn = await c.post('/api/auth/sign-in', { email: demo.student, password: DEMO_PASSWORD }).expect(200);
    const token = signIn.headers['x-csrf-token'];
    expect(typeof token).toBe('string');
    expect(token).not.toBe(c.csrf);
    const res = await c.agent.post('/api/auth/password').set('x-csrf-token', token).send({ currentPassword: 'wrong-one-here', newPassword: 'whatever-long-enough' });
    // Past the CSRF check: refused for the wrong current password, not for the token.
    expect(res.status).toBe(400);
    expect(res.body.error.details[0].path).toBe('currentPassword');
  });
});

describe('sign-in rate limit', () => {
  it('answers 429 after too many failures for one e-mail, and leaves other e-mails alone', async () => {
    const app = ctx.makeApp({ signInRateLimit: { limit: 3, windowMs: 60_000 } });
    const c = await anonymous(app);
    for (let i = 0; i < 3; i++) {
      await c.post('/api/auth/sign-in', { email: demo.student2, password: `wrong-${i}` }).expect(401);
    }
    const blocked = await c.post('/api/auth/sign-in', { email: demo.student2, password: 'wrong-again' });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.code).toBe('rate-limited');
    expect(typeof blocked.body.error.message).toBe('string');
    // Even the right password waits now.
    const right = await c.post('/api/auth/sign-in', { email: demo.student2, password: DEMO_PASSWORD });
    expect(right.status).toBe(429);
    // The same e-mail in another case is the same key.
    const upper = await c.post('/api/auth/sign-in', { email: demo.student2.toUpperCase(), password: DEMO_PASSWORD });
    expect(upper.status).toBe(429);
    // Another account from the same address still signs in.
    const other = await c.post('/api/auth/sign-in', { email: demo.assistant, password: DEMO_PASSWORD });
    expect(other.status).toBe(200);
  });
});

describe('validation and error shape', () => {
  it('names the failing fields of a sign-in body', async () => {
    const c = await anonymous(ctx.app);
    const res = await c.post('/api/auth/sign-in', { email: 'not-an-email', password: '' }).expect(400);
    expect(res.body.error.code).toBe('bad-request');
    const paths = (res.body.error.details as { path: string; message: string }[]).map((d) => d.path);
    expect(paths).toEqual(expect.arrayContaining(['email', 'password']));
    const email = res.body.error.details.find((d: { path: string }) => d.path === 'email');
    expect(email.message).toBe('Enter a valid e-mail address');
  });

  it('answers 400 for a body that is not JSON', async () => {
    const c = await anonymous(ctx.app);
    const res = await c.agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', c.csrf)
      .set('content-type', 'application/json')
      .send('{"email": ');
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad-request');
  });

  it('answers 413 for a body over the size limit', async () => {
    const c = await anonymous(ctx.app);
    const res = await c.post('/api/auth/sign-in', { email: demo.student, password: 'x'.repeat(200_000) });
    expect(res.status).toBe(413);
    expect(res.body.error.code).toBe('payload-too-large');
  });

  it('answers 404 JSON for an unknown /api route', async () => {
    const c = await anonymous(ctx.app);
    const res = await c.get('/api/no-such-thing').expect(404);
    expect(res.headers['content-type']).toMatch(/json/);
    expect(res.body.error.code).toBe('not-found');
    const post = await c.post('/api/no-such-thing', {}).expect(404);
    expect(post.body.error.code).toBe('not-found');
  });

  it('sends security headers: a CSP without inline scripts', async () => {
    const res = await new Client(ctx.app).agent.get('/api/csrf').expect(200);
    const csp = String(res.headers['content-security-policy']);
    expect(csp).toMatch(/script-src 'self'(;|$)/);
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(csp).toMatch(/default-src 'self'/);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});

describe('password change', () => {
  it('needs a signed-in user', async () => {
    const c = await anonymous(ctx.app);
    const res = await c.post('/api/auth/password', { currentPassword: DEMO_PASSWORD, newPassword: 'a-new-password-1' });
    expect(res.status).toBe(401);
  });

  it('refuses a wrong current password and a short new one, naming the field', async () => {
    const c = await signedIn(ctx.app, demo.assistant2);
    const wrong = await c.post('/api/auth/password', { currentPassword: 'not-it-at-all', newPassword: 'a-new-password-1' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.details[0].path).toBe('currentPassword');
    const short = await c.post('/api/auth/password', { currentPassword: DEMO_PASSWORD, newPassword: 'short' });
    expect(short.status).toBe(400);
    expect(short.body.error.details.map((d: { path: string }) => d.path)).toEqual(['newPassword']);
    // Nothing changed.
    await signedIn(ctx.app, demo.assistant2);
  });

  it('changes the password: the old one stops working, other sessions end, a notice is mailed', async () => {
    const email = demo.student;
    const newPassword = 'eigenvalues-on-the-circle';
    const before = await mailIds();
    const otherBrowser = await signedIn(ctx.app, email);
    const c = await signedIn(ctx.app, email);
    await c.post('/api/auth/password', { currentPassword: DEMO_PASSWORD, newPassword }).expect(204);
    // This session stays signed in; the other browser is signed out.
    await c.get('/api/auth/me').expect(200);
    await otherBrowser.get('/api/auth/me').expect(401);

    const fresh = new Client(ctx.app);
    expect((await fresh.signIn(email, DEMO_PASSWORD)).status).toBe(401);
    expect((await fresh.signIn(email, newPassword)).status).toBe(200);

    const mail = await newMailTo(email, before);
    expect(mail).toHaveLength(1);
    expect(mail[0].subject).toMatch(/password was changed/i);
    expect(mail[0].text).toContain(email);
    expect(mail[0].text).not.toContain(newPassword);

    // The signed-in user reads the same notice through the dev mail endpoint.
    const inbox = await c.get('/api/dev/mail').expect(200);
    expect(inbox.body.messages.map((m: { id: string }) => m.id)).toContain(mail[0].id);
    expect(inbox.body.messages.every((m: { to: string[] }) => m.to.includes(email))).toBe(true);
  });
});

describe('dev mail endpoint', () => {
  it('is for signed-in users only', async () => {
    const res = await (await anonymous(ctx.app)).get('/api/dev/mail');
    expect(res.status).toBe(401);
  });
  it('is absent when turned off', async () => {
    const app = ctx.makeApp({ devMail: false });
    const c = await signedIn(app, demo.instructor);
    const res = await c.get('/api/dev/mail');
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not-found');
  });
});
