/**
 * Submissions: hand-in (raw bytes stored in the same transaction that records
 * the submission, before any scoring), the grade job (scorer against the
 * student's own reference, late penalty, copy signals), staff decisions,
 * second looks, extensions, regrades, gradebook, dashboard and release.
 * Scores move only through new rows, each with its reason, author and time.
 */
import { createHash, randomUUID } from 'node:crypto';
import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { readSubmission, readSubmissionText, formatSubmissionError, type ExpectedPart, type Submission as ReadSubmission } from '../../grading/formats/submission.js';
import { gradeSubmission } from '../../grading/scoring/score.js';
import type { ReferenceSpectrum as ReferenceJson } from '../../shared/reference.js';
import type { ScoreReport } from '../../shared/score-report.js';
import {
  decisionBody,
  extensionBody,
  regradeBody,
  answerSecondLookBody,
  secondLookBody,
  type CopyEvidence,
  type DashboardResponse,
  type FlagRow,
  type GradebookResponse,
  type MySubmission,
  type MySubmissionsResponse,
  type RegradeProgress,
  type ReviewQueueItem,
  type ReviewRow,
  type ScoreRow,
  type StaffSubmission,
  type SubmissionStatus,
  type ValueStatus,
} from '../../shared/submission.js';
import type { AssignmentConfig, AssignmentSummary } from '../../shared/assignment.js';
import type { Role } from '../../shared/api.js';
import { badRequest, conflict, forbidden, HttpError, notFound } from '../errors.js';
import { parseBody } from '../middleware/validate.js';
import { Assignment, AssignmentVersion, Enrollment, Extension, Flag, ReferenceSpectrum, Regrade, Review, Score, Submission, User, Variant } from '../models/index.js';
import type { JobQueue } from '../jobs/queue.js';
import { gradingSettingsOf } from './assignments.js';
import { audit } from './audit.js';
import { enqueueMails, type MailDeps } from './outbox.js';

export interface SubmissionDeps {
  sequelize: Sequelize;
  queue: JobQueue | null;
  mail?: MailDeps;
  /** Public address of the site, for links in mail. */
  siteUrl?: string;
}

const DAY = 86_400_000;
const sha = (b: Uint8Array) => createHash('sha256').update(b).digest('hex');
/** Largest hand-in file (the scorer's readers refuse more anyway). */
export const MAX_SUBMISSION_BYTES = 8 * 1024 * 1024;

async function versionOf(assignment: Assignment, transaction?: Transaction): Promise<AssignmentVersion> {
  const v = await AssignmentVersion.findOne({ where: { assignmentId: assignment.id, version: assignment.currentVersion }, transaction });
  if (!v) throw notFound('This assignment has no configuration');
  return v;
}

const expectedParts = (config: AssignmentConfig): ExpectedPart[] => config.parts.map((p) => ({ name: p.name, kind: p.kind }));

/** Parse what a student handed in with the scorer's readers; a located error comes back as 422. */
export function readHandIn(config: AssignmentConfig, input: { fileName: string; bytes: Uint8Array; source: 'file' | 'text' }): ReadSubmission {
  const parts = expectedParts(config);
  const r =
    input.source === 'text'
      ? readSubmissionText(new TextDecoder().decode(input.bytes), input.fileName, { parts })
      : readSubmission([{ name: input.fileName, bytes: input.bytes }], { parts });
  if (!r.ok) {
    const message = `${formatSubmissionError(r.error)} (no attempt was used)`;
    throw new HttpError(422, 'bad-request', message, [{ path: input.source === 'text' ? 'text' : 'file', message, line: r.error.line, column: r.error.column, part: r.error.part }]);
  }
  return r.submission;
}

interface Timing {
  dueAt: Date;
  cutoffAt: Date;
  extendedTo: Date | null;
}

async function timingFor(assignment: Assignment, config: AssignmentConfig, userId: number): Promise<Timing> {
  const ext = await Extension.findOne({ where: { assignmentId: assignment.id, userId } });
  const dueAt = ext?.dueAt ?? assignment.dueAt;
  return { dueAt, cutoffAt: new Date(dueAt.getTime() + config.latePolicy.cutoffDays * DAY), extendedTo: ext?.dueAt ?? null };
}

const attemptsUsed = (assignmentId: number, userId: number, transaction?: Transaction) => Submission.count({ where: { assignmentId, userId, returned: false }, transaction });

/** Hand in: checks, reads, stores the bytes and queues the grade job. */
export async function handIn(deps: SubmissionDeps, assignment: Assignment, user: User, input: { fileName: string; bytes: Uint8Array; source: 'file' | 'text' }): Promise<Submission> {
  if (assignment.status === 'closed') throw conflict('This assignment is closed; hand-ins are no longer accepted');
  if (assignment.status !== 'published') throw notFound('There is no such assignment in this course');
  const version = await versionOf(assignment);
  const config = version.config;
  const now = new Date(); // server time
  const t = await timingFor(assignment, config, user.id);
  if (now > t.cutoffAt) throw conflict(`The hand-in closed at ${t.cutoffAt.toISOString()} (${config.latePolicy.cutoffDays} day(s) after the due date)`);
  if (input.bytes.byteLength === 0) throw badRequest('The file is empty', [{ path: input.source === 'text' ? 'text' : 'file', message: 'The file is empty' }]);
  if (input.bytes.byteLength > MAX_SUBMISSION_BYTES) throw new HttpError(413, 'payload-too-large', `A hand-in is at most ${MAX_SUBMISSION_BYTES / 1024 / 1024} MB`);
  readHandIn(config, input); // located error at once, no attempt used
  const variant = await Variant.findOne({ where: { assignmentId: assignment.id, recipeKey: version.recipeKey, userId: user.id } });
  if (!variant) throw conflict('Your variant of the data is still being prepared; try again in a minute');
  const late = now > t.dueAt;
  const daysLate = late ? Math.ceil((now.getTime() - t.dueAt.getTime()) / DAY) : 0;
  const submission = await deps.sequelize.transaction(async (transaction) => {
    // One hand-in at a time per student and assignment, so attempts are counted right.
    await deps.sequelize.query('SELECT pg_advisory_xact_lock(:a, :u)', { replacements: { a: assignment.id, u: user.id }, transaction });
    const used = await attemptsUsed(assignment.id, user.id, transaction);
    if (used >= config.attempts) throw conflict(`No attempts left: ${config.attempts} allowed, ${used} used`);
    const last = (await Submission.max('attempt', { where: { assignmentId: assignment.id, userId: user.id }, transaction })) as number | null;
    return Submission.create(
      {
        assignmentId: assignment.id,
        userId: user.id,
        variantId: variant.id,
        assignmentVersionId: version.id,
        attempt: (last ?? 0) + 1,
        source: input.source,
        fileName: input.fileName.slice(0, 255),
        bytes: Buffer.from(input.bytes),
        sha256: sha(input.bytes),
        receivedAt: now,
        dueAt: t.dueAt,
        late,
        daysLate,
        message: null,
      },
      { transaction },
    );
  });
  if (deps.queue) await deps.queue.send('grade', { submissionId: submission.id, gradeKey: 'auto' });
  return submission;
}

