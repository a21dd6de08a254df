/**
 * Assignments: authoring with immutable versions once published, variants
 * for every student, reference jobs, progress, the task as students read it,
 * the instructor's preview (warnings, separation of variants) and downloads.
 */
import { createHash } from 'node:crypto';
import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize';
import { canonicalJson } from '../../grading/methods/reference.js';
import { taskCli, type StoredDataset, type TaskRun, type VariantRecipe } from '../../grading/assignment.js';
import { referenceTolerances } from '../../grading/scoring/score.js';
import {
  assignmentConfig,
  centreIndices,
  describeCentreRule,
  describeRankRule,
  maxDictionaryFunctions,
  maxRadialCentres,
  type AssignmentConfig,
  type AssignmentDetail,
  type AssignmentSummary,
  type PreviewResponse,
  type ReferenceProgress,
  type ReferenceResponse,
  type SeparationResult,
  type Task,
  type TaskWarning,
} from '../../shared/assignment.js';
import type { Role } from '../../shared/api.js';
import type { ReferenceSpectrum as ReferenceJson } from '../../shared/reference.js';
import { gradingSettings, type GradingSettings } from '../../shared/score-report.js';
import { badRequest, conflict, forbidden, notFound } from '../errors.js';
import { parseBody } from '../middleware/validate.js';
import { Assignment, AssignmentVersion, Dataset, Enrollment, ReferenceSpectrum, User, Variant } from '../models/index.js';
import type { JobQueue } from '../jobs/queue.js';
import { findDataset, toDatasetSummary } from './datasets.js';

export interface AssignmentDeps {
  sequelize: Sequelize;
  queue: JobQueue | null;
}

const sha = (s: string) => createHash('sha256').update(s, 'utf8').digest('hex');

/** What makes the variants: the dataset's bytes and the variant settings. */
export function recipeKeyOf(config: AssignmentConfig, dataset: Pick<Dataset, 'id' | 'sha256'>): string {
  const v = config.variants;
  return sha(canonicalJson({ datasetId: dataset.id, sha256: dataset.sha256, mode: v.mode, ...(v.mode === 'per-student' ? { noise: v.noise, jitter: v.jitter } : {}) }));
}

/** Everything that changes a reference: the recipe, the method and its parameters, dt, ordering, top, the vector parts. */
export function referenceKeyOf(config: AssignmentConfig, recipeKey: string): string {
  const vectorParts = config.parts.filter((p) => p.kind !== 'eigenvalues').map((p) => ({ kind: p.kind, points: p.points ?? null }));
  return sha(canonicalJson({ recipeKey, method: config.method, dt: config.dt ?? null, order: config.order, top: config.top ?? null, vectorParts }));
}

/** A student's variant seed: deterministic in (assignment, student, recipe), 31 bits. */
export function variantSeed(assignmentId: number, userId: number, recipeKey: string): number {
  return parseInt(sha(`${assignmentId}:${userId}:${recipeKey}`).slice(0, 8), 16) & 0x7fffffff;
}

export function gradingSettingsOf(config: AssignmentConfig, dt: number | null): GradingSettings {
  return gradingSettings.parse({
    ...config.tolerances,
    domain: config.domain,
    ...(dt ? { dt } : {}),
    parts: config.parts.map(({ points: _points, ...p }) => p),
  });
}

export function taskRunOf(config: AssignmentConfig, datasetDt: number | null): TaskRun {
  const ef = config.parts.find((p) => p.kind === 'eigenfunctions');
  return {
    method: config.method,
    dt: config.dt ?? datasetDt ?? undefined,
    order: config.order,
    top: config.top,
    wantModes: config.parts.some((p) => p.kind === 'modes'),
    eigenfunctionPoints: ef ? (ef.points ?? 10) : undefined,
  };
}

export function storedDataset(d: Dataset): StoredDataset {
  return { name: d.fileName, source: d.source, layout: d.layout, bytes: d.bytes, bytesY: d.bytesY, scenario: d.scenario };
}

export function recipeOf(v: Variant): VariantRecipe {
  return { mode: v.mode, seed: v.seed, noise: v.noise, jitter: v.jitter };
}

function binomial(n: number, k: number): number {
  let r = 1;
  for (let i = 1; i <= k; i++) r = (r * (n - k + i)) / i;
  return Math.round(r);
}

