// Role guards, course isolation, join codes, course creation and granting teaching, against
// the real PostgreSQL test database. Expectations come from the HTTP contract in shared/api.ts
// (fact of the trade: common practice, no source, for "deny by default" access control).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Course } from '../../server/models/index.js';
import {
  anonymous,
  courseIdByCode,
  createOutsider,
  demo,
  mailIds,
  newMailTo,
  setupApi,
  signedIn,
  userIdByEmail,
  type Client,
  type TestContext,
} from './helpers.js';

let ctx: TestContext;
let studio: number; // DDS-301: Mara instructs, Tomasz and Inés assist, Priya and eleven others study
let workshop: number; // KMW-210: Jonas instructs, nobody else
beforeAll(async () => {
  ctx = await setupApi();
  studio = await courseIdByCode('DDS-301');
  workshop = await courseIdByCode('KMW-210');
});
afterAll(async () => {
  await ctx?.close();
});

describe('course list and detail', () => {
  it('lists only the courses the caller is enrolled in, with role and member count', async () => {
    const priya = await signedIn(ctx.app, demo.student);
    const res = await priya.get('/api/courses').expect(200);
    expect(res.body.courses).toEqual([
      { id: studio, title: 'Data-Driven Dynamics Studio', code: 'DDS-301', term: 'Winter 2027', role: 'student', memberCount: 15 },
    ]);
    const jonas = await signedIn(ctx.app, demo.otherInstructor);
    const his = await jonas.get('/api/courses').expect(200);
    expect(his.body.courses.map((c: { code: string; role: string }) => [c.code, c.role])).toEqual([['KMW-210', 'instructor']]);
  });

  it('shows the join code to instructors only', async () => {
    const mara = await signedIn(ctx.app, demo.instructor);
    const asInstructor = await mara.get(`/api/courses/${studio}`).expect(200);
    expect(asInstructor.body.joinCode).toBe('ORBIT-4821');
    expect(asInstructor.body.role).toBe('instructor');
    expect(Number.isNaN(Date.parse(asInstructor.body.createdAt))).toBe(false);
    for (const email of [demo.assistant, demo.student]) {
      const c = await signedIn(ctx.app, email);
      const res = await c.get(`/api/courses/${studio}`).expect(200);
      expect(res.body).not.toHaveProperty('joinCode');
    }
  });

  it('gives a member their own enrollment', async () => {
    const tomasz = await signedIn(ctx.app, demo.assistant);
    const res = await tomasz.get(`/api/courses/${studio}/enrollment`).expect(200);
    expect(res.body).toEqual({
      courseId: studio,
      userId: await userIdByEmail(demo.assistant),
      role: 'teaching_assistant',
      joinedAt: expect.any(String),
    });
  });
});