// ------------------------------------------------------------------ the grade job

export type Scorer = typeof gradeSubmission;

interface GradeContext {
  sequelize: Sequelize;
  scorer?: Scorer;
}

// Lateness is applied by the rules and shown; it does not by itself need a person to look.
const flagNeedsReview = (code: string) => code !== 'reader-warning' && code !== 'late';

/** Score a submission under one grading key ('auto', 'regrade-N'); a second run with the same key writes nothing. */
export async function runGradeJob(ctx: GradeContext, submissionId: number, gradeKey: string, lastAttempt: boolean): Promise<'done' | 'skipped' | 'waiting'> {
  const scorer = ctx.scorer ?? gradeSubmission;
  const sub = await Submission.findByPk(submissionId);
  if (!sub) return 'skipped';
  if (await Score.findOne({ where: { submissionId, gradeKey }, attributes: ['id'] })) return 'skipped';
  const assignment = await Assignment.findByPk(sub.assignmentId);
  if (!assignment) return 'skipped';
  const regradeId = gradeKey.startsWith('regrade-') ? Number(gradeKey.slice(8)) : null;
  const regrade = regradeId ? await Regrade.findByPk(regradeId) : null;
  const version = regrade ? await AssignmentVersion.findByPk(regrade.assignmentVersionId) : await AssignmentVersion.findByPk(sub.assignmentVersionId);
  if (!version) return 'skipped';
  const config = version.config;
  try {
    await sub.update({ status: 'grading' });
    let ref = await ReferenceSpectrum.findOne({ where: { variantId: sub.variantId, referenceKey: version.referenceKey } });
    if (!ref) {
      const own = await AssignmentVersion.findByPk(sub.assignmentVersionId);
      ref = own ? await ReferenceSpectrum.findOne({ where: { variantId: sub.variantId, referenceKey: own.referenceKey } }) : null;
    }
    if (ref && ref.status === 'failed') throw new Error(`the reference of this variant failed: ${ref.message}`);
    if (!ref || ref.status !== 'ready' || !ref.reference) {
      // Still being computed: the caller sends the job again a little later (this is not a failed attempt).
      await sub.update({ status: 'received' });
      return 'waiting';
    }
    const read = readHandIn(config, { fileName: sub.fileName, bytes: sub.bytes, source: sub.source });
    const dt = ref.reference.dt ?? null;
    const settings = gradingSettingsOf(config, config.dt ?? dt);
    const report = scorer({ reference: ref.reference, extras: ref.extras ?? undefined, submission: read, settings });
    const penalty = sub.late ? Math.min(1, (config.latePolicy.penaltyPerDay / 100) * sub.daysLate) : 0;
    const points = round(report.points * (1 - penalty));

    // Copy signals: identical bytes from another student; a clearly better fit to another student's variant.
    const flags: { code: string; message: string; otherUserId: number | null; otherSubmissionId: number | null }[] = report.flags.map((f) => ({ code: f.code, message: f.message, otherUserId: null, otherSubmissionId: null }));
    if (penalty > 0) flags.push({ code: 'late', message: `Handed in ${sub.daysLate} day(s) late: ${Math.round(penalty * 100)}% of the points taken off.`, otherUserId: null, otherSubmissionId: null });
    const twin = await Submission.findOne({ where: { assignmentId: sub.assignmentId, sha256: sub.sha256, userId: { [Op.ne]: sub.userId } }, order: [['receivedAt', 'ASC']], include: [{ model: User, as: 'user', attributes: ['displayName'] }] });
    if (twin) {
      const name = (twin as unknown as { user?: User }).user?.displayName ?? 'another student';
      flags.push({ code: 'identical-file', message: `The file is byte for byte the same as one handed in by ${name}.`, otherUserId: twin.userId, otherSubmissionId: twin.id });
    }
    const others = await ctx.sequelize.query<{ userId: number; displayName: string; reference: ReferenceJson }>(
      `SELECT v."userId", u."displayName", r.reference FROM variants v
         JOIN users u ON u.id = v."userId"
         JOIN reference_spectra r ON r."variantId" = v.id AND r."referenceKey" = :key AND r.status = 'ready'
        WHERE v."assignmentId" = :aid AND v."userId" IS NOT NULL AND v."userId" <> :uid AND v."recipeKey" = :recipe AND v.mode = 'per-student'`,
      { type: QueryTypes.SELECT, replacements: { key: ref.referenceKey, aid: sub.assignmentId, uid: sub.userId, recipe: version.recipeKey } },
    );
    let best: { userId: number; displayName: string; points: number } | null = null;
    for (const o of others) {
      const p = scorer({ reference: o.reference, submission: read, settings: { ...settings, parts: settings.parts.filter((x) => x.kind === 'eigenvalues') } }).points;
      if (!best || p > best.points) best = { userId: o.userId, displayName: o.displayName, points: p };
    }
    const evMax = settings.parts.filter((x) => x.kind === 'eigenvalues').reduce((s, x) => s + x.weight, 0);
    const ownEv = report.parts.filter((x) => x.kind === 'eigenvalues').reduce((s, x) => s + x.points, 0);
    if (best && evMax > 0 && best.points >= 0.9 * evMax && best.points - ownEv >= 0.25 * evMax) {
      flags.push({
        code: 'fits-other-variant',
        message: `The eigenvalues fit ${best.displayName}'s variant (${fmt(best.points)} of ${fmt(evMax)} points) clearly better than the student's own (${fmt(ownEv)}).`,
        otherUserId: best.userId,
        otherSubmissionId: null,
      });
    }

    const wrote = await ctx.sequelize.transaction(async (transaction) => {
      const [score, created] = await Score.findOrCreate({
        where: { submissionId, gradeKey },
        defaults: {
          submissionId,
          referenceId: ref!.id,
          gradeKey,
          points,
          maxPoints: report.maxPoints,
          latePenalty: penalty,
          report,
          reason: regrade ? 'regrade' : 'autograde',
          authorId: regrade?.requestedById ?? null,
          comment: regrade ? regrade.reason : null,
          assignmentVersion: version.version,
        },
        transaction,
      });
      if (!created) return false;
      if (flags.length) await Flag.bulkCreate(flags.map((f) => ({ ...f, submissionId, scoreId: score.id })), { transaction });
      if (flags.some((f) => flagNeedsReview(f.code))) {
        const open = await Review.findOne({ where: { submissionId, kind: 'flag', state: 'open' }, transaction });
        if (!open) await Review.create({ submissionId, kind: 'flag', requestComment: null, requestedById: null, decisionComment: null, decidedById: null, decidedAt: null, scoreId: score.id }, { transaction });
      }
      await Submission.update({ status: 'scored', message: null }, { where: { id: submissionId }, transaction });
      return true;
    });
    return wrote ? 'done' : 'skipped';
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    await Submission.update({ status: lastAttempt ? 'failed' : 'received', message }, { where: { id: submissionId } });
    if (lastAttempt && regrade) await Regrade.increment('failed', { where: { id: regrade.id } });
    throw e;
  }
}