/** Parse and check a configuration against the course's datasets; field errors name their path. */
async function validateConfig(courseId: number, body: unknown): Promise<{ config: AssignmentConfig; dataset: Dataset }> {
  const config = parseBody(assignmentConfig, body);
  const dataset = await Dataset.findOne({ where: { id: config.datasetId, courseId }, attributes: ['id', 'sha256', 'n', 'snapshots', 'pairs', 'dt', 'source', 'layout', 'fileName'] });
  if (!dataset) throw badRequest('Please check: datasetId', [{ path: 'datasetId', message: 'There is no such dataset in this course' }]);
  const dt = config.dt ?? dataset.dt;
  const problems: { path: string; message: string }[] = [];
  if (config.domain === 'continuous' && !dt) problems.push({ path: 'dt', message: 'Grading in continuous time needs a time step: give dt (the dataset has none)' });
  const m = dataset.pairs ? dataset.snapshots : dataset.snapshots - 1;
  const method = config.method;
  if (method.method === 'dmd' && method.rankRule.kind === 'rank' && method.rankRule.rank > Math.min(dataset.n, m)) {
    problems.push({ path: 'method.rankRule.rank', message: `The data allow a rank of at most ${Math.min(dataset.n, m)} (${dataset.n} states, ${m} snapshot pairs)` });
  }
  if (method.method === 'kernel-edmd' && method.rankRule.kind === 'rank' && method.rankRule.rank > m) {
    problems.push({ path: 'method.rankRule.rank', message: `The data allow a rank of at most ${m} (${m} snapshot pairs)` });
  }
  if (method.method === 'edmd' && method.dictionary !== 'radial' && method.degree !== undefined) {
    const size = binomial(dataset.n + method.degree, method.degree);
    if (size > maxDictionaryFunctions) problems.push({ path: 'method.degree', message: `Degree ${method.degree} on ${dataset.n} states makes ${size} dictionary functions; at most ${maxDictionaryFunctions}` });
  }
  if (method.method === 'edmd' && method.dictionary === 'radial' && method.centres) {
    // Centres are columns of X: m of them (a trajectory's last snapshot is not in X).
    const c = method.centres;
    if (c.kind === 'every') {
      const count = centreIndices(c, m).length;
      if (count > maxRadialCentres) {
        problems.push({
          path: 'method.centres.step',
          message: `A step of ${c.step} over the ${m} snapshots of X makes ${count} centres; at most ${maxRadialCentres}, as the dictionary may have at most ${maxDictionaryFunctions} functions with the constant (the engine's limit). Take a step of at least ${Math.ceil(m / maxRadialCentres)}.`,
        });
      }
    } else {
      const past = c.indices.filter((i) => i >= m);
      if (past.length) {
        problems.push({
          path: 'method.centres.indices',
          message: `X has ${m} snapshots (0-based columns 0 … ${m - 1}${dataset.pairs ? '' : '; the trajectory’s last snapshot is not in X'}): ${past.slice(0, 5).join(', ')}${past.length > 5 ? ', …' : ''} ${past.length === 1 ? 'is' : 'are'} past the end`,
        });
      }
    }
  }
  if (config.top !== undefined && method.method === 'dmd' && method.rankRule.kind === 'rank' && config.top > method.rankRule.rank) {
    problems.push({ path: 'top', message: `Only ${method.rankRule.rank} eigenvalues exist at rank ${method.rankRule.rank}` });
  }
  if (problems.length) throw badRequest(`Please check: ${problems.map((p) => p.path).join(', ')}`, problems);
  return { config, dataset };
}

/** Create variants (where missing) and their references for the given students (null: the dataset as given), and queue the reference jobs. */
export async function ensureReferences(deps: AssignmentDeps, assignment: Assignment, version: AssignmentVersion, userIds: (number | null)[]): Promise<number> {
  if (userIds.length === 0) return 0;
  const config = version.config;
  await Variant.bulkCreate(
    userIds.map((userId) => {
      const perStudent = userId !== null && config.variants.mode === 'per-student';
      return {
        assignmentId: assignment.id,
        userId,
        datasetId: version.datasetId,
        recipeKey: version.recipeKey,
        mode: perStudent ? ('per-student' as const) : ('same' as const),
        seed: perStudent ? variantSeed(assignment.id, userId, version.recipeKey) : 0,
        noise: perStudent ? config.variants.noise : 0,
        jitter: perStudent ? config.variants.jitter : 0,
        parameters: null,
        checksum: null,
      };
    }),
    { ignoreDuplicates: true },
  );
  const ids = userIds.filter((u): u is number => u !== null);
  const whereUser = userIds.includes(null) ? { [Op.or]: [{ userId: { [Op.in]: ids } }, { userId: null }] } : { userId: { [Op.in]: ids } };
  const variants = await Variant.findAll({ where: { assignmentId: assignment.id, recipeKey: version.recipeKey, ...whereUser }, attributes: ['id'] });
  await ReferenceSpectrum.bulkCreate(
    variants.map((v) => ({ variantId: v.id, assignmentVersionId: version.id, referenceKey: version.referenceKey, message: null, reference: null, extras: null, singularValues: null, modeShapes: null, checksum: null, computedAt: null })),
    { ignoreDuplicates: true },
  );
  const pending = await ReferenceSpectrum.findAll({
    where: { variantId: { [Op.in]: variants.map((v) => v.id) }, referenceKey: version.referenceKey, status: 'queued' },
    attributes: ['id'],
  });
  if (deps.queue) await deps.queue.sendMany('reference', pending.map((r) => ({ data: { referenceId: r.id }, singletonKey: `reference-${r.id}` })));
  return pending.length;
}

