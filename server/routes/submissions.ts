import { Router } from 'express';
import multer from 'multer';
import { stringify } from 'csv-stringify/sync';
import type { Sequelize } from 'sequelize';
import { pasteSubmissionBody, type CreatedSubmission, type MySubmissionsResponse, type StaffSubmissionsResponse } from '../../shared/submission.js';
import { badRequest, HttpError } from '../errors.js';
import { currentUser, idParam, requireCourseRole, staffRoles } from '../middleware/auth.js';
import { parseBody } from '../middleware/validate.js';
import type { JobQueue } from '../jobs/queue.js';
import type { MailDeps } from '../services/outbox.js';
import { findAssignment } from '../services/assignments.js';
import {
  MAX_SUBMISSION_BYTES,
  answerSecondLook,
  askSecondLook,
  copyEvidence,
  dashboard,
  decide,
  grantExtension,
  gradebook,
  handIn,
  mySubmissions,
  regradeProgress,
  release,
  reviewQueue,
  staffSubmissions,
  startRegrade,
  type SubmissionDeps,
} from '../services/submissions.js';

/** A spreadsheet must never run a cell as a formula: a cell that begins with =, +, -, @, tab or carriage return is escaped with a leading apostrophe. */
export function safeCell(v: unknown): string {
  const s = v === null || v === undefined ? '' : String(v);
  return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
}

const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_SUBMISSION_BYTES, files: 1, fields: 4 } }).single('file');

/** Routes under /api/courses/:courseId/assignments/:assignmentId (hand-in, submissions, decisions, extensions, regrades, release). */
export function assignmentSubmissionsRouter({ sequelize, queue, mail, siteUrl }: { sequelize: Sequelize; queue: JobQueue | null; mail?: MailDeps; siteUrl?: string }): Router {
  const router = Router({ mergeParams: true });
  const deps: SubmissionDeps = { sequelize, queue, mail, siteUrl };
  const load = (req: Parameters<typeof idParam>[0]) => findAssignment(req.courseId!, idParam(req, 'assignmentId'), req.enrollment!.role);

  router.post('/submissions', requireCourseRole('student'), (req, res, next) => {
    if (!req.is('multipart/form-data')) return next();
    upload(req, res, (err: unknown) => {
      const e = err as { code?: string } | undefined;
      if (e?.code === 'LIMIT_FILE_SIZE') return next(new HttpError(413, 'payload-too-large', `A hand-in is at most ${MAX_SUBMISSION_BYTES / 1024 / 1024} MB`, [{ path: 'file', message: 'File too large' }]));
      next(err);
    });
  }, async (req, res) => {
    const a = await load(req);
    let input: { fileName: string; bytes: Uint8Array; source: 'file' | 'text' };
    if (req.file) input = { fileName: req.file.originalname || 'submission', bytes: req.file.buffer, source: 'file' };
    else if (req.is('multipart/form-data')) throw badRequest('Choose a file to hand in', [{ path: 'file', message: 'Choose a file (field "file")' }]);
    else {
      const { text } = parseBody(pasteSubmissionBody, req.body);
      input = { fileName: 'pasted.txt', bytes: new TextEncoder().encode(text), source: 'text' };
    }
    const s = await handIn(deps, a, currentUser(req), input);
    const body: CreatedSubmission = { submission: { id: s.id, status: s.status, attempt: s.attempt } };
    res.status(202).json(body);
  });

  router.get('/submissions/mine', requireCourseRole('student'), async (req, res) => {
    const body: MySubmissionsResponse = await mySubmissions(await load(req), currentUser(req));
    res.json(body);
  });

  router.get('/submissions', requireCourseRole(...staffRoles), async (req, res) => {
    const raw = req.query.student;
    let student: number | null = null;
    if (raw !== undefined) {
      student = Number(raw);
      if (typeof raw !== 'string' || !Number.isInteger(student) || student <= 0) throw badRequest('student must be a user id', [{ path: 'student', message: 'Expected a positive whole number' }]);
    }
    const body: StaffSubmissionsResponse = { submissions: await staffSubmissions(await load(req), student) };
    res.json(body);
  });

  router.get('/submissions/:submissionId/evidence', requireCourseRole(...staffRoles), async (req, res) => {
    const flag = Number(req.query.flag);
    if (!Number.isInteger(flag) || flag <= 0) throw badRequest('flag must be a flag id', [{ path: 'flag', message: 'Expected a positive whole number' }]);
    res.json(await copyEvidence(await load(req), idParam(req, 'submissionId'), flag));
  });

  router.post('/submissions/:submissionId/decision', requireCourseRole(...staffRoles), async (req, res) => {
    await decide(deps, await load(req), idParam(req, 'submissionId'), currentUser(req), req.body);
    res.status(204).end();
  });

  router.post('/submissions/:submissionId/second-look', requireCourseRole('student'), async (req, res) => {
    await askSecondLook(deps, await load(req), idParam(req, 'submissionId'), currentUser(req), req.body);
    res.status(201).json({ ok: true });
  });

  router.post('/extensions', requireCourseRole('instructor'), async (req, res) => {
    await grantExtension(deps, await load(req), currentUser(req), req.body);
    res.status(204).end();
  });

  router.post('/regrade', requireCourseRole('instructor'), async (req, res) => {
    res.status(202).json(await startRegrade(deps, await load(req), currentUser(req), req.body));
  });

  router.get('/regrades/:regradeId', requireCourseRole(...staffRoles), async (req, res) => {
    res.json(await regradeProgress(await load(req), idParam(req, 'regradeId')));
  });

  router.post('/release', requireCourseRole('instructor'), async (req, res) => {
    res.status(202).json(await release(deps, await load(req), currentUser(req)));
  });

  return router;
}