const round = (x: number) => Math.round(x * 1e6) / 1e6;
const fmt = (x: number) => String(Number(x.toFixed(2)));

// ------------------------------------------------------------------ reading

async function latestScores(submissionIds: number[]): Promise<Map<number, Score>> {
  return (await scoreHistory(submissionIds)).latest;
}

/** The latest score row of each submission, and the latest one that carries a scorer's report (staff rows set points, not reports). */
async function scoreHistory(submissionIds: number[]): Promise<{ latest: Map<number, Score>; withReport: Map<number, Score> }> {
  const latest = new Map<number, Score>();
  const withReport = new Map<number, Score>();
  if (submissionIds.length === 0) return { latest, withReport };
  const rows = await Score.findAll({ where: { submissionId: { [Op.in]: submissionIds } }, order: [['id', 'ASC']] });
  for (const r of rows) {
    latest.set(r.submissionId, r);
    if (r.report) withReport.set(r.submissionId, r);
  }
  return { latest, withReport };
}

function valueStatuses(report: ScoreReport): ValueStatus[] {
  const part = report.parts.find((p) => p.kind === 'eigenvalues');
  if (!part) return [];
  const out: ValueStatus[] = [];
  for (const m of part.matches) {
    out.push({ submitted: m.submitted, status: m.status === 'full' ? 'matched' : m.status === 'near-miss' ? 'near-miss' : m.status === 'excluded' ? 'not-graded' : 'unmatched' });
  }
  for (const e of part.extra) out.push({ submitted: e.submitted, status: 'unmatched' });
  return out;
}

const reviewDto = (r: Review & { decidedBy?: User | null }): ReviewRow => ({
  id: r.id,
  kind: r.kind,
  state: r.state,
  requestComment: r.requestComment,
  decisionComment: r.decisionComment,
  decidedBy: r.decidedBy?.displayName ?? null,
  decidedAt: r.decidedAt ? r.decidedAt.toISOString() : null,
  createdAt: r.createdAt.toISOString(),
});

export async function mySubmissions(assignment: Assignment, user: User): Promise<MySubmissionsResponse> {
  const version = await versionOf(assignment);
  const config = version.config;
  const released = assignment.releasedAt !== null;
  const subs = await Submission.findAll({ where: { assignmentId: assignment.id, userId: user.id }, attributes: { exclude: ['bytes'] }, order: [['attempt', 'ASC']] });
  const { latest: scores, withReport } = await scoreHistory(subs.map((s) => s.id));
  const reviews = await Review.findAll({ where: { submissionId: { [Op.in]: subs.map((s) => s.id) } }, include: [{ model: User, as: 'decidedBy', attributes: ['displayName'] }], order: [['id', 'ASC']] });
  const t = await timingFor(assignment, config, user.id);
  const used = subs.filter((s) => !s.returned).length;
  return {
    submissions: subs.map((s): MySubmission => {
      const score = scores.get(s.id);
      const mine = reviews.filter((r) => r.submissionId === s.id);
      const out: MySubmission = {
        id: s.id,
        attempt: s.attempt,
        status: s.status,
        receivedAt: s.receivedAt.toISOString(),
        fileName: s.fileName,
        late: s.late,
        daysLate: s.daysLate,
        provisional: !released,
      };
      if (score && (released || config.feedback !== 'nothing')) {
        out.points = score.points;
        out.maxPoints = score.maxPoints;
      }
      const report = withReport.get(s.id)?.report;
      if (report && !released && config.feedback === 'status') out.values = valueStatuses(report);
      if (report && released) out.report = report;
      // What staff wrote: a return or an answer at once; points they set, once released.
      const returned = [...mine].reverse().find((r) => r.state === 'returned' || r.state === 'answered');
      if (returned || s.returned) out.staffComment = returned?.decisionComment ?? null;
      else if (released && score && score.reason === 'override' && score.comment) out.staffComment = score.comment;
      if (released) {
        out.reviews = mine.filter((r) => r.kind === 'second-look').map(reviewDto);
        out.canAskSecondLook = Boolean(score) && !mine.some((r) => r.kind === 'second-look' && r.state === 'open');
      }
      return out;
    }),
    attemptsLeft: Math.max(0, config.attempts - used),
    dueAt: assignment.dueAt.toISOString(),
    extendedTo: t.extendedTo ? t.extendedTo.toISOString() : null,
    cutoffAt: t.cutoffAt.toISOString(),
    released,
  };
}

