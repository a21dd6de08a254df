import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Sequelize, Transaction } from 'sequelize';
import type { Role } from '../../shared/api.js';
import { createHash } from 'node:crypto';
import { Assignment, AssignmentVersion, Course, Dataset, Enrollment, Score, Submission, User, Variant, initModels } from '../models/index.js';
import { computeVariantReference, materializeVariant } from '../../grading/assignment.js';
import { decide } from '../services/submissions.js';
import { hashPassword } from '../services/passwords.js';
import { createScenarioDataset } from '../services/datasets.js';
import { createAssignment, publishAssignment, recipeOf, storedDataset, taskRunOf } from '../services/assignments.js';
import type { AssignmentConfigInput } from '../../shared/assignment.js';
import type { JobQueue } from '../jobs/queue.js';

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
  assignmentsCreated: number;
  submissionsCreated?: number;
}

const inDays = (days: number) => {
  const d = new Date(Date.now() + days * 86_400_000);
  d.setUTCHours(16, 0, 0, 0);
  return d.toISOString();
};

/** Two published assignments (exact DMD and kernel EDMD, one variant per student) and one draft, on invented scenarios. */
async function seedAssignments(sequelize: Sequelize, queue: JobQueue | null, course: Course, mara: User, result: SeedResult): Promise<void> {
  if ((await Assignment.count({ where: { courseId: course.id } })) > 0) return; // keep what is there
  const deps = { sequelize, queue };
  const sensors = await createScenarioDataset(course.id, mara, { name: 'Sensor array, damped rotations', scenario: 'linear-field', seed: 11, noise: 0 });
  const drift = await createScenarioDataset(course.id, mara, { name: 'Drift map pairs', scenario: 'drift-map', seed: 23, noise: 0 });
  const waves = await createScenarioDataset(course.id, mara, { name: 'Travelling waves on a ring', scenario: 'wave-field', seed: 5, noise: 0 });
  const common = { timeZone: 'Europe/Oslo', attempts: 3, feedback: 'status' as const, latePolicy: { penaltyPerDay: 10, cutoffDays: 3 } };
  const configs: (AssignmentConfigInput & { publish: boolean })[] = [
    {
      ...common,
      publish: true,
      title: 'Exact DMD of a sensor array',
      statement:
        'Twenty-four sensors record a mixture of damped rotations. Compute the **exact DMD** of your own variant at rank $r = 7$ and hand in the seven eigenvalues $\\lambda_j$ of $\\tilde A = U^\\top Y V \\Sigma^{-1}$.\n\nCheck that they come in conjugate pairs and that $|\\lambda_j| < 1$.',
      // Due yesterday: hand-ins are in, one came late, scores are waiting to be released.
      dueAt: inDays(-1),
      datasetId: sensors.id,
      variants: { mode: 'per-student', noise: 0.001, jitter: 0.02 },
      method: { method: 'dmd', rankRule: { kind: 'rank', rank: 7 } },
      order: 'magnitude',
      domain: 'discrete',
      parts: [{ name: 'eigenvalues', kind: 'eigenvalues', weight: 10 }],
    },
    {
      ...common,
      publish: true,
      title: 'Kernel EDMD on a drift map',
      statement:
        'The drift map acts on pairs $(u, v)$. With the polynomial kernel $k(x, y) = (1 + x^\\top y)^3$ and rank 10, compute the Koopman eigenvalues by **kernel EDMD** and hand in the five largest in magnitude.',
      dueAt: inDays(17),
      datasetId: drift.id,
      variants: { mode: 'per-student', noise: 0.0005, jitter: 0.05 },
      method: { method: 'kernel-edmd', kernel: 'polynomial', degree: 3, coef0: 1, gamma: 1, rankRule: { kind: 'rank', rank: 10 } },
      order: 'magnitude',
      top: 5,
      domain: 'discrete',
      parts: [{ name: 'eigenvalues', kind: 'eigenvalues', weight: 10 }],
    },
    {
      ...common,
      publish: false,
      title: 'Travelling waves in continuous time',
      statement: 'Draft: exact DMD of the wave field at rank 4, graded as continuous-time eigenvalues $\\omega = \\log(\\lambda)/\\Delta t$.',
      dueAt: inDays(24),
      datasetId: waves.id,
      variants: { mode: 'per-student', noise: 0.001, jitter: 0.02 },
      method: { method: 'dmd', rankRule: { kind: 'rank', rank: 4 } },
      order: 'magnitude',
      domain: 'continuous',
      parts: [{ name: 'eigenvalues', kind: 'eigenvalues', weight: 10 }],
    },
  ];
  const created: Assignment[] = [];
  for (const { publish, ...config } of configs) {
    const a = await createAssignment(deps, course.id, mara, config);
    if (publish) await publishAssignment(deps, a);
    created.push(a);
    result.assignmentsCreated++;
  }
  result.submissionsCreated = await seedSubmissions(sequelize, queue, created[0]);
}

const HOUR = 3_600_000;

/**
 * Hand-ins on the first assignment in several states: correct and on time, a near miss (flagged), values
 * copied from another student's variant (flagged), a late one, and one whose points a teaching assistant set
 * (when the queue scores it within a minute). The values come from each student's own variant through the
 * same engine call the reference job makes; the scoring itself is the real grade job.
 */