async function currentVersion(assignment: Assignment, transaction?: Transaction): Promise<AssignmentVersion> {
  const v = await AssignmentVersion.findOne({ where: { assignmentId: assignment.id, version: assignment.currentVersion }, transaction });
  if (!v) throw notFound('This assignment has no configuration');
  return v;
}

export async function findAssignment(courseId: number, assignmentId: number, role: Role): Promise<Assignment> {
  const a = await Assignment.findOne({ where: { id: assignmentId, courseId } });
  if (!a || (role === 'student' && a.status === 'draft')) throw notFound('There is no such assignment in this course');
  return a;
}

async function studentIds(courseId: number): Promise<number[]> {
  const rows = await Enrollment.findAll({ where: { courseId, role: 'student' }, attributes: ['userId'] });
  return rows.map((r) => r.userId);
}

export async function createAssignment(deps: AssignmentDeps, courseId: number, user: User, body: unknown): Promise<Assignment> {
  const { config, dataset } = await validateConfig(courseId, body);
  const recipeKey = recipeKeyOf(config, dataset);
  const { assignment, version } = await deps.sequelize.transaction(async (transaction) => {
    const assignment = await Assignment.create(
      { courseId, title: config.title, dueAt: new Date(config.dueAt), timeZone: config.timeZone, method: config.method.method, publishedAt: null, closedAt: null, createdById: user.id },
      { transaction },
    );
    const version = await AssignmentVersion.create(
      { assignmentId: assignment.id, version: 1, config, datasetId: dataset.id, recipeKey, referenceKey: referenceKeyOf(config, recipeKey), createdById: user.id },
      { transaction },
    );
    return { assignment, version };
  });
  await ensureReferences(deps, assignment, version, [null]);
  return assignment;
}

/** A draft is edited in place; after publishing an edit makes a new version, and a reference-altering change recomputes references as jobs. */
export async function updateAssignment(deps: AssignmentDeps, assignment: Assignment, user: User, body: unknown): Promise<Assignment> {
  const { config, dataset } = await validateConfig(assignment.courseId, body);
  const recipeKey = recipeKeyOf(config, dataset);
  const referenceKey = referenceKeyOf(config, recipeKey);
  const version = await deps.sequelize.transaction(async (transaction) => {
    const locked = await Assignment.findByPk(assignment.id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!locked) throw notFound('This assignment no longer exists');
    const current = await currentVersion(locked, transaction);
    let version: AssignmentVersion;
    if (locked.status === 'draft') {
      version = await current.update({ config, datasetId: dataset.id, recipeKey, referenceKey, createdById: user.id }, { transaction });
    } else {
      version = await AssignmentVersion.create(
        { assignmentId: locked.id, version: locked.currentVersion + 1, config, datasetId: dataset.id, recipeKey, referenceKey, createdById: user.id },
        { transaction },
      );
    }
    await locked.update({ title: config.title, dueAt: new Date(config.dueAt), timeZone: config.timeZone, method: config.method.method, currentVersion: version.version }, { transaction });
    Object.assign(assignment, locked.get());
    return version;
  });
  const who: (number | null)[] = [null];
  if (assignment.status !== 'draft') who.push(...(await studentIds(assignment.courseId)));
  await ensureReferences(deps, assignment, version, who);
  return assignment;
}