export async function staffSubmissions(assignment: Assignment, studentId: number | null): Promise<StaffSubmission[]> {
  const subs = await Submission.findAll({
    where: { assignmentId: assignment.id, ...(studentId !== null ? { userId: studentId } : {}) },
    attributes: { exclude: ['bytes'] },
    include: [{ model: User, as: 'user', attributes: ['id', 'displayName', 'email'] }],
    order: [['userId', 'ASC'], ['attempt', 'ASC']],
  });
  const ids = subs.map((s) => s.id);
  const [scores, flags, reviews] = await Promise.all([
    Score.findAll({ where: { submissionId: { [Op.in]: ids } }, include: [{ model: User, as: 'author', attributes: ['displayName'] }], order: [['id', 'ASC']] }),
    Flag.findAll({ where: { submissionId: { [Op.in]: ids } }, include: [{ model: User, as: 'otherUser', attributes: ['id', 'displayName'] }], order: [['id', 'ASC']] }),
    Review.findAll({ where: { submissionId: { [Op.in]: ids } }, include: [{ model: User, as: 'decidedBy', attributes: ['displayName'] }], order: [['id', 'ASC']] }),
  ]);
  return subs.map((s) => {
    const u = (s as unknown as { user: User }).user;
    const mine = scores.filter((x) => x.submissionId === s.id);
    const last = mine[mine.length - 1];
    return {
      id: s.id,
      student: { id: u.id, displayName: u.displayName, email: u.email },
      attempt: s.attempt,
      status: s.status,
      receivedAt: s.receivedAt.toISOString(),
      fileName: s.fileName,
      late: s.late,
      daysLate: s.daysLate,
      points: last ? last.points : null,
      maxPoints: last ? last.maxPoints : null,
      report: [...mine].reverse().find((x) => x.report)?.report ?? null,
      message: s.message,
      flags: flags
        .filter((f) => f.submissionId === s.id)
        .map((f): FlagRow => {
          const o = (f as unknown as { otherUser?: User | null }).otherUser;
          return { id: f.id, code: f.code, message: f.message, otherStudent: o ? { id: o.id, displayName: o.displayName } : null, otherSubmissionId: f.otherSubmissionId, open: f.open };
        }),
      scores: mine.map(
        (x): ScoreRow => ({
          id: x.id,
          points: x.points,
          maxPoints: x.maxPoints,
          latePenalty: x.latePenalty,
          reason: x.reason,
          author: (x as unknown as { author?: User | null }).author?.displayName ?? null,
          comment: x.comment,
          createdAt: x.createdAt.toISOString(),
          assignmentVersion: x.assignmentVersion,
        }),
      ),
      reviews: reviews.filter((r) => r.submissionId === s.id).map(reviewDto),
    };
  });
}

async function findSubmission(assignment: Assignment, submissionId: number): Promise<Submission> {
  const s = await Submission.findOne({ where: { id: submissionId, assignmentId: assignment.id }, attributes: { exclude: ['bytes'] } });
  if (!s) throw notFound('There is no such submission for this assignment');
  return s;
}

/** Staff: accept, override the points (a comment is required), or return to the student with a comment. Each writes a new score row. */
export async function decide(deps: SubmissionDeps, assignment: Assignment, submissionId: number, staff: User, body: unknown): Promise<void> {
  const b = parseBody(decisionBody, body);
  const sub = await findSubmission(assignment, submissionId);
  await deps.sequelize.transaction(async (transaction) => {
    const last = await Score.findOne({ where: { submissionId }, order: [['id', 'DESC']], transaction });
    if (!last) throw conflict('This submission has no score yet; wait for the autograder or regrade it');
    if (b.action === 'override' && b.points! > last.maxPoints) throw badRequest(`At most ${last.maxPoints} points`, [{ path: 'points', message: `At most ${last.maxPoints} points` }]);
    const points = b.action === 'override' ? b.points! : last.points;
    const score = await Score.create(
      {
        submissionId,
        referenceId: last.referenceId,
        gradeKey: `${b.action}-${randomUUID()}`,
        points,
        maxPoints: last.maxPoints,
        latePenalty: last.latePenalty,
        report: null,
        reason: b.action,
        authorId: staff.id,
        comment: b.comment || null,
        assignmentVersion: last.assignmentVersion,
      },
      { transaction },
    );
    const state = b.action === 'accept' ? 'accepted' : b.action === 'override' ? 'overridden' : 'returned';
    const open = await Review.findOne({ where: { submissionId, state: 'open' }, transaction });
    if (open) await open.update({ state, decidedById: staff.id, decidedAt: new Date(), decisionComment: b.comment || null, scoreId: score.id }, { transaction });
    else await Review.create({ submissionId, kind: 'flag', state, requestComment: null, requestedById: null, decidedById: staff.id, decidedAt: new Date(), decisionComment: b.comment || null, scoreId: score.id }, { transaction });
    await Flag.update({ open: false }, { where: { submissionId }, transaction });
    // A returned attempt does not count against the student's attempts.
    if (b.action === 'return') await Submission.update({ returned: true }, { where: { id: submissionId }, transaction });
    await audit(transaction, {
      courseId: assignment.courseId,
      actorId: staff.id,
      action: `score.${state}`,
      subjectType: 'submission',
      subjectId: sub.id,
      before: { points: last.points, scoreId: last.id },
      after: { points, scoreId: score.id, comment: b.comment || null },
    });
  });
}

