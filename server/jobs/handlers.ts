/**
 * Job handlers. Each reads its input row, computes off the event loop (the
 * engine pool) and writes its output row under a unique key, so a retried
 * or duplicated job never writes twice.
 */
import type { Logger } from 'pino';
import { Op, type Sequelize } from 'sequelize';
import type PgBoss from 'pg-boss';
import { AssignmentVersion, Dataset, ReferenceSpectrum, Submission, Variant } from '../models/index.js';
import { recipeOf, storedDataset, taskRunOf, variantsForLateJoiner, type AssignmentDeps } from '../services/assignments.js';
import type { StoredDataset } from '../../grading/assignment.js';
import { EngineInputError, type Engine } from './engine-pool.js';
import { queueNames, type JobQueue } from './queue.js';
import { mailJobHandler, type MailJobData } from './mail.js';
import { accountJobHandler } from './accounts.js';
import type { AccountRequest } from '../services/accounts.js';
import { Mailer, publicUrlFromEnv } from '../services/mail.js';
import { sweepOutbox } from '../services/outbox.js';
import type { MailTransport } from '../mail/transport.js';
import { runGradeJob, type Scorer } from '../services/submissions.js';

export interface WorkerContext {
  sequelize: Sequelize;
  queue: JobQueue;
  engine: Engine;
  logger?: Logger;
  /** SMTP for the mail job (default: from the environment, see server/mail/transport.ts). */
  mailTransport?: MailTransport;
  /** The scorer (tests substitute one that throws). */
  scorer?: Scorer;
  /** Where links in account mail point (default MODEWRIGHT_PUBLIC_URL, as the site's own). */
  publicUrl?: string;
  /** Writes the account job's messages (default: one on this queue with publicUrl; tests substitute one that fails once). */
  mailer?: Mailer;
}

/** Datasets never change once stored: a worker keeps the few it used last, so a publish of many variants reads the bytes once. */
const datasetCache = new Map<number, StoredDataset & { dt: number | null }>();
async function loadDataset(id: number): Promise<(StoredDataset & { dt: number | null }) | null> {
  const hit = datasetCache.get(id);
  if (hit) return hit;
  const d = await Dataset.findByPk(id);
  if (!d) return null;
  const stored = { ...storedDataset(d), dt: d.dt };
  datasetCache.set(id, stored);
  if (datasetCache.size > 4) datasetCache.delete(datasetCache.keys().next().value!);
  return stored;
}

type ReferenceRow = ReferenceSpectrum & { variant: Variant; assignmentVersion: AssignmentVersion };

/** Compute one reference. Returns 'done', 'skipped' (already ready or gone) or 'failed' (a permanent problem, stored). Throws to ask for a retry. */
export async function runReferenceJob(ctx: WorkerContext, referenceId: number, lastAttempt: boolean): Promise<'done' | 'skipped' | 'failed'> {
  const row = (await ReferenceSpectrum.findByPk(referenceId, {
    include: [
      { model: Variant, as: 'variant' },
      { model: AssignmentVersion, as: 'assignmentVersion', attributes: ['id', 'version', 'config'] },
    ],
  })) as ReferenceRow | null;
  if (!row || row.status === 'ready' || !row.variant || !row.assignmentVersion) return 'skipped';
  const { variant, assignmentVersion: version } = row;
  const attempts = row.attempts + 1;
  try {
    let result: { reference: ReferenceSpectrum['reference']; extras: ReferenceSpectrum['extras']; singularValues: number[] | null; modeShapes: ReferenceSpectrum['modeShapes']; checksum: string; parameters: Record<string, number> | null };
    // Everyone's "same data" under this configuration was computed already: reuse it.
    const twin =
      variant.mode === 'same'
        ? await ReferenceSpectrum.findOne({
            where: { referenceKey: row.referenceKey, status: 'ready', id: { [Op.ne]: row.id } },
            include: [{ model: Variant, as: 'variant', where: { assignmentId: variant.assignmentId, recipeKey: variant.recipeKey, mode: 'same' }, attributes: ['id'] }],
          })
        : null;
    if (twin && twin.checksum) {
      result = { reference: twin.reference, extras: twin.extras, singularValues: twin.singularValues, modeShapes: twin.modeShapes, checksum: twin.checksum, parameters: null };
    } else {
      const dataset = await loadDataset(variant.datasetId);
      if (!dataset) throw new EngineInputError('the dataset of this variant no longer exists');
      const { dt, ...stored } = dataset;
      const out = await ctx.engine.reference(stored, recipeOf(variant), taskRunOf(version.config, dt), { variantId: variant.id, assignmentVersion: version.version });
      result = { reference: out.reference, extras: out.extras, singularValues: out.singularValues, modeShapes: out.modeShapes, checksum: out.checksum, parameters: out.parameters };
    }
    if (variant.checksum && variant.checksum !== result.checksum) {
      throw new EngineInputError(`the variant's bytes changed: checksum ${result.checksum.slice(0, 12)}… differs from the recorded ${variant.checksum.slice(0, 12)}…; the recipe no longer gives the same data`);
    }
    // One statement (one round trip, one commit): the variant's checksum where it is not yet recorded, and the
    // reference, written once — a second run (retry, duplicate job) finds the row ready and changes nothing.
    await ctx.sequelize.query(
      `WITH v AS (UPDATE variants SET checksum = :checksum, parameters = COALESCE(CAST(:parameters AS jsonb), parameters), "updatedAt" = now()
                   WHERE id = :variantId AND checksum IS NULL)
       UPDATE reference_spectra SET status = 'ready', attempts = :attempts, reference = CAST(:reference AS jsonb), extras = CAST(:extras AS jsonb),
              "singularValues" = CAST(:singularValues AS jsonb), "modeShapes" = CAST(:modeShapes AS jsonb), checksum = :checksum,
              "computedAt" = now(), "updatedAt" = now()
        WHERE id = :id AND status <> 'ready'`,
      {
        replacements: {
          id: row.id,
          variantId: variant.id,
          attempts,
          checksum: result.checksum,
          parameters: result.parameters ? JSON.stringify(result.parameters) : null,
          reference: JSON.stringify(result.reference),
          extras: JSON.stringify(result.extras ?? null),
          singularValues: JSON.stringify(result.singularValues ?? null),
          modeShapes: JSON.stringify(result.modeShapes ?? null),
        },
      },
    );
    return 'done';
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    const permanent = e instanceof EngineInputError;
    await ReferenceSpectrum.update({ status: permanent || lastAttempt ? 'failed' : 'queued', attempts, message }, { where: { id: row.id, status: { [Op.ne]: 'ready' } } });
    ctx.logger?.warn({ referenceId, message, permanent }, 'reference job failed');
    if (permanent) return 'failed';
    throw e;
  }
}