export async function publishAssignment(deps: AssignmentDeps, assignment: Assignment): Promise<Assignment> {
  if (assignment.status !== 'draft') throw conflict(`This assignment is already ${assignment.status}`);
  await assignment.update({ status: 'published', publishedAt: new Date() });
  const version = await currentVersion(assignment);
  await ensureReferences(deps, assignment, version, [null, ...(await studentIds(assignment.courseId))]);
  return assignment;
}

export async function closeAssignment(assignment: Assignment): Promise<Assignment> {
  if (assignment.status !== 'published') throw conflict(assignment.status === 'draft' ? 'A draft cannot be closed; publish it first' : 'This assignment is already closed');
  return assignment.update({ status: 'closed', closedAt: new Date() });
}

/** Variants and references for a student who joined after publishing (the `variants` job). */
export async function variantsForLateJoiner(deps: AssignmentDeps, courseId: number, userId: number): Promise<number> {
  const enrollment = await Enrollment.findOne({ where: { courseId, userId, role: 'student' } });
  if (!enrollment) return 0;
  const assignments = await Assignment.findAll({ where: { courseId, status: 'published' } });
  let queued = 0;
  for (const a of assignments) queued += await ensureReferences(deps, a, await currentVersion(a), [userId]);
  return queued;
}

/** Retry every failed reference of the current version. */
export async function retryFailedReferences(deps: AssignmentDeps, assignment: Assignment): Promise<number> {
  const version = await currentVersion(assignment);
  const [rows] = (await deps.sequelize.query(
    `UPDATE reference_spectra r SET status = 'queued', "updatedAt" = now()
       FROM variants v WHERE v.id = r."variantId" AND v."assignmentId" = :aid AND r."referenceKey" = :key AND r.status = 'failed'
     RETURNING r.id`,
    { replacements: { aid: assignment.id, key: version.referenceKey } },
  )) as [{ id: number }[], unknown];
  if (deps.queue) await deps.queue.sendMany('reference', rows.map((r) => ({ data: { referenceId: r.id, manual: Date.now() } })));
  return rows.length;
}

// ------------------------------------------------------------------ reading

interface CountRow {
  assignmentId: number;
  status: string;
  count: string;
}

/** References of the current versions' student variants by status, for many assignments in one query. */
async function progressCounts(sequelize: Sequelize, assignmentIds: number[]): Promise<Map<number, ReferenceProgress>> {
  const out = new Map<number, ReferenceProgress>();
  for (const id of assignmentIds) out.set(id, { total: 0, ready: 0, failed: 0, failures: [] });
  if (assignmentIds.length === 0) return out;
  const rows = await sequelize.query<CountRow>(
    `SELECT a.id AS "assignmentId", r.status, count(*)::text AS count
       FROM assignments a
       JOIN assignment_versions av ON av."assignmentId" = a.id AND av.version = a."currentVersion"
       JOIN variants v ON v."assignmentId" = a.id AND v."recipeKey" = av."recipeKey" AND v."userId" IS NOT NULL
       JOIN reference_spectra r ON r."variantId" = v.id AND r."referenceKey" = av."referenceKey"
      WHERE a.id IN (:ids)
      GROUP BY a.id, r.status`,
    { type: QueryTypes.SELECT, replacements: { ids: assignmentIds } },
  );
  for (const r of rows) {
    const p = out.get(r.assignmentId)!;
    const c = Number(r.count);
    p.total += c;
    if (r.status === 'ready') p.ready += c;
    if (r.status === 'failed') p.failed += c;
  }
  return out;
}

export async function assignmentProgress(sequelize: Sequelize, assignment: Assignment): Promise<ReferenceProgress> {
  const p = (await progressCounts(sequelize, [assignment.id])).get(assignment.id)!;
  if (p.failed > 0) {
    const failures = await sequelize.query<{ referenceId: number; student: string | null; message: string | null; attempts: number }>(
      `SELECT r.id AS "referenceId", u."displayName" AS student, r.message, r.attempts
         FROM assignments a
         JOIN assignment_versions av ON av."assignmentId" = a.id AND av.version = a."currentVersion"
         JOIN variants v ON v."assignmentId" = a.id AND v."recipeKey" = av."recipeKey"
         JOIN reference_spectra r ON r."variantId" = v.id AND r."referenceKey" = av."referenceKey"
         LEFT JOIN users u ON u.id = v."userId"
        WHERE a.id = :id AND r.status = 'failed'
        ORDER BY r.id LIMIT 50`,
      { type: QueryTypes.SELECT, replacements: { id: assignment.id } },
    );
    p.failures = failures.map((f) => ({ ...f, message: f.message ?? 'failed without a message' }));
  }
  return p;
}