/** A student asks for a second look at a released score. */
export async function askSecondLook(deps: SubmissionDeps, assignment: Assignment, submissionId: number, student: User, body: unknown): Promise<void> {
  const b = parseBody(secondLookBody, body);
  const sub = await findSubmission(assignment, submissionId);
  if (sub.userId !== student.id) throw forbidden('You can ask only about your own submissions');
  if (!assignment.releasedAt) throw conflict('Scores are not released yet; a second look can be asked once they are');
  const existing = await Review.findOne({ where: { submissionId, kind: 'second-look', state: 'open' } });
  if (existing) throw conflict('A second look at this submission is already waiting');
  await Review.create({ submissionId, kind: 'second-look', requestComment: b.comment, requestedById: student.id, decisionComment: null, decidedById: null, decidedAt: null, scoreId: null });
  void deps;
}

/** Staff answer a second look, with new points or the same. */
export async function answerSecondLook(deps: SubmissionDeps, courseId: number, reviewId: number, staff: User, body: unknown): Promise<void> {
  const b = parseBody(answerSecondLookBody, body);
  await deps.sequelize.transaction(async (transaction) => {
    const review = await Review.findByPk(reviewId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!review || review.kind !== 'second-look') throw notFound('There is no such second-look request');
    const sub = await Submission.findByPk(review.submissionId, { attributes: ['id', 'assignmentId'], transaction });
    const assignment = sub ? await Assignment.findByPk(sub.assignmentId, { transaction }) : null;
    if (!assignment || assignment.courseId !== courseId) throw notFound('There is no such second-look request');
    if (review.state !== 'open') throw conflict('This request has been answered already');
    const last = await Score.findOne({ where: { submissionId: review.submissionId }, order: [['id', 'DESC']], transaction });
    if (!last) throw conflict('This submission has no score');
    if (b.points !== undefined && b.points > last.maxPoints) throw badRequest(`At most ${last.maxPoints} points`, [{ path: 'points', message: `At most ${last.maxPoints} points` }]);
    const points = b.points ?? last.points;
    const score = await Score.create(
      { submissionId: review.submissionId, referenceId: last.referenceId, gradeKey: `second-look-${review.id}`, points, maxPoints: last.maxPoints, latePenalty: last.latePenalty, report: null, reason: 'second-look', authorId: staff.id, comment: b.comment, assignmentVersion: last.assignmentVersion },
      { transaction },
    );
    await review.update({ state: 'answered', decidedById: staff.id, decidedAt: new Date(), decisionComment: b.comment, scoreId: score.id }, { transaction });
    await audit(transaction, { courseId, actorId: staff.id, action: 'score.second-look-answered', subjectType: 'submission', subjectId: review.submissionId, before: { points: last.points }, after: { points, comment: b.comment } });
  });
}

export async function reviewQueue(sequelize: Sequelize, courseId: number): Promise<ReviewQueueItem[]> {
  const rows = await sequelize.query<{ reviewId: number; kind: 'flag' | 'second-look'; requestComment: string | null; createdAt: Date; submissionId: number; attempt: number; assignmentId: number; title: string; userId: number; displayName: string }>(
    `SELECT r.id AS "reviewId", r.kind, r."requestComment", r."createdAt", s.id AS "submissionId", s.attempt, a.id AS "assignmentId", a.title, u.id AS "userId", u."displayName"
       FROM reviews r JOIN submissions s ON s.id = r."submissionId" JOIN assignments a ON a.id = s."assignmentId" JOIN users u ON u.id = s."userId"
      WHERE a."courseId" = :courseId AND r.state = 'open' ORDER BY r."createdAt" ASC`,
    { type: QueryTypes.SELECT, replacements: { courseId } },
  );
  const ids = rows.map((r) => r.submissionId);
  const [flags, scores] = await Promise.all([Flag.findAll({ where: { submissionId: { [Op.in]: ids }, open: true }, attributes: ['submissionId', 'message'] }), latestScores(ids)]);
  return rows.map((r) => ({
    reviewId: r.reviewId,
    kind: r.kind,
    assignment: { id: r.assignmentId, title: r.title },
    submissionId: r.submissionId,
    student: { id: r.userId, displayName: r.displayName },
    attempt: r.attempt,
    points: scores.get(r.submissionId)?.points ?? null,
    maxPoints: scores.get(r.submissionId)?.maxPoints ?? null,
    reasons: r.kind === 'second-look' ? [`The student asks for a second look: “${r.requestComment ?? ''}”`] : flags.filter((f) => f.submissionId === r.submissionId).map((f) => f.message),
    createdAt: new Date(r.createdAt).toISOString(),
  }));
}

export async function grantExtension(deps: SubmissionDeps, assignment: Assignment, staff: User, body: unknown): Promise<void> {
  const b = parseBody(extensionBody, body);
  const e = await Enrollment.findOne({ where: { courseId: assignment.courseId, userId: b.userId, role: 'student' } });
  if (!e) throw badRequest('That user is not a student of this course', [{ path: 'userId', message: 'Not a student of this course' }]);
  await deps.sequelize.transaction(async (transaction) => {
    const before = await Extension.findOne({ where: { assignmentId: assignment.id, userId: b.userId }, transaction });
    if (before) await before.update({ dueAt: new Date(b.dueAt), comment: b.comment || null, grantedById: staff.id }, { transaction });
    else await Extension.create({ assignmentId: assignment.id, userId: b.userId, dueAt: new Date(b.dueAt), comment: b.comment || null, grantedById: staff.id }, { transaction });
    await audit(transaction, { courseId: assignment.courseId, actorId: staff.id, action: 'extension.granted', subjectType: 'assignment', subjectId: assignment.id, before: before ? { userId: b.userId, dueAt: before.dueAt.toISOString() } : null, after: { userId: b.userId, dueAt: b.dueAt } });
  });
}