async function seedSubmissions(sequelize: Sequelize, queue: JobQueue | null, assignment: Assignment): Promise<number> {
  const version = (await AssignmentVersion.findOne({ where: { assignmentId: assignment.id, version: assignment.currentVersion } }))!;
  const dataset = (await Dataset.findByPk(version.datasetId))!;
  const stored = storedDataset(dataset);
  const valuesOf = async (email: string) => {
    const user = (await User.findOne({ where: { email } }))!;
    const variant = (await Variant.findOne({ where: { assignmentId: assignment.id, recipeKey: version.recipeKey, userId: user.id } }))!;
    const v = materializeVariant(stored, recipeOf(variant));
    const { reference } = await computeVariantReference(v.source, taskRunOf(version.config, dataset.dt), {});
    return { user, variant, values: reference.eigenvalues.map((e) => ({ re: e.re, im: e.im })) };
  };
  const csv = (vals: { re: number; im: number }[]) => 're,im\n' + vals.map((x) => `${x.re},${x.im}`).join('\n') + '\n';
  const numpyPrint = (vals: { re: number; im: number }[]) => '[' + vals.map((x) => `${x.re.toFixed(8)}${x.im < 0 ? '-' : '+'}${Math.abs(x.im).toFixed(8)}j`).join(' ') + ']\n';
  const priya = await valuesOf('priya@modewright.test');
  const plan: { email: string; text: (own: { re: number; im: number }[]) => string; hoursAgo: number; file: string }[] = [
    { email: 'priya@modewright.test', text: numpyPrint, hoursAgo: 50, file: 'eigvals.txt' },
    { email: 'mateo@modewright.test', text: (own) => csv(own.map((x, i) => (i === 0 ? { re: x.re + 0.0016, im: x.im } : x))), hoursAgo: 40, file: 'spectrum.csv' },
    { email: 'aiko@modewright.test', text: () => csv(priya.values), hoursAgo: 30, file: 'values.csv' },
    { email: 'sofia@modewright.test', text: csv, hoursAgo: 28, file: 'dmd.csv' },
    { email: 'henrik@modewright.test', text: (own) => csv([...own].reverse().map((x) => ({ re: x.re, im: -x.im }))), hoursAgo: 27, file: 'lambda.csv' },
    { email: 'lukas@modewright.test', text: csv, hoursAgo: 6, file: 'late.csv' },
  ];
  const ids: { id: number; email: string }[] = [];
  for (const p of plan) {
    const { user, variant, values } = p.email === priya.user.email ? priya : await valuesOf(p.email);
    const receivedAt = new Date(Date.now() - p.hoursAgo * HOUR);
    const bytes = Buffer.from(p.text(values));
    const late = receivedAt > assignment.dueAt;
    const daysLate = late ? Math.ceil((receivedAt.getTime() - assignment.dueAt.getTime()) / (24 * HOUR)) : 0;
    const sub = await Submission.create({
      assignmentId: assignment.id,
      userId: user.id,
      variantId: variant.id,
      assignmentVersionId: version.id,
      attempt: 1,
      source: 'file',
      fileName: p.file,
      bytes,
      sha256: createHash('sha256').update(bytes).digest('hex'),
      receivedAt,
      dueAt: assignment.dueAt,
      late,
      daysLate,
      message: null,
    });
    ids.push({ id: sub.id, email: p.email });
  }
  if (!queue) return ids.length;
  await queue.sendMany('grade', ids.map((x) => ({ data: { submissionId: x.id, gradeKey: 'auto' } })));
  // A teaching assistant sets Sofia's points once the autograder has scored it (skipped if that takes over a minute).
  const sofia = ids.find((x) => x.email === 'sofia@modewright.test')!;
  const t0 = Date.now();
  while (Date.now() - t0 < 60_000 && (await Score.count({ where: { submissionId: sofia.id } })) === 0) await new Promise((r) => setTimeout(r, 250));
  if ((await Score.count({ where: { submissionId: sofia.id } })) > 0) {
    const tomasz = (await User.findOne({ where: { email: 'tomasz@modewright.test' } }))!;
    await decide({ sequelize, queue }, assignment, sofia.id, tomasz, { action: 'override', points: 9, comment: 'Full marks for the values; one point off: the report asked for the decaying direction to be discussed.' });
  }
  return ids.length;
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
export async function seedDemo(sequelize: Sequelize, options: { queue?: JobQueue | null; assignments?: boolean } = {}): Promise<SeedResult> {
  initModels(sequelize);
  const result: SeedResult = { usersCreated: 0, coursesCreated: 0, enrollmentsCreated: 0, assignmentsCreated: 0 };
  const { studio, mara } = await sequelize.transaction(async (t) => {
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
    return { studio, mara };
  });
  if (options.assignments !== false) await seedAssignments(sequelize, options.queue ?? null, studio, mara, result);
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
      `Demo data: ${r.usersCreated} account(s), ${r.coursesCreated} course(s), ${r.enrollmentsCreated} enrollment(s), ${r.assignmentsCreated} assignment(s) created` +
        ` (password for every demo account: ${DEMO_PASSWORD}).`,
    );
  } catch (err) {
    console.error(err);
    process.exitCode = 1;
  } finally {
    await sequelize.close();
  }
}