function toSummary(a: Assignment, progress?: ReferenceProgress): AssignmentSummary {
  return {
    id: a.id,
    title: a.title,
    status: a.status,
    dueAt: a.dueAt.toISOString(),
    timeZone: a.timeZone,
    version: a.currentVersion,
    method: a.method as AssignmentSummary['method'],
    publishedAt: a.publishedAt ? a.publishedAt.toISOString() : null,
    ...(progress ? { progress } : {}),
  };
}

/** Two queries whatever the number of assignments: the list, and the progress counts (staff). */
export async function listAssignments(sequelize: Sequelize, courseId: number, role: Role): Promise<AssignmentSummary[]> {
  const where = role === 'student' ? { courseId, status: { [Op.in]: ['published', 'closed'] } } : { courseId };
  const rows = await Assignment.findAll({ where, order: [['dueAt', 'ASC'], ['id', 'ASC']] });
  if (role === 'student') return rows.map((a) => toSummary(a));
  const progress = await progressCounts(
    sequelize,
    rows.map((a) => a.id),
  );
  return rows.map((a) => toSummary(a, progress.get(a.id)));
}

/** The radial dictionary's centres as the task states them: the rule, and the 0-based columns of X when X's width is known. */
function taskCentres(m: AssignmentConfig['method'], xColumns: number | null): Task['centres'] {
  if (m.method !== 'edmd' || m.dictionary !== 'radial' || !m.centres) return undefined;
  const c = m.centres;
  return {
    kind: c.kind,
    ...(c.kind === 'every' ? { step: c.step } : {}),
    indices: xColumns !== null || c.kind === 'indices' ? centreIndices(c, xColumns ?? 0) : null,
    description: describeCentreRule(c, xColumns ?? undefined),
  };
}

/** The task as students read it. `xColumns`: the number of snapshots in X (the data's pairs), to list a radial dictionary's centres. */
export function taskOf(config: AssignmentConfig, datasetDt: number | null, rank: number | null, xColumns: number | null = null): Task {
  const m = config.method;
  const dt = config.dt ?? datasetDt ?? undefined;
  const ruleStated = m.method !== 'edmd' && m.rankRule.kind !== 'rank' ? describeRankRule(m.rankRule) : undefined;
  const fixedRank = m.method !== 'edmd' && m.rankRule.kind === 'rank' ? m.rankRule.rank : null;
  const centres = taskCentres(m, xColumns);
  const task: Task = {
    method: m.method,
    rank: rank ?? fixedRank,
    ...(ruleStated ? { rankRule: ruleStated } : {}),
    ...(m.method === 'edmd' && m.dictionary !== 'radial' ? { dictionary: m.dictionary, degree: m.degree } : {}),
    ...(m.method === 'edmd' && m.dictionary === 'radial' ? { dictionary: m.dictionary, sigma: m.sigma, ...(centres ? { centres } : {}) } : {}),
    ...(m.method === 'kernel-edmd'
      ? {
          kernel: m.kernel,
          ...(m.kernel === 'polynomial' ? { degree: m.degree ?? 2, coef0: m.coef0 ?? 1, gamma: m.gamma ?? 1 } : {}),
          ...(m.kernel === 'gaussian' ? { sigma: m.sigma } : {}),
        }
      : {}),
    ...(dt !== undefined ? { dt } : {}),
    order: config.order,
    ...(config.top !== undefined ? { top: config.top } : {}),
    domain: config.domain,
    parts: config.parts.map((p) => ({ name: p.name, kind: p.kind, weight: p.weight, ...(p.kind === 'eigenfunctions' ? { points: p.points ?? 10 } : {}) })),
    cli: '',
  };
  task.cli = taskCli({ method: m, dt, order: config.order, top: config.top }, task.rank);
  return task;
}

async function studentVariant(assignment: Assignment, version: AssignmentVersion, userId: number | null): Promise<Variant | null> {
  return Variant.findOne({ where: { assignmentId: assignment.id, recipeKey: version.recipeKey, userId } });
}

async function referenceOf(variant: Variant, version: AssignmentVersion): Promise<ReferenceSpectrum | null> {
  return ReferenceSpectrum.findOne({ where: { variantId: variant.id, referenceKey: version.referenceKey } });
}