/** Regrade one submission or every latest attempt of the assignment under the current version, as jobs. */
export async function startRegrade(deps: SubmissionDeps, assignment: Assignment, staff: User, body: unknown): Promise<RegradeProgress> {
  const b = parseBody(regradeBody, body);
  const version = await versionOf(assignment);
  const subs = b.submissionId !== undefined ? [await findSubmission(assignment, b.submissionId)] : await Submission.findAll({ where: { assignmentId: assignment.id }, attributes: ['id'] });
  const regrade = await deps.sequelize.transaction(async (transaction) => {
    const r = await Regrade.create({ assignmentId: assignment.id, submissionId: b.submissionId ?? null, assignmentVersionId: version.id, reason: b.reason, requestedById: staff.id, total: subs.length }, { transaction });
    await audit(transaction, { courseId: assignment.courseId, actorId: staff.id, action: 'regrade.started', subjectType: b.submissionId ? 'submission' : 'assignment', subjectId: b.submissionId ?? assignment.id, after: { regradeId: r.id, version: version.version, submissions: subs.length, reason: b.reason } });
    return r;
  });
  if (deps.queue) await deps.queue.sendMany('grade', subs.map((s) => ({ data: { submissionId: s.id, gradeKey: `regrade-${regrade.id}` } })));
  return regradeProgress(assignment, regrade.id);
}

export async function regradeProgress(assignment: Assignment, regradeId: number): Promise<RegradeProgress> {
  const r = await Regrade.findOne({ where: { id: regradeId, assignmentId: assignment.id } });
  if (!r) throw notFound('There is no such regrade');
  const done = await Score.count({ where: { gradeKey: `regrade-${r.id}` } });
  return { id: r.id, total: r.total, done, failed: r.failed, state: done + r.failed >= r.total ? 'finished' : 'running' };
}

// ------------------------------------------------------------------ gradebook, dashboard, evidence, release

interface LatestRow {
  assignmentId: number;
  userId: number;
  submissionId: number;
  status: string;
  late: boolean;
  points: number | null;
  maxPoints: number | null;
  flagged: boolean;
}

async function latestPerStudent(sequelize: Sequelize, courseId: number): Promise<LatestRow[]> {
  // The latest attempt of each student per assignment, with its latest score and whether a flag is open.
  return sequelize.query<LatestRow>(
    `SELECT DISTINCT ON (s."assignmentId", s."userId") s."assignmentId", s."userId", s.id AS "submissionId", s.status, s.late,
            sc.points, sc."maxPoints", EXISTS (SELECT 1 FROM flags f WHERE f."submissionId" = s.id AND f.open AND f.code NOT IN ('reader-warning', 'late')) AS flagged
       FROM submissions s JOIN assignments a ON a.id = s."assignmentId"
       LEFT JOIN LATERAL (SELECT points, "maxPoints" FROM scores WHERE "submissionId" = s.id ORDER BY id DESC LIMIT 1) sc ON true
      WHERE a."courseId" = :courseId AND NOT s.returned
      ORDER BY s."assignmentId", s."userId", s.attempt DESC`,
    { type: QueryTypes.SELECT, replacements: { courseId } },
  );
}

const maxPointsOf = (config: AssignmentConfig) => config.parts.reduce((s, p) => s + p.weight, 0);

/**
 * A student's own standing on each listed assignment (the course page's list): her due date with any extension,
 * attempts left, and her latest counting attempt with its points as the feedback policy allows before release.
 * A fixed number of queries, whatever the number of assignments.
 */
export async function myStanding(sequelize: Sequelize, userId: number, assignments: AssignmentSummary[]): Promise<AssignmentSummary[]> {
  if (assignments.length === 0) return assignments;
  const ids = assignments.map((a) => a.id);
  const [rows, versions, extensions, used] = await Promise.all([
    Assignment.findAll({ where: { id: { [Op.in]: ids } }, attributes: ['id', 'currentVersion', 'releasedAt', 'dueAt'] }),
    AssignmentVersion.findAll({ where: { assignmentId: { [Op.in]: ids } }, attributes: ['assignmentId', 'version', 'config'] }),
    Extension.findAll({ where: { assignmentId: { [Op.in]: ids }, userId }, attributes: ['assignmentId', 'dueAt'] }),
    sequelize.query<{ assignmentId: number; attempt: number; status: SubmissionStatus; late: boolean; points: number | null; maxPoints: number | null; used: string }>(
      `SELECT DISTINCT ON (s."assignmentId") s."assignmentId", s.attempt, s.status, s.late, sc.points, sc."maxPoints",
              (SELECT count(*) FROM submissions u WHERE u."assignmentId" = s."assignmentId" AND u."userId" = :userId AND NOT u.returned)::text AS used
         FROM submissions s
         LEFT JOIN LATERAL (SELECT points, "maxPoints" FROM scores WHERE "submissionId" = s.id ORDER BY id DESC LIMIT 1) sc ON true
        WHERE s."userId" = :userId AND s."assignmentId" IN (:ids) AND NOT s.returned
        ORDER BY s."assignmentId", s.attempt DESC`,
      { type: QueryTypes.SELECT, replacements: { userId, ids } },
    ),
  ]);
  return assignments.map((summary) => {
    const a = rows.find((r) => r.id === summary.id)!;
    const config = versions.find((v) => v.assignmentId === a.id && v.version === a.currentVersion)!.config as AssignmentConfig;
    const released = a.releasedAt !== null;
    const row = used.find((r) => r.assignmentId === a.id);
    const showPoints = released || config.feedback !== 'nothing';
    const due = extensions.find((e) => e.assignmentId === a.id)?.dueAt ?? a.dueAt;
    return {
      ...summary,
      mine: {
        dueAt: due.toISOString(),
        cutoffAt: new Date(due.getTime() + config.latePolicy.cutoffDays * DAY).toISOString(),
        attemptsLeft: Math.max(0, config.attempts - Number(row?.used ?? 0)),
        latest: row
          ? { attempt: row.attempt, status: row.status, late: row.late, points: showPoints ? row.points : null, maxPoints: showPoints ? row.maxPoints : null }
          : null,
        released,
      },
    };
  });
}

