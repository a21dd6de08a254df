// The demo seed is idempotent: a second run creates nothing and changes nothing, including a
// password changed in between and a rotated join code. Real test database.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seedDemo } from '../../server/db/seed.js';
import { Assignment, Course, Enrollment, User, Variant } from '../../server/models/index.js';
import { Client, DEMO_PASSWORD, courseIdByCode, demo, setupApi, signedIn, type TestContext } from './helpers.js';

let ctx: TestContext;
beforeAll(async () => {
  ctx = await setupApi();
});
afterAll(async () => {
  await ctx?.close();
});

const counts = async () => ({ users: await User.count(), courses: await Course.count(), enrollments: await Enrollment.count(), assignments: await Assignment.count() });

describe('demo seed', () => {
  it('holds the accounts and courses the contributor notes describe', async () => {
    expect(await counts()).toEqual({ users: 16, courses: 2, enrollments: 16, assignments: 0 });
    const mara = await User.findOne({ where: { email: demo.instructor } });
    expect(mara?.canTeach).toBe(true);
    expect((await User.findOne({ where: { email: demo.student } }))?.displayName).toBe('Priya Halvorsen');
    expect((await User.findOne({ where: { email: demo.student } }))?.canTeach).toBe(false);
    const studio = await Course.findOne({ where: { code: 'DDS-301' } });
    expect(studio).toMatchObject({ title: 'Data-Driven Dynamics Studio', term: 'Winter 2027', joinCode: 'ORBIT-4821' });
    const roles = await Enrollment.findAll({ where: { courseId: studio!.id } });
    const byRole = (r: string) => roles.filter((e) => e.role === r).length;
    expect([byRole('instructor'), byRole('teaching_assistant'), byRole('student')]).toEqual([1, 2, 12]);
    const workshop = await Course.findOne({ where: { code: 'KMW-210' } });
    expect(workshop).toMatchObject({ title: 'Koopman Methods Workshop', term: 'Spring 2027' });
  });

  it('a second run keeps counts, a changed password and a rotated join code', async () => {
    const newPassword = 'a-password-of-her-own';
    const priya = await signedIn(ctx.app, demo.student);
    await priya.post('/api/auth/password', { currentPassword: DEMO_PASSWORD, newPassword }).expect(204);
    const mara = await signedIn(ctx.app, demo.instructor);
    const studioId = await courseIdByCode('DDS-301');
    const rotated = (await mara.post(`/api/courses/${studioId}/join-code`, { action: 'rotate' }).expect(200)).body.joinCode;
    const first = await seedDemo(ctx.sequelize);
    expect(first.assignmentsCreated).toBe(3);
    const published = await Assignment.findAll({ where: { courseId: studioId }, order: [['id', 'ASC']] });
    // Two published assignments (exact DMD and kernel EDMD, per-student variants) and one draft.
    expect(published.map((a) => [a.status, a.method])).toEqual([
      ['published', 'dmd'],
      ['published', 'kernel-edmd'],
      ['draft', 'dmd'],
    ]);
    expect(await Variant.count({ where: { assignmentId: published[0].id, mode: 'per-student' } })).toBe(12);
    const before = await counts();
    const hashBefore = (await User.findOne({ where: { email: demo.student } }))!.passwordHash;

    const result = await seedDemo(ctx.sequelize);
    expect(result).toEqual({ usersCreated: 0, coursesCreated: 0, enrollmentsCreated: 0, assignmentsCreated: 0 });
    expect(await counts()).toEqual(before);
    expect((await User.findOne({ where: { email: demo.student } }))!.passwordHash).toBe(hashBefore);
    expect((await Course.findByPk(studioId))!.joinCode).toBe(rotated);

    const c = new Client(ctx.app);
    expect((await c.signIn(demo.student, DEMO_PASSWORD)).status).toBe(401);
    expect((await c.signIn(demo.student, newPassword)).status).toBe(200);
  });

  it('e-mail addresses are unique whatever their case', async () => {
    await expect(
      ctx.sequelize.query(
        `INSERT INTO users (email, "displayName", "passwordHash", "canTeach", "createdAt", "updatedAt")
         VALUES ('MARA@modewright.test', 'Copy', 'x', false, now(), now())`,
      ),
    ).rejects.toMatchObject({ name: 'SequelizeUniqueConstraintError' });
  });

  it('deleting a course removes its enrollments; deleting its creator keeps the course', async () => {
    const jonas = await User.findOne({ where: { email: demo.otherInstructor } });
    const workshop = await Course.findOne({ where: { code: 'KMW-210' } });
    await jonas!.destroy();
    const kept = await Course.findByPk(workshop!.id);
    expect(kept).not.toBeNull();
    expect(kept!.createdById).toBeNull();
    expect(await Enrollment.count({ where: { courseId: workshop!.id } })).toBe(0);
    const studio = await Course.findOne({ where: { code: 'DDS-301' } });
    await studio!.destroy();
    expect(await Enrollment.count({ where: { courseId: studio!.id } })).toBe(0);
  });
});