export async function assignmentDetail(sequelize: Sequelize, assignment: Assignment, user: User, role: Role): Promise<AssignmentDetail> {
  const version = await currentVersion(assignment);
  const config = version.config;
  const dataset = await findDataset(assignment.courseId, version.datasetId);
  let rank: number | null = null;
  let variantInfo: AssignmentDetail['variant'];
  if (role === 'student') {
    const v = await studentVariant(assignment, version, user.id);
    variantInfo = v ? { id: v.id, seed: v.seed, checksum: v.checksum, parameters: v.mode === 'per-student' ? { noise: v.noise } : {} } : null;
    if (v) {
      const ref = await ReferenceSpectrum.findOne({ where: { variantId: v.id, referenceKey: version.referenceKey, status: 'ready' }, attributes: ['id', 'reference'] });
      rank = ref?.reference?.rank ?? null;
    }
  }
  const detail: AssignmentDetail = {
    ...toSummary(assignment),
    statement: config.statement,
    task: taskOf(config, dataset.dt, rank, dataset.pairs ? dataset.snapshots : dataset.snapshots - 1),
    latePolicy: config.latePolicy,
    attempts: config.attempts,
    feedback: config.feedback,
    dataset: { n: dataset.n, snapshots: dataset.snapshots, pairs: dataset.pairs, layout: 'columns', dt: config.dt ?? dataset.dt },
  };
  if (role === 'student') detail.variant = variantInfo ?? null;
  else {
    detail.progress = await assignmentProgress(sequelize, assignment);
    detail.config = config;
    detail.datasetSummary = toDatasetSummary(dataset);
    const versions = await AssignmentVersion.findAll({
      where: { assignmentId: assignment.id },
      attributes: ['version', 'createdAt', 'referenceKey'],
      include: [{ model: User, as: 'author', attributes: ['displayName'] }],
      order: [['version', 'ASC']],
    });
    detail.versions = versions.map((v, i) => ({
      version: v.version,
      createdAt: v.createdAt.toISOString(),
      author: (v as unknown as { author?: User }).author?.displayName ?? null,
      altersReferences: i === 0 || v.referenceKey !== versions[i - 1].referenceKey,
    }));
  }
  return detail;
}

export function classify(ref: ReferenceJson, settings: GradingSettings): NonNullable<ReferenceResponse['classification']> {
  return referenceTolerances(ref, settings, settings.domain, settings.dt ?? ref.dt ?? null).map((t) => ({
    state: !t.excludedCode ? 'graded' : t.excludedCode === 'unstable' ? 'unstable' : t.excludedCode.startsWith('undetermined') ? 'undetermined' : 'other',
    tolerance: t.tolerance,
    ...(t.sensitivity !== undefined ? { sensitivity: t.sensitivity } : {}),
    ...(t.resolvedFromRank !== undefined ? { resolvedFromRank: t.resolvedFromRank } : {}),
    reason: t.excludedReason,
  }));
}

function toReferenceResponse(row: ReferenceSpectrum | null, variant: Variant, version: AssignmentVersion, student: User | null, settings?: GradingSettings): ReferenceResponse {
  const ready = row?.status === 'ready' && row.reference;
  return {
    ...(ready && settings ? { classification: classify(row.reference!, settings) } : {}),
    status: row?.status ?? 'queued',
    student: student ? { id: student.id, displayName: student.displayName } : null,
    variantId: variant.id,
    version: version.version,
    message: row?.message ?? null,
    reference: row?.status === 'ready' ? row.reference : null,
    ...(row?.singularValues ? { singularValues: row.singularValues } : {}),
    ...(row?.modeShapes ? { modes: row.modeShapes } : {}),
  };
}

/** Staff: one student's stored reference (or the dataset-as-given reference when student is null). */
export async function studentReference(assignment: Assignment, studentId: number | null): Promise<ReferenceResponse> {
  const version = await currentVersion(assignment);
  let student: User | null = null;
  if (studentId !== null) {
    const e = await Enrollment.findOne({ where: { courseId: assignment.courseId, userId: studentId, role: 'student' } });
    if (!e) throw notFound('That user is not a student of this course');
    student = await User.findByPk(studentId, { attributes: ['id', 'displayName'] });
  }
  const variant = await studentVariant(assignment, version, studentId);
  if (!variant) throw notFound(studentId === null ? 'The preview reference has not been requested yet' : 'This student has no variant yet (the assignment is not published, or the variant job has not run)');
  const dataset = await findDataset(assignment.courseId, version.datasetId);
  return toReferenceResponse(await referenceOf(variant, version), variant, version, student, gradingSettingsOf(version.config, version.config.dt ?? dataset.dt));
}

interface Graded {
  values: { re: number; im: number; tol: number }[];
}