export async function gradebook(sequelize: Sequelize, courseId: number): Promise<GradebookResponse> {
  const assignments = await Assignment.findAll({ where: { courseId, status: { [Op.in]: ['published', 'closed'] } }, order: [['dueAt', 'ASC'], ['id', 'ASC']] });
  const versions = await AssignmentVersion.findAll({ where: { assignmentId: { [Op.in]: assignments.map((a) => a.id) } }, attributes: ['assignmentId', 'version', 'config'] });
  const configOf = (a: Assignment) => versions.find((v) => v.assignmentId === a.id && v.version === a.currentVersion)!.config;
  const students = await User.findAll({ include: [{ model: Enrollment, as: 'enrollments', where: { courseId, role: 'student' }, attributes: [] }], attributes: ['id', 'displayName', 'email'], order: [['displayName', 'ASC']] });
  const latest = await latestPerStudent(sequelize, courseId);
  const key = (a: number, u: number) => `${a}:${u}`;
  const byKey = new Map(latest.map((r) => [key(r.assignmentId, r.userId), r]));
  const extensions = await Extension.findAll({ where: { assignmentId: { [Op.in]: assignments.map((a) => a.id) } }, attributes: ['assignmentId', 'userId', 'dueAt'] });
  const extendedDue = new Map(extensions.map((e) => [key(e.assignmentId, e.userId), e.dueAt]));
  const now = new Date();
  return {
    assignments: assignments.map((a) => ({ id: a.id, title: a.title, maxPoints: maxPointsOf(configOf(a)), released: a.releasedAt !== null })),
    students: students.map((u) => ({
      id: u.id,
      displayName: u.displayName,
      email: u.email,
      cells: assignments.map((a) => {
        const r = byKey.get(key(a.id, u.id));
        if (!r) {
          const due = extendedDue.get(key(a.id, u.id)) ?? a.dueAt;
          return { points: null, maxPoints: null, late: false, flagged: false, status: 'none' as const, submissionId: null, open: now < due };
        }
        const status = r.points !== null ? ('scored' as const) : r.status === 'failed' ? ('failed' as const) : ('waiting' as const);
        return { points: r.points, maxPoints: r.maxPoints, late: r.late, flagged: r.flagged, status, submissionId: r.submissionId, open: false };
      }),
    })),
    stats: assignments.map((a) => {
      const max = maxPointsOf(configOf(a));
      const pts = latest.filter((r) => r.assignmentId === a.id && r.points !== null).map((r) => r.points!).sort((x, y) => x - y);
      const histogram = new Array<number>(10).fill(0);
      for (const p of pts) histogram[Math.min(9, Math.floor((p / (max || 1)) * 10))]++;
      return {
        assignmentId: a.id,
        submitted: latest.filter((r) => r.assignmentId === a.id).length,
        mean: pts.length ? pts.reduce((s, x) => s + x, 0) / pts.length : null,
        median: pts.length ? (pts.length % 2 ? pts[(pts.length - 1) / 2] : (pts[pts.length / 2 - 1] + pts[pts.length / 2]) / 2) : null,
        histogram,
      };
    }),
  };
}

/**
 * Per assignment the counts and the next action, in words for the caller's role: publishing and releasing are the
 * instructor's, so a teaching assistant reads what the instructor will do rather than a step she cannot take.
 */
export async function dashboard(sequelize: Sequelize, courseId: number, role: Role = 'instructor'): Promise<DashboardResponse> {
  const instructor = role === 'instructor';
  const assignments = await Assignment.findAll({ where: { courseId }, order: [['dueAt', 'ASC'], ['id', 'ASC']] });
  const students = await Enrollment.count({ where: { courseId, role: 'student' } });
  const latest = await latestPerStudent(sequelize, courseId);
  const waiting = await sequelize.query<{ assignmentId: number; n: string }>(
    `SELECT s."assignmentId", count(*)::text AS n FROM reviews r JOIN submissions s ON s.id = r."submissionId" JOIN assignments a ON a.id = s."assignmentId"
      WHERE a."courseId" = :courseId AND r.state = 'open' GROUP BY s."assignmentId"`,
    { type: QueryTypes.SELECT, replacements: { courseId } },
  );
  return {
    assignments: assignments.map((a) => {
      const rows = latest.filter((r) => r.assignmentId === a.id);
      const w = Number(waiting.find((x) => x.assignmentId === a.id)?.n ?? 0);
      const scored = rows.filter((r) => r.points !== null).length;
      const next =
        a.status === 'draft'
          ? instructor
            ? 'Check the preview and publish'
            : 'Draft: the instructor publishes it'
          : w > 0
            ? `Review ${w} flagged or questioned submission${w > 1 ? 's' : ''}`
            : rows.length === 0
              ? 'Waiting for the first hand-ins'
              : !a.releasedAt && a.dueAt < new Date()
                ? instructor
                  ? 'Release the scores'
                  : 'Waiting for the instructor to release the scores'
                : a.releasedAt
                  ? 'Scores released'
                  : 'Hand-ins are coming in';
      return { id: a.id, title: a.title, status: a.status, dueAt: a.dueAt.toISOString(), students, submitted: rows.length, scored, flagged: rows.filter((r) => r.flagged).length, waitingForReview: w, released: a.releasedAt !== null, next };
    }),
  };
}

