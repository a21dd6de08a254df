/**
 * Submissions through the API, the real PostgreSQL test database, the queue and
 * the scorer: hand-in stored before scoring, scorer failures and retries,
 * attempts, deadline, late penalty, extension, copy signals, staff decisions,
 * second looks and regrades (every earlier score kept), the gradebook CSV and
 * release mail read back from the mail catcher.
 */
import { spawnSync } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AssignmentConfigInput, ReferenceResponse } from '../../shared/assignment.js';
import type { DashboardResponse, MySubmissionsResponse, StaffSubmission } from '../../shared/submission.js';
import type { ScoreReport } from '../../shared/score-report.js';
import { gradeSubmission } from '../../grading/scoring/score.js';
import { createEnginePool, type Engine } from '../../server/jobs/engine-pool.js';
import { startQueue, type JobQueue } from '../../server/jobs/queue.js';
import { startWorkers } from '../../server/jobs/handlers.js';
import { Assignment, Score, Submission } from '../../server/models/index.js';
import { safeCell } from '../../server/routes/submissions.js';
import type { ModewrightApp } from '../../server/app.js';
import { courseIdByCode, demo, mailIds, newMailTo, setupApi, signedIn, testDatabaseUrl, userIdByEmail, type Client, type TestContext } from './helpers.js';

let ctx: TestContext;
let app: ModewrightApp;
let queue: JobQueue;
let engine: Engine;
let stopWorkers: () => Promise<void>;
/** The scorer throws this many times before it runs. */
let scorerFailures = 0;
let courseId: number;
let mara: Client;
let tomasz: Client;
let priya: Client;
let mateo: Client;
let aiko: Client;
let assignmentId: number;

const base = () => `/api/courses/${courseId}/assignments/${assignmentId}`;

beforeAll(async () => {
  ctx = await setupApi();
  queue = await startQueue({ connectionString: testDatabaseUrl(), retryLimit: 1, retryDelaySeconds: 1, pollingIntervalSeconds: 0.5 });
  engine = createEnginePool(1);
  stopWorkers = await startWorkers({
    sequelize: ctx.sequelize,
    queue,
    engine,
    scorer: (input) => {
      if (scorerFailures > 0) {
        scorerFailures--;
        throw new Error('simulated failure of the scorer');
      }
      return gradeSubmission(input);
    },
  });
  app = ctx.makeApp({ queue, engine });
  courseId = await courseIdByCode('DDS-301');
  [mara, tomasz, priya, mateo, aiko] = await Promise.all([demo.instructor, demo.assistant, demo.student, demo.student2, 'aiko@modewright.test'].map((e) => signedIn(app, e)));
  const d = await mara.post(`/api/courses/${courseId}/datasets/scenario`, { name: 'Sensors', scenario: 'linear-field', seed: 11 }).expect(201);
  const config: AssignmentConfigInput = {
    title: 'Exact DMD of a sensor array',
    dueAt: new Date(Date.now() + 7 * 86_400_000).toISOString(),
    timeZone: 'Europe/Oslo',
    attempts: 3,
    feedback: 'status',
    latePolicy: { penaltyPerDay: 10, cutoffDays: 3 },
    datasetId: d.body.id,
    variants: { mode: 'per-student', noise: 0.001, jitter: 0.05 },
    method: { method: 'dmd', rankRule: { kind: 'rank', rank: 7 } },
    parts: [{ name: 'eigenvalues', kind: 'eigenvalues', weight: 10 }],
  };
  assignmentId = (await mara.post(`/api/courses/${courseId}/assignments`, config).expect(201)).body.id;
  await mara.post(`${base()}/publish`).expect(202);
  const t0 = Date.now();
  for (;;) {
    const p = (await mara.get(`${base()}/progress`).expect(200)).body;
    if (p.total > 0 && p.ready === p.total) break;
    if (Date.now() - t0 > 90_000) throw new Error('references did not finish');
    await new Promise((r) => setTimeout(r, 300));
  }
}, 180_000);

afterAll(async () => {
  await stopWorkers?.();
  await queue?.stop();
  await engine?.close();
  await ctx?.close();
});