function gradedValues(ref: ReferenceJson, settings: GradingSettings): Graded {
  const tols = referenceTolerances(ref, settings, settings.domain, settings.dt ?? ref.dt ?? null);
  return { values: tols.filter((t) => !t.excludedReason).map((t) => ({ re: t.value.re, im: t.value.im, tol: t.tolerance })) };
}

/** Smallest distance between two variants' graded eigenvalues, in units of the tolerance (max over a's values of the nearest of b's). */
export function separation(refs: { name: string; ref: ReferenceJson }[], settings: GradingSettings, zeroCreditMultiple: number): SeparationResult {
  if (refs.length < 2) return { variants: refs.length, smallest: null, warning: null };
  const graded = refs.map((r) => gradedValues(r.ref, settings));
  let smallest = Infinity;
  let pair: [number, number] = [0, 1];
  for (let a = 0; a < graded.length; a++) {
    for (let b = 0; b < graded.length; b++) {
      if (a === b || graded[a].values.length === 0) continue;
      let worst = 0;
      for (const va of graded[a].values) {
        let best = Infinity;
        for (const vb of graded[b].values) best = Math.min(best, Math.hypot(va.re - vb.re, va.im - vb.im) / va.tol);
        worst = Math.max(worst, best);
        if (worst >= smallest) break;
      }
      if (worst < smallest) {
        smallest = worst;
        pair = [a, b];
      }
    }
  }
  const s = Number.isFinite(smallest) ? smallest : null;
  const names = [refs[pair[0]].name, refs[pair[1]].name];
  const warning =
    s !== null && s <= zeroCreditMultiple
      ? `Copied work could not be told apart: the variants of ${names[0]} and ${names[1]} differ by only ${s.toPrecision(2)}× the tolerance, so one's answer earns credit on the other's. Raise the variant noise or jitter, or tighten the tolerances.`
      : null;
  return { variants: refs.length, smallest: s, pair: names, warning };
}

export function referenceWarnings(ref: ReferenceJson | null, settings: GradingSettings): TaskWarning[] {
  const out: TaskWarning[] = [];
  if (!ref) return out;
  if (ref.method === 'edmd' && ref.dictionaryRank !== undefined && ref.dictionaryRank < ref.rank) {
    const radial = (ref.options?.dictionary as { kind?: string } | undefined)?.kind === 'gaussian-radial';
    const remedy = radial ? 'Fewer centres (a larger step), a smaller width σ, or more samples' : 'A lower degree or more samples';
    out.push({
      code: 'dictionary-rank-deficient',
      message: `The dictionary is rank deficient on the data (numerical rank ${ref.dictionaryRank} of ${ref.rank} functions, cut-off ${ref.cutoff ?? 'default'}): the values it leaves undetermined are not graded. ${remedy} make the task well posed.`,
    });
  }
  const tols = referenceTolerances(ref, settings, settings.domain, settings.dt ?? ref.dt ?? null);
  const undetermined = tols.filter((t) => t.excludedCode === 'undetermined-dictionary' || t.excludedCode === 'undetermined-sensitivity').length;
  const unstable = tols.filter((t) => t.excludedCode === 'unstable' || t.unstable).length;
  const graded = tols.filter((t) => !t.excludedCode).length;
  if (undetermined > 0) {
    out.push({
      code: 'undetermined-values',
      message: `${undetermined} of ${tols.length} values are not determined by the data (they move by the stated tolerance or more when the data are perturbed at float32 rounding level, or the dictionary leaves them free); they are not graded.`,
    });
  }
  if (unstable > 0) {
    out.push({
      code: 'unstable-values',
      message: `${unstable} of ${tols.length} values change by more than ${settings.unstableSpreadLimit} between neighbouring ranks; they are ${settings.unstablePolicy === 'exclude' ? 'left out of grading' : 'graded with their spread as tolerance'}.`,
    });
  }
  if (graded === 0 && tols.length > 0) out.push({ code: 'undetermined-values', message: 'No value of this task can be graded: every one is undetermined or unstable. Change the method, its parameters or the data before publishing.' });
  return out;
}

