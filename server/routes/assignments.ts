import { Router } from 'express';
import type { Sequelize } from 'sequelize';
import { datasetFormats, type AssignmentDetail, type AssignmentListResponse, type PreviewResponse, type ReferenceProgress, type ReferenceResponse, type VariantMetadata } from '../../shared/assignment.js';
import { badRequest, forbidden, HttpError } from '../errors.js';
import { currentUser, idParam, requireCourseMember, requireCourseRole, staffRoles } from '../middleware/auth.js';
import type { Engine } from '../jobs/engine-pool.js';
import type { JobQueue } from '../jobs/queue.js';
import {
  assignmentDetail,
  assignmentPreview,
  assignmentProgress,
  closeAssignment,
  createAssignment,
  findAssignment,
  listAssignments,
  listVariants,
  publishAssignment,
  recipeOf,
  retryFailedReferences,
  storedDataset,
  studentReference,
  updateAssignment,
  variantForDownload,
  type AssignmentDeps,
} from '../services/assignments.js';
import { Variant } from '../models/index.js';
import { myStanding } from '../services/submissions.js';

export function assignmentsRouter({ sequelize, queue, engine }: { sequelize: Sequelize; queue: JobQueue | null; engine: Engine }): Router {
  const router = Router({ mergeParams: true });
  const deps: AssignmentDeps = { sequelize, queue };
  const load = (req: Parameters<typeof idParam>[0]) => findAssignment(req.courseId!, idParam(req, 'assignmentId'), req.enrollment!.role);

  router.get('/', requireCourseMember, async (req, res) => {
    const role = req.enrollment!.role;
    const list = await listAssignments(sequelize, req.courseId!, role);
    const body: AssignmentListResponse = { assignments: role === 'student' ? await myStanding(sequelize, currentUser(req).id, list) : list };
    res.json(body);
  });

  router.post('/', requireCourseRole('instructor'), async (req, res) => {
    const a = await createAssignment(deps, req.courseId!, currentUser(req), req.body);
    const body: AssignmentDetail = await assignmentDetail(sequelize, a, currentUser(req), 'instructor');
    res.status(201).json(body);
  });

  router.get('/:assignmentId', requireCourseMember, async (req, res) => {
    const a = await load(req);
    const body: AssignmentDetail = await assignmentDetail(sequelize, a, currentUser(req), req.enrollment!.role);
    res.json(body);
  });

  router.put('/:assignmentId', requireCourseRole('instructor'), async (req, res) => {
    const a = await updateAssignment(deps, await load(req), currentUser(req), req.body);
    const body: AssignmentDetail = await assignmentDetail(sequelize, a, currentUser(req), 'instructor');
    res.json(body);
  });

  router.post('/:assignmentId/publish', requireCourseRole('instructor'), async (req, res) => {
    const a = await publishAssignment(deps, await load(req));
    const body: AssignmentDetail = await assignmentDetail(sequelize, a, currentUser(req), 'instructor');
    res.status(202).json(body);
  });

  router.post('/:assignmentId/close', requireCourseRole('instructor'), async (req, res) => {
    const a = await closeAssignment(await load(req));
    const body: AssignmentDetail = await assignmentDetail(sequelize, a, currentUser(req), 'instructor');
    res.json(body);
  });

  router.get('/:assignmentId/progress', requireCourseRole(...staffRoles), async (req, res) => {
    const body: ReferenceProgress = await assignmentProgress(sequelize, await load(req));
    res.json(body);
  });

  router.post('/:assignmentId/references/retry', requireCourseRole('instructor'), async (req, res) => {
    const a = await load(req);
    await retryFailedReferences(deps, a);
    const body: ReferenceProgress = await assignmentProgress(sequelize, a);
    res.status(202).json(body);
  });

  router.get('/:assignmentId/preview', requireCourseRole(...staffRoles), async (req, res) => {
    const body: PreviewResponse = await assignmentPreview(sequelize, await load(req));
    res.json(body);
  });

  router.get('/:assignmentId/variants', requireCourseRole(...staffRoles), async (req, res) => {
    res.json({ variants: await listVariants(await load(req)) });
  });

  router.get('/:assignmentId/reference', requireCourseMember, async (req, res) => {
    if (req.enrollment!.role === 'student') throw forbidden('Reference spectra are for staff only');
    const a = await load(req);
    const raw = req.query.student;
    let student: number | null = null;
    if (raw !== undefined) {
      student = Number(raw);
      if (typeof raw !== 'string' || !Number.isInteger(student) || student <= 0) throw badRequest('student must be a user id', [{ path: 'student', message: 'Expected a positive whole number' }]);
    }
    const body: ReferenceResponse = await studentReference(a, student);
    res.json(body);
  });

  router.get('/:assignmentId/dataset', requireCourseMember, async (req, res) => {
    const a = await load(req);
    const format = (req.query.format ?? 'npy') as string;
    if (!(datasetFormats as readonly string[]).includes(format)) throw badRequest(`format must be one of ${datasetFormats.join(', ')}`, [{ path: 'format', message: `Expected ${datasetFormats.join(', ')}` }]);
    const part = (req.query.part ?? 'x') as string;
    if (part !== 'x' && part !== 'y') throw badRequest('part must be x or y', [{ path: 'part', message: 'Expected x or y' }]);
    const studentParam = typeof req.query.student === 'string' ? req.query.student : undefined;
    const { variant, dataset } = await variantForDownload(a, currentUser(req), req.enrollment!.role, studentParam);
    const out = await engine.materialize(storedDataset(dataset), recipeOf(variant), format === 'csv');
    if (variant.checksum && variant.checksum !== out.checksum) {
      throw new HttpError(500, 'internal', `The variant's data could not be reproduced (checksum ${out.checksum.slice(0, 12)}… instead of ${variant.checksum.slice(0, 12)}…); staff have been told`);
    }
    if (!variant.checksum) await Variant.update({ checksum: out.checksum }, { where: { id: variant.id, checksum: null } });
    const stem = `assignment-${a.id}-variant-${variant.id}`;
    if (part === 'y' && !dataset.pairs) throw badRequest('This dataset is one trajectory; it has no Y part', [{ path: 'part', message: 'Only datasets of explicit pairs have a Y part' }]);
    if (format === 'json') {
      const body: VariantMetadata = {
        assignmentId: a.id,
        variantId: variant.id,
        shape: out.shape,
        layout: 'columns',
        pairs: dataset.pairs,
        dt: out.dt ?? dataset.dt,
        sha256: out.checksum,
        files: dataset.pairs ? [`${stem}.x.npy`, `${stem}.y.npy`] : [`${stem}.npy`],
      };
      res.set('Content-Disposition', `attachment; filename="${stem}.json"`).json(body);
      return;
    }
    const suffix = dataset.pairs ? `.${part}` : '';
    if (format === 'csv') {
      const text = part === 'y' ? out.csvY : out.csvX;
      res.set('Content-Disposition', `attachment; filename="${stem}${suffix}.csv"`).type('text/csv').send(text);
      return;
    }
    const bytes = part === 'y' ? out.npyY : out.npyX;
    res.set('Content-Disposition', `attachment; filename="${stem}${suffix}.npy"`).type('application/octet-stream').send(Buffer.from(bytes!));
  });

  return router;
}