/** Routes under /api/courses/:courseId for staff: review queue, gradebook (JSON and CSV), dashboard. */
export function courseGradingRouter({ sequelize, queue, mail, siteUrl }: { sequelize: Sequelize; queue: JobQueue | null; mail?: MailDeps; siteUrl?: string }): Router {
  const router = Router({ mergeParams: true });
  const deps: SubmissionDeps = { sequelize, queue, mail, siteUrl };

  router.get('/reviews', requireCourseRole(...staffRoles), async (req, res) => {
    res.json({ items: await reviewQueue(sequelize, req.courseId!) });
  });
  router.post('/reviews/:reviewId/answer', requireCourseRole(...staffRoles), async (req, res) => {
    await answerSecondLook(deps, req.courseId!, idParam(req, 'reviewId'), currentUser(req), req.body);
    res.status(204).end();
  });
  router.get('/gradebook', requireCourseRole(...staffRoles), async (req, res) => {
    res.json(await gradebook(sequelize, req.courseId!));
  });
  router.get('/gradebook.csv', requireCourseRole(...staffRoles), async (req, res) => {
    const g = await gradebook(sequelize, req.courseId!);
    const header = ['student', 'email', ...g.assignments.flatMap((a) => [`${a.title} (of ${a.maxPoints})`, `${a.title}: late`, `${a.title}: flagged`])];
    const rows = g.students.map((s) => [s.displayName, s.email, ...s.cells.flatMap((c) => [c.points ?? '', c.late ? 'late' : '', c.flagged ? 'flagged' : ''])]);
    const csv = stringify([header, ...rows].map((r) => r.map(safeCell)));
    res.set('Content-Disposition', `attachment; filename="gradebook-course-${req.courseId}.csv"`).type('text/csv').send(csv);
  });
  router.get('/dashboard', requireCourseRole(...staffRoles), async (req, res) => {
    res.json(await dashboard(sequelize, req.courseId!, req.enrollment!.role));
  });
  return router;
}