/** Staff: both sides of a copy signal, each submission against both references. */
export async function copyEvidence(assignment: Assignment, submissionId: number, flagId: number): Promise<CopyEvidence> {
  const flag = await Flag.findOne({ where: { id: flagId, submissionId } });
  if (!flag || !flag.otherUserId) throw notFound('There is no such copy signal');
  const version = await versionOf(assignment);
  const settings = gradingSettingsOf(version.config, version.config.dt ?? null);
  const evOnly = { ...settings, parts: settings.parts.filter((p) => p.kind === 'eigenvalues') };
  const sub = await Submission.findByPk(submissionId);
  const other = flag.otherSubmissionId ? await Submission.findByPk(flag.otherSubmissionId) : await Submission.findOne({ where: { assignmentId: assignment.id, userId: flag.otherUserId }, order: [['attempt', 'DESC']] });
  const refFor = async (userId: number) => {
    const v = await Variant.findOne({ where: { assignmentId: assignment.id, recipeKey: version.recipeKey, userId } });
    const r = v ? await ReferenceSpectrum.findOne({ where: { variantId: v.id, referenceKey: version.referenceKey, status: 'ready' } }) : null;
    return r?.reference ?? null;
  };
  const users = await User.findAll({ where: { id: [sub!.userId, flag.otherUserId] }, attributes: ['id', 'displayName'] });
  const refs = [await refFor(sub!.userId), await refFor(flag.otherUserId)];
  const subsRead = [sub, other].map((s) => (s ? readHandIn(version.config, { fileName: s.fileName, bytes: s.bytes, source: s.source }) : null));
  const values = (r: ReadSubmission | null) => (r ? Object.values(r.parts).find((p) => p.kind === 'eigenvalues')?.vectors[0] ?? [] : []);
  const pointsOf = (r: ReadSubmission | null, ref: ReferenceJson | null) => (r && ref ? gradeSubmission({ reference: ref, submission: r, settings: evOnly }).points : null);
  const maxPoints = evOnly.parts.reduce((s, p) => s + p.weight, 0);
  const ids = [sub!.userId, flag.otherUserId];
  return {
    flagId,
    sides: [0, 1].map((i) => ({
      student: { id: ids[i], displayName: users.find((u) => u.id === ids[i])?.displayName ?? '' },
      submissionId: [sub, other][i]?.id ?? null,
      submitted: values(subsRead[i]),
      reference: (refs[i]?.eigenvalues ?? []).map((e) => ({ re: e.re, im: e.im })),
      pointsOwn: pointsOf(subsRead[i], refs[i]),
      pointsOther: pointsOf(subsRead[i], refs[1 - i]),
      maxPoints,
    })),
  };
}

/** Release: scores become visible, and each student with a score is sent it by mail (one message per release and student). */
export async function release(deps: SubmissionDeps, assignment: Assignment, staff: User): Promise<{ releasedAt: string; messages: number }> {
  if (assignment.status === 'draft') throw conflict('A draft has no scores to release');
  const version = await versionOf(assignment);
  const latest = (await latestPerStudent(deps.sequelize, assignment.courseId)).filter((r) => r.assignmentId === assignment.id && r.points !== null);
  const users = await User.findAll({ where: { id: latest.map((r) => r.userId) }, attributes: ['id', 'email', 'displayName'] });
  const scoreRows = await Score.findAll({ where: { submissionId: latest.map((r) => r.submissionId) }, order: [['id', 'ASC']] });
  const site = (deps.siteUrl ?? process.env.MODEWRIGHT_PUBLIC_URL ?? `http://127.0.0.1:${process.env.MODEWRIGHT_PORT ?? 5480}`).replace(/\/$/, '');
  return deps.sequelize.transaction(async (transaction) => {
    const locked = await Assignment.findByPk(assignment.id, { transaction, lock: transaction.LOCK.UPDATE });
    const count = (locked!.releaseCount ?? 0) + 1;
    const releasedAt = new Date();
    await locked!.update({ releasedAt, releaseCount: count }, { transaction });
    Object.assign(assignment, locked!.get());
    const mails = latest.map((r) => {
      const u = users.find((x) => x.id === r.userId)!;
      const mine = scoreRows.filter((s) => s.submissionId === r.submissionId);
      const last = mine[mine.length - 1];
      const withReport = [...mine].reverse().find((s) => s.report)?.report;
      const parts = withReport ? withReport.parts.map((p) => `  ${p.name}: ${fmt(p.points)} of ${fmt(p.maxPoints)}`).join('\n') : '';
      const link = `${site}/courses/${assignment.courseId}/assignments/${assignment.id}`;
      return {
        key: `release:${assignment.id}:${count}:student:${u.id}`,
        to: u.email,
        courseId: assignment.courseId,
        kind: 'release',
        subject: `Your score for “${assignment.title}”: ${fmt(last.points)} of ${fmt(last.maxPoints)}`,
        text:
          `Hello ${u.displayName},\n\nYour instructor has released the scores of “${assignment.title}”.\n\n` +
          `Score: ${fmt(last.points)} of ${fmt(last.maxPoints)} points${last.latePenalty > 0 ? ` (after ${Math.round(last.latePenalty * 100)}% off for lateness)` : ''}.\n` +
          (parts ? `By part:\n${parts}\n` : '') +
          (last.reason !== 'autograde' && last.reason !== 'regrade' ? `Set by staff${last.comment ? `: ${last.comment}` : ''}.\n` : '') +
          `\nHow each value earned its credit, your reference values, and a way to ask for a second look: ${link}\n`,
      };
    });
    await audit(transaction, { courseId: assignment.courseId, actorId: staff.id, action: 'release.made', subjectType: 'assignment', subjectId: assignment.id, before: null, after: { release: count, students: mails.length, version: version.version } });
    await enqueueMails(deps.mail ?? { queue: deps.queue }, transaction, mails);
    return { releasedAt: releasedAt.toISOString(), messages: mails.length };
  });
}
