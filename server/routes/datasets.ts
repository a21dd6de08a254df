import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import type { DatasetDetail, DatasetListResponse } from '../../shared/assignment.js';
import { HttpError } from '../errors.js';
import { currentUser, idParam, requireCourseRole, staffRoles } from '../middleware/auth.js';
import { createScenarioDataset, createUploadedDataset, findDataset, listDatasets, maxUploadBytes, toDatasetDetail } from '../services/datasets.js';

const tooLarge = (limit: number) =>
  new HttpError(413, 'payload-too-large', `The upload is larger than the limit of ${Math.round(limit / (1024 * 1024))} MB`, [{ path: 'file', message: `At most ${Math.round(limit / (1024 * 1024))} MB` }]);

/**
 * Refuse an upload whose declared length is over the limit before reading any of it
 * (the connection is closed after the answer, so the rest is never read); multer's
 * own limit stops a body without a declared length while it streams.
 */
export function uploadGuard(limit: () => number): RequestHandler {
  return (req, res, next) => {
    const declared = Number(req.get('content-length'));
    if (Number.isFinite(declared) && declared > limit() + 64 * 1024) {
      res.set('Connection', 'close');
      return next(tooLarge(limit()));
    }
    const upload = multer({ storage: multer.memoryStorage(), limits: { fileSize: limit(), files: 2, fields: 10, fieldSize: 4096 } }).fields([
      { name: 'file', maxCount: 1 },
      { name: 'fileY', maxCount: 1 },
    ]);
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      const e = err as { code?: string; field?: string; message?: string };
      if (e.code === 'LIMIT_FILE_SIZE') {
        res.set('Connection', 'close');
        return next(tooLarge(limit()));
      }
      if (e.code?.startsWith('LIMIT_')) return next(new HttpError(400, 'bad-request', `Upload refused: ${e.message}${e.field ? ` (${e.field})` : ''}`, [{ path: e.field ?? 'file', message: e.message ?? 'refused' }]));
      next(err);
    });
  };
}

export function datasetsRouter(): Router {
  const router = Router({ mergeParams: true });

  router.get('/', requireCourseRole(...staffRoles), async (req, res) => {
    const body: DatasetListResponse = { datasets: await listDatasets(req.courseId!), maxUploadBytes: maxUploadBytes() };
    res.json(body);
  });

  router.post('/', requireCourseRole('instructor'), uploadGuard(maxUploadBytes), async (req, res) => {
    const files = (req.files ?? {}) as Record<string, Express.Multer.File[] | undefined>;
    const d = await createUploadedDataset(req.courseId!, currentUser(req), req.body, files.file?.[0], files.fileY?.[0]);
    const body: DatasetDetail = toDatasetDetail(d);
    res.status(201).json(body);
  });

  router.post('/scenario', requireCourseRole('instructor'), async (req, res) => {
    const d = await createScenarioDataset(req.courseId!, currentUser(req), req.body);
    const body: DatasetDetail = toDatasetDetail(d);
    res.status(201).json(body);
  });

  router.get('/:datasetId', requireCourseRole(...staffRoles), async (req, res) => {
    const body: DatasetDetail = toDatasetDetail(await findDataset(req.courseId!, idParam(req, 'datasetId')));
    res.json(body);
  });

  return router;
}