describe('role guards', () => {
  it('answers 401 to anonymous callers on every course route', async () => {
    const anon = await anonymous(ctx.app);
    for (const path of ['/api/courses', `/api/courses/${studio}`, `/api/courses/${studio}/members`, `/api/courses/${studio}/enrollment`]) {
      const res = await anon.get(path);
      expect(res.status, path).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    }
    expect((await anon.post(`/api/courses/${studio}/join-code`, { action: 'rotate' })).status).toBe(401);
    expect((await anon.post('/api/courses/join', { code: 'ORBIT-4821' })).status).toBe(401);
    expect((await anon.post('/api/courses', { title: 'Anon course', code: 'AN-1', term: 'Never' })).status).toBe(401);
  });

  it('members list: staff may read it, students may not', async () => {
    const student = await signedIn(ctx.app, demo.student);
    const res = await student.get(`/api/courses/${studio}/members`).expect(403);
    expect(res.body.error.code).toBe('forbidden');
    for (const email of [demo.assistant, demo.instructor]) {
      const c = await signedIn(ctx.app, email);
      const ok = await c.get(`/api/courses/${studio}/members`).expect(200);
      expect(ok.body.members).toHaveLength(15);
      expect(ok.body.members[0]).toMatchObject({ email: demo.instructor, role: 'instructor' });
      expect(ok.body.members.filter((m: { role: string }) => m.role === 'teaching_assistant')).toHaveLength(2);
      expect(ok.body.members[0]).not.toHaveProperty('passwordHash');
    }
  });

  it('join code changes: instructor only (assistant and student get 403)', async () => {
    for (const email of [demo.student, demo.assistant]) {
      const c = await signedIn(ctx.app, email);
      const res = await c.post(`/api/courses/${studio}/join-code`, { action: 'disable' }).expect(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    const mara = await signedIn(ctx.app, demo.instructor);
    expect((await mara.get(`/api/courses/${studio}`)).body.joinCode).toBe('ORBIT-4821');
  });

  it('answers 400 naming the parameter for a course id that is not a number', async () => {
    const mara = await signedIn(ctx.app, demo.instructor);
    const res = await mara.get('/api/courses/abc').expect(400);
    expect(res.body.error.details[0].path).toBe('courseId');
  });
});

describe('nothing is readable across courses', () => {
  it('an instructor of course B cannot read course A, its members or an enrollment there', async () => {
    const jonas = await signedIn(ctx.app, demo.otherInstructor);
    for (const path of [`/api/courses/${studio}`, `/api/courses/${studio}/members`, `/api/courses/${studio}/enrollment`]) {
      const res = await jonas.get(path);
      expect(res.status, path).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
      expect(JSON.stringify(res.body)).not.toContain('DDS-301');
    }
    expect((await jonas.post(`/api/courses/${studio}/join-code`, { action: 'rotate' })).status).toBe(403);
  });

  it('members of course A cannot read course B, whatever their role', async () => {
    for (const email of [demo.instructor, demo.assistant, demo.student]) {
      const c = await signedIn(ctx.app, email);
      for (const path of [`/api/courses/${workshop}`, `/api/courses/${workshop}/members`, `/api/courses/${workshop}/enrollment`]) {
        expect((await c.get(path)).status, `${email} ${path}`).toBe(403);
      }
    }
  });

  it('a course that does not exist answers like one the caller is not in (no existence leak)', async () => {
    const mara = await signedIn(ctx.app, demo.instructor);
    const missing = await mara.get('/api/courses/987654').expect(403);
    const foreign = await mara.get(`/api/courses/${workshop}`).expect(403);
    expect(missing.body).toEqual(foreign.body);
  });
});

describe('creating courses and granting teaching', () => {
  it('needs canTeach to create a course', async () => {
    const priya = await signedIn(ctx.app, demo.student);
    const res = await priya.post('/api/courses', { title: 'My own course', code: 'OWN-1', term: 'Summer 2027' }).expect(403);
    expect(res.body.error.code).toBe('forbidden');
    const courses = await priya.get('/api/courses').expect(200);
    expect(courses.body.courses).toHaveLength(1);
  });

  it('lets a teaching account create a course, enrolled as its instructor with a join code', async () => {
    const mara = await signedIn(ctx.app, demo.instructor);
    const res = await mara.post('/api/courses', { title: 'Spectral Methods Lab', code: 'SML-120', term: 'Summer 2027' }).expect(201);
    expect(res.body).toMatchObject({ title: 'Spectral Methods Lab', code: 'SML-120', term: 'Summer 2027', role: 'instructor', memberCount: 1 });
    expect(res.body.joinCode).toMatch(/^[A-Z]+-\d{4}$/);
    const list = await mara.get('/api/courses').expect(200);
    expect(list.body.courses.map((c: { code: string }) => c.code)).toEqual(expect.arrayContaining(['SML-120', 'DDS-301']));
  });

  it('names the fields of an invalid course', async () => {
    const mara = await signedIn(ctx.app, demo.instructor);
    const res = await mara.post('/api/courses', { title: 'x', code: '!!', term: 'Summer 2027' }).expect(400);
    const paths = res.body.error.details.map((d: { path: string }) => d.path);
    expect(paths).toEqual(expect.arrayContaining(['title', 'code']));
    expect(paths).not.toContain('term');
  });

  it('refuses a second course with the same code and term for the same instructor, whatever the case', async () => {
    const mara = await signedIn(ctx.app, demo.instructor);
    const res = await mara.post('/api/courses', { title: 'Studio again', code: 'dds-301', term: 'WINTER 2027' }).expect(409);
    expect(res.body.error.code).toBe('conflict');
    expect(res.body.error.message).toMatch(/You already teach dds-301 in WINTER 2027/);
    expect(res.body.error.details).toEqual([{ path: 'code', message: 'You already teach dds-301 in WINTER 2027' }]);
    const list = await mara.get('/api/courses').expect(200);
    expect(list.body.courses.filter((c: { code: string }) => c.code.toLowerCase() === 'dds-301')).toHaveLength(1);
    // Another term is another course; another instructor may use the same code and term.
    await mara.post('/api/courses', { title: 'Studio, next year', code: 'DDS-301', term: 'Winter 2028' }).expect(201);
    const jonas = await signedIn(ctx.app, demo.otherInstructor);
    await jonas.post('/api/courses', { title: 'His own studio', code: 'DDS-301', term: 'Winter 2027' }).expect(201);
  });

  it('only teaching accounts may grant teaching', async () => {
    const priya = await signedIn(ctx.app, demo.student);
    const mateoId = await userIdByEmail(demo.student2);
    const res = await priya.post(`/api/users/${mateoId}/can-teach`, { canTeach: true }).expect(403);
    expect(res.body.error.code).toBe('forbidden');
    const tomasz = await signedIn(ctx.app, demo.assistant);
    await tomasz.post(`/api/users/${mateoId}/can-teach`, { canTeach: true }).expect(403);
  });

  it('an instructor grants teaching to a colleague, who is told by mail and can then create a course', async () => {
    const before = await mailIds();
    const mara = await signedIn(ctx.app, demo.instructor);
    const tomaszId = await userIdByEmail(demo.assistant);
    const res = await mara.post(`/api/users/${tomaszId}/can-teach`, { canTeach: true }).expect(200);
    expect(res.body).toEqual({ id: tomaszId, email: demo.assistant, displayName: 'Tomasz Wrenfield', canTeach: true });

    const mail = await newMailTo(demo.assistant, before);
    expect(mail).toHaveLength(1);
    expect(mail[0].subject).toMatch(/can now create courses/i);
    expect(mail[0].text).toContain('Mara Lindqvist');

    const tomasz = await signedIn(ctx.app, demo.assistant);
    const me = await tomasz.get('/api/auth/me').expect(200);
    expect(me.body.user.canTeach).toBe(true);
    await tomasz.post('/api/courses', { title: 'Assistant Methods Clinic', code: 'AMC-10', term: 'Summer 2027' }).expect(201);
  });

  it('refuses a bad body, an unknown user and withdrawing one\'s own permission', async () => {
    const mara = await signedIn(ctx.app, demo.instructor);
    const bad = await mara.post(`/api/users/${await userIdByEmail(demo.student2)}/can-teach`, { canTeach: 'yes' }).expect(400);
    expect(bad.body.error.details[0].path).toBe('canTeach');
    await mara.post('/api/users/999999/can-teach', { canTeach: true }).expect(404);
    const self = await mara.post(`/api/users/${await userIdByEmail(demo.instructor)}/can-teach`, { canTeach: false }).expect(409);
    expect(self.body.error.code).toBe('conflict');
  });
});

describe('join codes', () => {
  let mara: Client;
  beforeAll(async () => {
    mara = await signedIn(ctx.app, demo.instructor);
  });

  it('a student joins with the code in any case, once', async () => {
    const email = await createOutsider('nadia');
    const nadia = await signedIn(ctx.app, email);
    await nadia.get(`/api/courses/${studio}`).expect(403);
    const res = await nadia.post('/api/courses/join', { code: '  orbit-4821 ' }).expect(201);
    expect(res.body).toMatchObject({ id: studio, role: 'student', memberCount: 16 });
    expect(res.body).not.toHaveProperty('joinCode');
    await nadia.get(`/api/courses/${studio}`).expect(200);
    await nadia.get(`/api/courses/${studio}/members`).expect(403);
    // Joining again changes nothing.
    const again = await nadia.post('/api/courses/join', { code: 'ORBIT-4821' }).expect(200);
    expect(again.body).toMatchObject({ role: 'student', memberCount: 16 });
  });

  it('staff who use the code keep their role', async () => {
    const tomasz = await signedIn(ctx.app, demo.assistant);
    const res = await tomasz.post('/api/courses/join', { code: 'ORBIT-4821' }).expect(200);
    expect(res.body.role).toBe('teaching_assistant');
  });

  it('a wrong code joins nothing', async () => {
    const email = await createOutsider('omar');
    const omar = await signedIn(ctx.app, email);
    const res = await omar.post('/api/courses/join', { code: 'ORBIT-4822' }).expect(404);
    expect(res.body.error.code).toBe('not-found');
    expect((await omar.get('/api/courses')).body.courses).toEqual([]);
    const short = await omar.post('/api/courses/join', { code: 'ab' }).expect(400);
    expect(short.body.error.details[0].path).toBe('code');
  });

  it('rotating gives a new code and the old one stops working', async () => {
    const res = await mara.post(`/api/courses/${studio}/join-code`, { action: 'rotate' }).expect(200);
    const fresh = res.body.joinCode as string;
    expect(fresh).toMatch(/^[A-Z]+-\d{4}$/);
    expect(fresh).not.toBe('ORBIT-4821');
    expect((await mara.get(`/api/courses/${studio}`)).body.joinCode).toBe(fresh);

    const email = await createOutsider('greta');
    const greta = await signedIn(ctx.app, email);
    await greta.post('/api/courses/join', { code: 'ORBIT-4821' }).expect(404);
    const joined = await greta.post('/api/courses/join', { code: fresh.toLowerCase() }).expect(201);
    expect(joined.body.role).toBe('student');
  });

  it('disabling stops every join', async () => {
    const current = (await mara.get(`/api/courses/${studio}`)).body.joinCode as string;
    const res = await mara.post(`/api/courses/${studio}/join-code`, { action: 'disable' }).expect(200);
    expect(res.body.joinCode).toBeNull();
    const email = await createOutsider('felix');
    const felix = await signedIn(ctx.app, email);
    await felix.post('/api/courses/join', { code: current }).expect(404);
    expect((await felix.get('/api/courses')).body.courses).toEqual([]);
    // Rotating turns joining back on.
    const back = await mara.post(`/api/courses/${studio}/join-code`, { action: 'rotate' }).expect(200);
    expect(back.body.joinCode).toMatch(/^[A-Z]+-\d{4}$/);
    const bad = await mara.post(`/api/courses/${studio}/join-code`, { action: 'delete' }).expect(400);
    expect(bad.body.error.details[0].path).toBe('action');
  });

  it('limits join-code guessing', async () => {
    const app = ctx.makeApp({ joinRateLimit: { limit: 2, windowMs: 60_000 } });
    const email = await createOutsider('ruth');
    const ruth = await signedIn(app, email);
    await ruth.post('/api/courses/join', { code: 'GUESS-0001' }).expect(404);
    await ruth.post('/api/courses/join', { code: 'GUESS-0002' }).expect(404);
    const res = await ruth.post('/api/courses/join', { code: 'GUESS-0003' }).expect(429);
    expect(res.body.error.code).toBe('rate-limited');
  });
});

describe('migration 0003: course code + term unique per instructor', () => {
  it('stops with the duplicates named when existing courses would break the index, and deletes nothing', async () => {
    const migration = await import('../../server/migrations/0003-course-code-term-unique.js');
    const qi = ctx.sequelize.getQueryInterface();
    const maraId = await userIdByEmail(demo.instructor);
    await migration.down({ context: qi, name: '0003-course-code-term-unique' });
    try {
      const [rows] = (await ctx.sequelize.query(
        `INSERT INTO courses (title, code, term, "createdById", "createdAt", "updatedAt")
         VALUES ('Studio twin', 'Dds-301', 'winter 2027', ${maraId}, now(), now()) RETURNING id`,
      )) as [{ id: number }[], unknown];
      const twin = rows[0].id;
      const before = await Course.count();
      const err = await migration.up({ context: qi, name: '0003-course-code-term-unique' }).then(
        () => null,
        (e: unknown) => e as Error,
      );
      expect(err?.message).toMatch(/Cannot make course code \+ term unique per instructor/);
      expect(err?.message).toContain(`mara@modewright.test: DDS-301 in Winter 2027 (course ids ${studio}, ${twin})`);
      expect(err?.message).toMatch(/Nothing was changed/);
      expect(await Course.count()).toBe(before);
      await ctx.sequelize.query(`DELETE FROM courses WHERE id = ${twin}`);
    } finally {
      await migration.up({ context: qi, name: '0003-course-code-term-unique' });
    }
    const [idx] = (await ctx.sequelize.query(
      "SELECT indexdef FROM pg_indexes WHERE indexname = 'courses_creator_code_term_unique'",
    )) as [{ indexdef: string }[], unknown];
    expect(idx[0].indexdef).toMatch(/UNIQUE INDEX .* \("createdById", lower\(\(code\)::text\), lower\(\(term\)::text\)\)/);
  });
});