async function referenceOf(email: string): Promise<ReferenceResponse> {
  return (await tomasz.get(`${base()}/reference?student=${await userIdByEmail(email)}`).expect(200)).body as ReferenceResponse;
}

const csvOf = (values: { re: number; im: number }[]) => 're,im\n' + values.map((v) => `${v.re.toPrecision(17)},${v.im.toPrecision(17)}`).join('\n') + '\n';

function handInText(client: Client, text: string) {
  return client.post(`${base()}/submissions`, { text });
}
function handInFile(client: Client, name: string, body: string) {
  return client.agent.post(`${base()}/submissions`).set('x-csrf-token', client.csrf).attach('file', Buffer.from(body), name);
}

/** Wait until the submission's status is scored or failed. */
async function settled(id: number, timeoutMs = 60_000): Promise<Submission> {
  const t0 = Date.now();
  for (;;) {
    const s = await Submission.findByPk(id);
    if (s && (s.status === 'scored' || s.status === 'failed')) return s;
    if (Date.now() - t0 > timeoutMs) throw new Error(`submission ${id} not settled: ${s?.status}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

async function staffView(email: string): Promise<StaffSubmission[]> {
  return (await tomasz.get(`${base()}/submissions?student=${await userIdByEmail(email)}`).expect(200)).body.submissions as StaffSubmission[];
}

describe('hand-in and scoring', () => {
  it('the eigenvalues NumPy computes from the downloaded variant, as NumPy prints them, get full points', async () => {
    const npy = await priya
      .get(`${base()}/dataset?format=npy`)
      .buffer(true)
      .parse((res, cb) => {
        const chunks: Buffer[] = [];
        res.on('data', (c: Buffer) => chunks.push(c));
        res.on('end', () => cb(null, Buffer.concat(chunks)));
      })
      .expect(200);
    // Reference library: NumPy (exact DMD by numpy.linalg.svd and numpy.linalg.eigvals), printed by numpy's own print().
    const script = [
      'import sys, io, numpy as np',
      'd = np.load(io.BytesIO(sys.stdin.buffer.read()))',
      'x, y = d[:, :-1], d[:, 1:]',
      'u, s, vh = np.linalg.svd(x, full_matrices=False)',
      'r = 7',
      'a = u[:, :r].T @ y @ vh[:r].T / s[:r][None, :]',
      'np.set_printoptions(precision=17)',
      'print(np.linalg.eigvals(a))',
    ].join('\n');
    const r = spawnSync('python3', ['-c', script], { input: npy.body as Buffer, encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    const created = await handInFile(priya, 'eigvals.txt', r.stdout).expect(202);
    expect(created.body.submission).toMatchObject({ status: 'received', attempt: 1 });
    // Stored before scoring: the bytes are there now.
    const row = await Submission.findByPk(created.body.submission.id);
    expect(row!.bytes.toString()).toBe(r.stdout);
    const s = await settled(created.body.submission.id);
    expect(s.status).toBe('scored');
    const mine = (await priya.get(`${base()}/submissions/mine`).expect(200)).body as MySubmissionsResponse;
    expect(mine.submissions[0]).toMatchObject({ points: 10, maxPoints: 10, provisional: true, status: 'scored' });
    // Every graded value is matched (a value the reference cannot vouch for is shown as not graded).
    expect(mine.submissions[0].values!.every((v) => v.status === 'matched' || v.status === 'not-graded')).toBe(true);
    expect(mine.submissions[0].values!.filter((v) => v.status === 'matched').length).toBeGreaterThan(0);
    // Before release, no reference value reaches the student.
    expect(mine.submissions[0]).not.toHaveProperty('report');
    expect(JSON.stringify(mine)).not.toMatch(/"reference"|"tolerance"|"distance"/);
    expect(mine.attemptsLeft).toBe(2);
  });

  it('permuted and conjugate-swapped values get full points; one value moved by 100× its tolerance costs exactly its share', async () => {
    const ref = await referenceOf(demo.student2);
    const values = ref.reference!.eigenvalues.map((e) => ({ re: e.re, im: e.im }));
    const shuffled = [...values].reverse().map((v) => ({ re: v.re, im: -v.im }));
    const a = await handInText(mateo, csvOf(shuffled)).expect(202);
    await settled(a.body.submission.id);
    const [first] = await staffView(demo.student2);
    expect(first.points).toBe(10);
    const report = first.report as ScoreReport;
    const matches = report.parts[0].matches;
    // Move the value with the smallest tolerance (a real one if there is one) by 100× its tolerance.
    const target = [...matches].sort((x, y) => Number(y.reference.im === 0) - Number(x.reference.im === 0) || x.tolerance - y.tolerance)[0];
    const moved = values.map((v) => ({ ...v }));
    const k = moved.findIndex((v) => Math.hypot(v.re - target.reference.re, Math.abs(v.im) - Math.abs(target.reference.im)) < 1e-12);
    moved[k].re += 100 * target.tolerance;
    const b = await handInText(mateo, csvOf(moved)).expect(202);
    await settled(b.body.submission.id);
    const second = (await staffView(demo.student2)).find((s) => s.id === b.body.submission.id)!;
    expect(second.points).toBeCloseTo(10 - target.points, 5);
  });

  it('a reader error comes back at once with line and column and uses no attempt', async () => {
    const before = await Submission.count({ where: { userId: await userIdByEmail('aiko@modewright.test') } });
    const res = await handInFile(aiko, 'values.csv', 're,im\n0.9,0.1\n0.8,abc\n').expect(422);
    expect(res.body.error.details[0]).toMatchObject({ path: 'file', line: 3 });
    expect(res.body.error.message).toMatch(/values\.csv.*line 3, column \d+/);
    expect(res.body.error.message).toMatch(/no attempt was used/);
    expect(await Submission.count({ where: { userId: await userIdByEmail('aiko@modewright.test') } })).toBe(before);
  });

  it('a scorer that throws keeps the upload; the queue retries and scores it exactly once', async () => {
    const ref = await referenceOf('aiko@modewright.test');
    scorerFailures = 1;
    const res = await handInText(aiko, csvOf(ref.reference!.eigenvalues)).expect(202);
    const s = await settled(res.body.submission.id);
    expect(s.status).toBe('scored');
    expect(await Score.count({ where: { submissionId: s.id } })).toBe(1);
  });

  it('a scorer that keeps throwing marks the submission failed with its message; a regrade scores it once', async () => {
    const ref = await referenceOf('aiko@modewright.test');
    scorerFailures = 100;
    const res = await handInText(aiko, csvOf(ref.reference!.eigenvalues)).expect(202);
    const s = await settled(res.body.submission.id);
    expect(s.status).toBe('failed');
    expect(s.message).toBe('simulated failure of the scorer');
    expect(s.bytes.length).toBeGreaterThan(0);
    expect(await Score.count({ where: { submissionId: s.id } })).toBe(0);
    scorerFailures = 0;
    const rg = await mara.post(`${base()}/regrade`, { submissionId: s.id, reason: 'scorer was down' }).expect(202);
    const t0 = Date.now();
    while ((await mara.get(`${base()}/regrades/${rg.body.id}`).expect(200)).body.state !== 'finished' && Date.now() - t0 < 30_000) await new Promise((r) => setTimeout(r, 200));
    expect(await Score.count({ where: { submissionId: s.id } })).toBe(1);
    expect((await Submission.findByPk(s.id))!.status).toBe('scored');
  });

  it('attempts run out (409), and the deadline, late penalty, cut-off and an extension follow server time', async () => {
    const ref = await referenceOf('aiko@modewright.test');
    // Aiko has used 2 attempts; the third is accepted, the fourth refused.
    await handInText(aiko, csvOf(ref.reference!.eigenvalues)).expect(202);
    const refused = await handInText(aiko, csvOf(ref.reference!.eigenvalues)).expect(409);
    expect(refused.body.error.message).toMatch(/No attempts left/);

    // Two days after the due date: 20% off. Five days after: past the 3-day cut-off.
    const lukas = await signedIn(app, 'lukas@modewright.test');
    const lukasRef = await referenceOf('lukas@modewright.test');
    await Assignment.update({ dueAt: new Date(Date.now() - 1.5 * 86_400_000) }, { where: { id: assignmentId } });
    const late = await handInText(lukas, csvOf(lukasRef.reference!.eigenvalues)).expect(202);
    const s = await settled(late.body.submission.id);
    expect(s).toMatchObject({ late: true, daysLate: 2 });
    const [row] = await staffView('lukas@modewright.test');
    expect(row.points).toBeCloseTo(8, 9);
    expect(row.flags.map((f) => f.code)).toContain('late');

    await Assignment.update({ dueAt: new Date(Date.now() - 5 * 86_400_000) }, { where: { id: assignmentId } });
    const closed = await handInText(lukas, csvOf(lukasRef.reference!.eigenvalues)).expect(409);
    expect(closed.body.error.message).toMatch(/hand-in closed/);
    await tomasz.post(`${base()}/extensions`, { userId: await userIdByEmail('lukas@modewright.test'), dueAt: new Date(Date.now() + 86_400_000).toISOString() }).expect(403);
    await mara.post(`${base()}/extensions`, { userId: await userIdByEmail('lukas@modewright.test'), dueAt: new Date(Date.now() + 86_400_000).toISOString(), comment: 'illness' }).expect(204);
    const onTime = await handInText(lukas, csvOf(lukasRef.reference!.eigenvalues)).expect(202);
    const s2 = await settled(onTime.body.submission.id);
    expect(s2.late).toBe(false);
    await Assignment.update({ dueAt: new Date(Date.now() + 7 * 86_400_000) }, { where: { id: assignmentId } });
  });
});

describe('copy signals and review', () => {
  it('flags a submission that fits another student\'s variant better than its own, and byte-identical files, naming the other student to staff only', async () => {
    const sofia = await signedIn(app, 'sofia@modewright.test');
    const dmitri = await signedIn(app, 'dmitri@modewright.test');
    const priyaRef = await referenceOf(demo.student);
    const copied = csvOf(priyaRef.reference!.eigenvalues);
    const a = await handInText(sofia, copied).expect(202);
    const b = await handInText(dmitri, copied).expect(202);
    await settled(a.body.submission.id);
    await settled(b.body.submission.id);
    const [sofiaRow] = await staffView('sofia@modewright.test');
    const fit = sofiaRow.flags.find((f) => f.code === 'fits-other-variant');
    expect(fit?.otherStudent?.displayName).toBe('Priya Halvorsen');
    const [dmitriRow] = await staffView('dmitri@modewright.test');
    const same = dmitriRow.flags.find((f) => f.code === 'identical-file');
    expect(same?.otherStudent?.displayName).toBe('Sofia Marchetti');
    const evidence = (await tomasz.get(`${base()}/submissions/${sofiaRow.id}/evidence?flag=${fit!.id}`).expect(200)).body;
    expect(evidence.sides).toHaveLength(2);
    expect(evidence.sides[0].pointsOther).toBeGreaterThan(evidence.sides[0].pointsOwn);
    // The student sees no other student's name.
    const mine = (await sofia.get(`${base()}/submissions/mine`).expect(200)).body;
    expect(JSON.stringify(mine)).not.toMatch(/Priya/);
    // In the review queue with a sentence per reason.
    const queue = (await tomasz.get(`/api/courses/${courseId}/reviews`).expect(200)).body.items as { submissionId: number; reasons: string[] }[];
    const item = queue.find((q) => q.submissionId === sofiaRow.id)!;
    expect(item.reasons.some((r) => /Priya Halvorsen's variant/.test(r))).toBe(true);
  });

  it('override (comment required), return and second look each add a score row and keep every earlier one', async () => {
    const [row] = await staffView('sofia@modewright.test');
    const bad = await tomasz.post(`${base()}/submissions/${row.id}/decision`, { action: 'override', points: 0 }).expect(400);
    expect(bad.body.error.details[0].path).toBe('comment');
    await tomasz.post(`${base()}/submissions/${row.id}/decision`, { action: 'override', points: 0, comment: 'Values of another student' }).expect(204);
    await priya.post(`${base()}/submissions/${row.id}/decision`, { action: 'accept' }).expect(403);
    const after = (await staffView('sofia@modewright.test'))[0];
    expect(after.scores.map((s) => [s.reason, s.points])).toEqual([
      ['autograde', after.scores[0].points],
      ['override', 0],
    ]);
    expect(after.scores[1]).toMatchObject({ author: 'Tomasz Wrenfield', comment: 'Values of another student' });
    expect(after.points).toBe(0);
    expect(after.flags.every((f) => !f.open)).toBe(true);

    const [dm] = await staffView('dmitri@modewright.test');
    await tomasz.post(`${base()}/submissions/${dm.id}/decision`, { action: 'return', comment: 'Compute on your own variant' }).expect(204);
    const dmitri = await signedIn(app, 'dmitri@modewright.test');
    const mine = (await dmitri.get(`${base()}/submissions/mine`).expect(200)).body as MySubmissionsResponse;
    expect(mine.submissions[0].staffComment).toBe('Compute on your own variant');
    expect(mine.attemptsLeft).toBe(3);

    // Scores are append-only in the database itself.
    await expect(ctx.sequelize.query(`UPDATE scores SET points = 5 WHERE "submissionId" = ${row.id}`)).rejects.toThrow(/append-only/);
  });

  it('a regrade of the whole assignment runs as a job with progress and keeps the earlier scores', async () => {
    const before = await Score.count();
    const subs = await Submission.count({ where: { assignmentId } });
    const rg = (await mara.post(`${base()}/regrade`, { reason: 'tolerance check' }).expect(202)).body;
    expect(rg.total).toBe(subs);
    await tomasz.post(`${base()}/regrade`, { reason: 'x' }).expect(403);
    const t0 = Date.now();
    let p = rg;
    while (p.state !== 'finished' && Date.now() - t0 < 60_000) {
      await new Promise((r) => setTimeout(r, 300));
      p = (await mara.get(`${base()}/regrades/${rg.id}`).expect(200)).body;
    }
    expect(p).toMatchObject({ done: subs, state: 'finished' });
    expect(await Score.count()).toBe(before + subs);
  });
});

describe('gradebook and release', () => {
  it('exports CSV that spreadsheets open safely', async () => {
    expect(['=1+1', '+x', '-2', '@A1', '\tx', '\rx', 'plain', '0.5'].map(safeCell)).toEqual(["'=1+1", "'+x", "'-2", "'@A1", "'\tx", "'\rx", 'plain', '0.5']);
    await ctx.sequelize.query(`UPDATE users SET "displayName" = '=HYPERLINK("http://x")' WHERE email = 'noor@modewright.test'`);
    const res = await mara.get(`/api/courses/${courseId}/gradebook.csv`).expect(200);
    expect(res.headers['content-type']).toMatch(/text\/csv/);
    expect(res.text).toContain(`"'=HYPERLINK(""http://x"")"`);
    expect(res.text).not.toMatch(/(^|,)=HYPERLINK/m);
    const g = (await tomasz.get(`/api/courses/${courseId}/gradebook`).expect(200)).body;
    const priyaRow = g.students.find((s: { email: string }) => s.email === demo.student);
    expect(priyaRow.cells[0]).toMatchObject({ points: 10, status: 'scored' });
    expect(g.stats[0].histogram.reduce((s: number, x: number) => s + x, 0)).toBeGreaterThan(0);
    await priya.get(`/api/courses/${courseId}/gradebook`).expect(403);
    // Nothing handed in is "open" while the due date is ahead and missing once it has passed.
    const noneCells = (b: typeof g) => b.students.flatMap((s: { cells: { status: string; open: boolean }[] }) => s.cells).filter((c: { status: string }) => c.status === 'none');
    expect(noneCells(g).length).toBeGreaterThan(0);
    expect(noneCells(g).every((c: { open: boolean }) => c.open)).toBe(true);
    const [[{ dueAt }]] = (await ctx.sequelize.query(`SELECT "dueAt" FROM assignments WHERE id = ${assignmentId}`)) as [{ dueAt: Date }[], unknown];
    await ctx.sequelize.query(`UPDATE assignments SET "dueAt" = now() - interval '1 hour' WHERE id = ${assignmentId}`);
    try {
      const after = (await tomasz.get(`/api/courses/${courseId}/gradebook`).expect(200)).body;
      expect(noneCells(after).length).toBe(noneCells(g).length);
      expect(noneCells(after).some((c: { open: boolean }) => c.open)).toBe(false);
    } finally {
      await ctx.sequelize.query(`UPDATE assignments SET "dueAt" = :dueAt WHERE id = ${assignmentId}`, { replacements: { dueAt } });
    }
  });

  it('the staff dashboard names the next action for the caller: publishing and releasing are the instructor\'s', async () => {
    const d = await mara.post(`/api/courses/${courseId}/datasets/scenario`, { name: 'Drift, draft', scenario: 'drift-map', seed: 5 }).expect(201);
    const draft: AssignmentConfigInput = {
      title: 'A draft the assistant may read',
      dueAt: new Date(Date.now() + 14 * 86_400_000).toISOString(),
      datasetId: d.body.id,
      method: { method: 'dmd', rankRule: { kind: 'rank', rank: 2 } },
    };
    await mara.post(`/api/courses/${courseId}/assignments`, draft).expect(201);
    const asMara = (await mara.get(`/api/courses/${courseId}/dashboard`).expect(200)).body as DashboardResponse;
    const asTomasz = (await tomasz.get(`/api/courses/${courseId}/dashboard`).expect(200)).body as DashboardResponse;
    await priya.get(`/api/courses/${courseId}/dashboard`).expect(403);
    const draftM = asMara.assignments.find((a) => a.status === 'draft');
    const draftT = asTomasz.assignments.find((a) => a.id === draftM?.id);
    expect(draftM?.next).toBe('Check the preview and publish');
    expect(draftT?.next).toBe('Draft: the instructor publishes it');
    // Everything but the wording of instructor-only steps is the same for both.
    const strip = (d: DashboardResponse) => d.assignments.map(({ next: _next, ...rest }) => rest);
    expect(strip(asTomasz)).toEqual(strip(asMara));
    for (const a of asTomasz.assignments) expect(a.next).not.toMatch(/^(Check the preview and publish|Release the scores)$/);
  });

  it('release sends exactly one mail per student with a score; a second look can then be asked and answered', async () => {
    const before = await mailIds();
    await tomasz.post(`${base()}/release`).expect(403);
    const res = await mara.post(`${base()}/release`).expect(202);
    // Every student whose latest attempt that was not returned has a score.
    const g = (await mara.get(`/api/courses/${courseId}/gradebook`).expect(200)).body as { students: { cells: { status: string }[] }[] };
    const scored = g.students.filter((s) => s.cells[0].status === 'scored').length;
    expect(scored).toBeGreaterThan(3);
    expect(res.body.messages).toBe(scored);
    const mail = await newMailTo(demo.student, before, 100);
    expect(mail).toHaveLength(1);
    expect(mail[0].subject).toMatch(/Your score for “Exact DMD of a sensor array”: 10 of 10/);
    expect(mail[0].text).toMatch(/\/assignments\//);
    // A second look of the same release sends nothing twice.
    await new Promise((r) => setTimeout(r, 1500));
    const all = (await newMailTo(demo.student, before, 1)).filter((m) => /Your score/.test(m.subject));
    expect(all).toHaveLength(1);

    const mine = (await priya.get(`${base()}/submissions/mine`).expect(200)).body as MySubmissionsResponse;
    expect(mine.released).toBe(true);
    expect(mine.submissions[0].report!.parts[0].matches[0].reference).toBeDefined();
    const sid = mine.submissions[0].id;
    await priya.post(`${base()}/submissions/${sid}/second-look`, { comment: 'Please check the real value' }).expect(201);
    await priya.post(`${base()}/submissions/${sid}/second-look`, { comment: 'Please check again' }).expect(409);
    const queue = (await tomasz.get(`/api/courses/${courseId}/reviews`).expect(200)).body.items as { reviewId: number; kind: string; submissionId: number }[];
    const item = queue.find((q) => q.kind === 'second-look' && q.submissionId === sid)!;
    await tomasz.post(`/api/courses/${courseId}/reviews/${item.reviewId}/answer`, { comment: 'Checked: the value is right.' }).expect(204);
    const again = (await priya.get(`${base()}/submissions/mine`).expect(200)).body as MySubmissionsResponse;
    expect(again.submissions[0].reviews![0]).toMatchObject({ state: 'answered', decisionComment: 'Checked: the value is right.' });
    const history = (await staffView(demo.student))[0].scores.map((s) => s.reason);
    expect(history).toEqual(['autograde', 'regrade', 'second-look']);
  });
});