/** Staff: the dataset-as-given reference with what makes the task ill-posed, and the separation of the students' variants. */
export async function assignmentPreview(sequelize: Sequelize, assignment: Assignment): Promise<PreviewResponse> {
  const version = await currentVersion(assignment);
  const config = version.config;
  const dataset = await findDataset(assignment.courseId, version.datasetId);
  const dt = config.dt ?? dataset.dt;
  const settings = gradingSettingsOf(config, dt);
  const base = await studentVariant(assignment, version, null);
  const baseRow = base ? await referenceOf(base, version) : null;
  const reference = base ? toReferenceResponse(baseRow, base, version, null, settings) : null;
  const warnings = referenceWarnings(baseRow?.status === 'ready' ? baseRow.reference : null, settings);
  const failed = await sequelize.query<{ message: string | null; student: string | null }>(
    `SELECT r.message, u."displayName" AS student FROM variants v
       JOIN reference_spectra r ON r."variantId" = v.id AND r."referenceKey" = :key
       LEFT JOIN users u ON u.id = v."userId"
      WHERE v."assignmentId" = :aid AND v."recipeKey" = :recipe AND r.status = 'failed' LIMIT 20`,
    { type: QueryTypes.SELECT, replacements: { key: version.referenceKey, aid: assignment.id, recipe: version.recipeKey } },
  );
  for (const f of failed) {
    const who = f.student ?? 'the dataset as given';
    const tooHigh = /at most|maximum|allows/i.test(f.message ?? '');
    out(tooHigh ? 'rank-too-high' : 'reference-failed', `Reference for ${who} failed: ${f.message ?? 'no message'}`);
  }
  function out(code: TaskWarning['code'], message: string) {
    warnings.push({ code, message });
  }
  let sep: SeparationResult | null = null;
  if (config.variants.mode === 'per-student') {
    const rows = await sequelize.query<{ name: string; reference: ReferenceJson }>(
      `SELECT u."displayName" AS name, r.reference FROM variants v
         JOIN users u ON u.id = v."userId"
         JOIN reference_spectra r ON r."variantId" = v.id AND r."referenceKey" = :key AND r.status = 'ready'
        WHERE v."assignmentId" = :aid AND v."recipeKey" = :recipe`,
      { type: QueryTypes.SELECT, replacements: { key: version.referenceKey, aid: assignment.id, recipe: version.recipeKey } },
    );
    sep = separation(rows.map((r) => ({ name: r.name, ref: r.reference })), settings, config.tolerances.zeroCreditMultiple);
    if (sep.warning) out('separation', sep.warning);
  }
  return { reference, warnings, separation: sep };
}

export async function listVariants(assignment: Assignment) {
  const version = await currentVersion(assignment);
  const rows = await Variant.findAll({
    where: { assignmentId: assignment.id, recipeKey: version.recipeKey, userId: { [Op.ne]: null } },
    include: [
      { model: User, as: 'user', attributes: ['id', 'displayName'] },
      { model: ReferenceSpectrum, as: 'references', attributes: ['status'], where: { referenceKey: version.referenceKey }, required: false },
    ],
    order: [[{ model: User, as: 'user' }, 'displayName', 'ASC']],
  });
  return rows.map((v) => {
    const u = (v as unknown as { user: User }).user;
    const refs = (v as unknown as { references: ReferenceSpectrum[] }).references;
    return { variantId: v.id, student: { id: u.id, displayName: u.displayName }, seed: v.seed, checksum: v.checksum, referenceStatus: refs[0]?.status ?? 'queued' };
  });
}

/** The variant a download is for: the caller's own (student) or a named student's (staff). */
export async function variantForDownload(assignment: Assignment, user: User, role: Role, studentParam: string | undefined): Promise<{ variant: Variant; dataset: Dataset; version: AssignmentVersion }> {
  const version = await currentVersion(assignment);
  let userId: number | null = user.id;
  if (role === 'student') {
    if (studentParam !== undefined && Number(studentParam) !== user.id) throw forbidden('Students can download only their own variant');
  } else {
    if (studentParam === undefined) userId = null;
    else {
      userId = Number(studentParam);
      if (!Number.isInteger(userId) || userId <= 0) throw badRequest('student must be a user id', [{ path: 'student', message: 'Expected a positive whole number' }]);
      const e = await Enrollment.findOne({ where: { courseId: assignment.courseId, userId, role: 'student' } });
      if (!e) throw notFound('That user is not a student of this course');
    }
  }
  const variant = await studentVariant(assignment, version, userId);
  if (!variant) throw notFound(userId === null ? 'The dataset-as-given variant does not exist yet' : 'No variant has been made for this student yet; it is made at publishing or shortly after joining');
  const dataset = await Dataset.findByPk(variant.datasetId);
  if (!dataset) throw notFound('The dataset of this assignment no longer exists');
  return { variant, dataset, version };
}