/**
 * One loop per concurrency slot: fetch a job, run it, complete or fail it,
 * and fetch the next at once; sleep the polling interval only when the queue
 * is empty (pg-boss's own `work` waits the interval after every batch).
 */
function jobLoop<T extends object>(ctx: WorkerContext, name: string, handle: (job: PgBoss.JobWithMetadata<T>) => Promise<void>, batchSize = 1): { stop(): Promise<void> } {
  const boss = ctx.queue.boss;
  const pollMs = ctx.queue.options.pollingIntervalSeconds * 1000;
  let stopping = false;
  let wake: (() => void) | null = null;
  const done = (async () => {
    while (!stopping) {
      let jobs: PgBoss.JobWithMetadata<T>[] = [];
      try {
        jobs = await boss.fetch<T>(name, { batchSize, includeMetadata: true });
      } catch (err) {
        ctx.logger?.error({ err: (err as Error).message, queue: name }, 'job fetch failed');
      }
      if (jobs.length === 0) {
        await new Promise<void>((resolve) => {
          const t = setTimeout(resolve, pollMs);
          wake = () => {
            clearTimeout(t);
            resolve();
          };
        });
        wake = null;
        continue;
      }
      const done: string[] = [];
      for (const job of jobs) {
        try {
          await handle(job);
          done.push(job.id);
        } catch (err) {
          await boss.fail(name, job.id, { message: err instanceof Error ? err.message : String(err) }).catch(() => undefined);
        }
      }
      // One statement for the batch; a job whose output is written but not yet marked complete is skipped if it runs again.
      if (done.length) await boss.complete(name, done).catch((err: Error) => ctx.logger?.error({ err: err.message, queue: name }, 'job completion failed'));
    }
  })();
  return {
    async stop() {
      stopping = true;
      wake?.();
      await done;
    },
  };
}

/** Register the handlers; returns a function that stops taking jobs (after the running ones finish). */
export async function startWorkers(ctx: WorkerContext, options: { concurrency?: number } = {}): Promise<() => Promise<void>> {
  const deps: AssignmentDeps = { sequelize: ctx.sequelize, queue: ctx.queue };
  const loops: { stop(): Promise<void> }[] = [];
  const concurrency = options.concurrency ?? 1;
  for (let i = 0; i < concurrency; i++) {
    loops.push(jobLoop<{ referenceId: number }>(ctx, queueNames.reference, async (job) => void (await runReferenceJob(ctx, job.data.referenceId, job.retryCount >= job.retryLimit)), 4));
  }
  for (let i = 0; i < concurrency; i++) {
    loops.push(
      jobLoop<{ submissionId: number; gradeKey: string }>(ctx, queueNames.grade, async (job) => {
        const r = await runGradeJob(ctx, job.data.submissionId, job.data.gradeKey, job.retryCount >= job.retryLimit);
        // Its reference is still being computed: look again in a few seconds.
        if (r === 'waiting') await ctx.queue.boss.send(queueNames.grade, job.data, { startAfter: 3 });
      }),
    );
  }
  loops.push(jobLoop<MailJobData>(ctx, queueNames.mail, mailJobHandler(ctx)));
  const mailer = ctx.mailer ?? new Mailer({ queue: ctx.queue, logger: ctx.logger, publicUrl: ctx.publicUrl ?? publicUrlFromEnv() });
  loops.push(jobLoop<AccountRequest>(ctx, queueNames.account, accountJobHandler({ sequelize: ctx.sequelize, mailer, logger: ctx.logger })));
  await sweepOutbox({ queue: ctx.queue, logger: ctx.logger });
  loops.push(jobLoop<{ courseId: number; userId: number }>(ctx, queueNames.variants, async (job) => void (await variantsForLateJoiner(deps, job.data.courseId, job.data.userId))));
  // References left queued with no job (seeded without a queue, or a worker stopped mid-way) are sent again; handlers are idempotent.
  const orphans = await ReferenceSpectrum.findAll({ where: { status: { [Op.in]: ['queued', 'running'] }, updatedAt: { [Op.lt]: new Date(Date.now() - 60_000) } }, attributes: ['id'] });
  await ctx.queue.sendMany('reference', orphans.map((r) => ({ data: { referenceId: r.id }, singletonKey: `reference-${r.id}` })));
  const unscored = await Submission.findAll({ where: { status: { [Op.in]: ['received', 'grading'] }, updatedAt: { [Op.lt]: new Date(Date.now() - 60_000) } }, attributes: ['id'] });
  await ctx.queue.sendMany('grade', unscored.map((s) => ({ data: { submissionId: s.id, gradeKey: 'auto' } })));
  return async () => {
    await Promise.all(loops.map((l) => l.stop()));
  };
}
