import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Sequelize, Transaction } from 'sequelize';
import type { Role } from '../../shared/api.js';
import { Course, Enrollment, User, initModels } from '../models/index.js';
import { hashPassword } from '../services/passwords.js';

/** Every demo account signs in with this password (invented scenario, see DEVELOPERS.md). */
export const DEMO_PASSWORD = 'modewright-demo';

interface DemoPerson {
  email: string;
  displayName: string;
  canTeach?: boolean;
}

export const demoInstructor: DemoPerson = { email: 'mara@modewright.test', displayName: 'Mara Lindqvist', canTeach: true };
export const demoSecondInstructor: DemoPerson = { email: 'jonas@modewright.test', displayName: 'Jonas Ekwueme', canTeach: true };
export const demoAssistants: DemoPerson[] = [
  { email: 'tomasz@modewright.test', displayName: 'Tomasz Wrenfield' },
  { email: 'ines@modewright.test', displayName: 'Inés Calloway' },
];
export const demoStudents: DemoPerson[] = [
  ['Priya', 'Halvorsen'],
  ['Mateo', 'Brandvik'],
  ['Aiko', 'Fairbairn'],
  ['Lukas', 'Oyelaran'],
  ['Sofia', 'Marchetti'],
  ['Dmitri', 'Ashworth'],
  ['Amara', 'Nwachukwu'],
  ['Henrik', 'Solberg'],
  ['Leila', 'Farouk'],
  ['Caleb', 'Thornquist'],
  ['Yuki', 'Ravensworth'],
  ['Noor', 'Castellanos'],
].map(([first, last]) => ({ email: `${first.toLowerCase()}@modewright.test`, displayName: `${first} ${last}` }));

export const demoCourses = {
  studio: { title: 'Data-Driven Dynamics Studio', code: 'DDS-301', term: 'Winter 2027', joinCode: 'ORBIT-4821' },
  workshop: { title: 'Koopman Methods Workshop', code: 'KMW-210', term: 'Spring 2027', joinCode: 'LATTICE-3907' },
} as const;

export interface SeedResult {
  usersCreated: number;
  coursesCreated: number;
  enrollmentsCreated: number;
}

async function ensureUser(p: DemoPerson, t: Transaction, result: SeedResult): Promise<User> {
  const existing = await User.findOne({ where: { email: p.email }, transaction: t });
  if (existing) return existing; // never touch an existing account (its password may have changed)
  result.usersCreated++;
  return User.create(
    { email: p.email, displayName: p.displayName, canTeach: p.canTeach ?? false, passwordHash: await hashPassword(DEMO_PASSWORD) },
    { transaction: t },
  );
}

async function ensureCourse(
  c: { title: string; code: string; term: string; joinCode: string },
  owner: User,
  t: Transaction,
  result: SeedResult,
): Promise<Course> {
  const existing = await Course.findOne({ where: { code: c.code, term: c.term }, transaction: t });
  if (existing) return existing; // keep a rotated or disabled join code as it is
  const codeTaken = await Course.findOne({ where: { joinCode: c.joinCode }, transaction: t });
  result.coursesCreated++;
  return Course.create(
    { title: c.title, code: c.code, term: c.term, joinCode: codeTaken ? null : c.joinCode, createdById: owner.id },
    { transaction: t },
  );
}

async function ensureEnrollment(user: User, course: Course, role: Role, t: Transaction, result: SeedResult) {
  const [, created] = await Enrollment.findOrCreate({
    where: { userId: user.id, courseId: course.id },
    defaults: { userId: user.id, courseId: course.id, role },
    transaction: t,
  });
  if (created) result.enrollmentsCreated++;
}

/** The demo accounts and courses. Idempotent: a second run creates nothing and changes nothing. */
export async function seedDemo(sequelize: Sequelize): Promise<SeedResult> {
  initModels(sequelize);
  const result: SeedResult = { usersCreated: 0, coursesCreated: 0, enrollmentsCreated: 0 };
  await sequelize.transaction(async (t) => {
    const mara = await ensureUser(demoInstructor, t, result);
    const jonas = await ensureUser(demoSecondInstructor, t, result);
    const assistants = [];
    for (const a of demoAssistants) assistants.push(await ensureUser(a, t, result));
    const students = [];
    for (const s of demoStudents) students.push(await ensureUser(s, t, result));

    const studio = await ensureCourse(demoCourses.studio, mara, t, result);
    await ensureEnrollment(mara, studio, 'instructor', t, result);
    for (const a of assistants) await ensureEnrollment(a, studio, 'teaching_assistant', t, result);
    for (const s of students) await ensureEnrollment(s, studio, 'student', t, result);

    const workshop = await ensureCourse(demoCourses.workshop, jonas, t, result);
    await ensureEnrollment(jonas, workshop, 'instructor', t, result);
  });
  return result;
}

const invokedDirectly = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (invokedDirectly) {
  const { createSequelize } = await import('./sequelize.js');
  const { migrate } = await import('./migrate.js');
  const sequelize = createSequelize();
  try {
    await migrate(sequelize);
    const r = await seedDemo(sequelize);
    console.log(
      `Demo data: ${r.usersCreated} account(s), ${r.coursesCreated} course(s), ${r.enrollmentsCreated} enrollment(s) created` +
        ` (password for every demo account: ${DEMO_PASSWORD}).`,
    );
  } catch (err) {
    console.error(err);
    process.exitCode = 1;
  } finally {
    await sequelize.close();
  }
}
