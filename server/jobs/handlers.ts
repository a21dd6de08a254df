/**
 * Job handlers. Each reads its input row, computes off the event loop (the
 * engine pool) and writes its output row under a unique key, so a retried
 * or duplicated job never writes twice.
 */
import type { Logger } from 'pino';
import { Op, type Sequelize } from 'sequelize';
import type PgBoss from 'pg-boss';
import { AssignmentVersion, Dataset, ReferenceSpectrum, Variant } from '../models/index.js';
import { recipeOf, storedDataset, taskRunOf, variantsForLateJoiner, type AssignmentDeps } from '../services/assignments.js';
import { EngineInputError, type Engine } from './engine-pool.js';
import { queueNames, type JobQueue } from './queue.js';
import { mailJobHandler, type MailJobData } from './mail.js';
import { sweepOutbox } from '../services/outbox.js';
import type { MailTransport } from '../mail/transport.js';

export interface WorkerContext {
  sequelize: Sequelize;
  queue: JobQueue;
  engine: Engine;
  logger?: Logger;
  /** SMTP for the mail job (default: from the environment, see server/mail/transport.ts). */
  mailTransport?: MailTransport;
}

/** Compute one reference. Returns 'done', 'skipped' (already ready or gone) or 'failed' (a permanent problem, stored). Throws to ask for a retry. */
export async function runReferenceJob(ctx: WorkerContext, referenceId: number, lastAttempt: boolean): Promise<'done' | 'skipped' | 'failed'> {
  const row = await ReferenceSpectrum.findByPk(referenceId);
  if (!row || row.status === 'ready') return 'skipped';
  const variant = await Variant.findByPk(row.variantId);
  const version = await AssignmentVersion.findByPk(row.assignmentVersionId);
  if (!variant || !version) return 'skipped';
  await row.update({ status: 'running', attempts: row.attempts + 1 });

  // The same recipe (everyone's "same data") was computed already under this configuration: reuse it.
  const twin = await ReferenceSpectrum.findOne({
    where: { referenceKey: row.referenceKey, status: 'ready', id: { [Op.ne]: row.id } },
    include: [{ model: Variant, as: 'variant', where: { assignmentId: variant.assignmentId, recipeKey: variant.recipeKey, mode: variant.mode, seed: variant.seed, noise: variant.noise, jitter: variant.jitter }, attributes: ['id', 'checksum'] }],
  });
  try {
    let result: { reference: ReferenceSpectrum['reference']; extras: ReferenceSpectrum['extras']; singularValues: number[] | null; modeShapes: ReferenceSpectrum['modeShapes']; checksum: string; parameters: Record<string, number> | null };
    if (twin && twin.checksum) {
      result = { reference: twin.reference, extras: twin.extras, singularValues: twin.singularValues, modeShapes: twin.modeShapes, checksum: twin.checksum, parameters: null };
    } else {
      const dataset = await Dataset.findByPk(variant.datasetId);
      if (!dataset) throw new EngineInputError('the dataset of this variant no longer exists');
      const config = version.config;
      const out = await ctx.engine.reference(storedDataset(dataset), recipeOf(variant), taskRunOf(config, dataset.dt), { variantId: variant.id, assignmentVersion: version.version });
      result = { reference: out.reference, extras: out.extras, singularValues: out.singularValues, modeShapes: out.modeShapes, checksum: out.checksum, parameters: out.parameters };
    }
    if (variant.checksum && variant.checksum !== result.checksum) {
      throw new EngineInputError(`the variant's bytes changed: checksum ${result.checksum.slice(0, 12)}… differs from the recorded ${variant.checksum.slice(0, 12)}…; the recipe no longer gives the same data`);
    }
    await ctx.sequelize.transaction(async (transaction) => {
      if (!variant.checksum) await Variant.update({ checksum: result.checksum, ...(result.parameters ? { parameters: result.parameters } : {}) }, { where: { id: variant.id, checksum: null }, transaction });
      // Written once: a second run (retry, duplicate job) finds the row ready and changes nothing.
      await ReferenceSpectrum.update(
        { status: 'ready', reference: result.reference, extras: result.extras, singularValues: result.singularValues, modeShapes: result.modeShapes, checksum: result.checksum, computedAt: new Date() },
        { where: { id: row.id, status: { [Op.ne]: 'ready' } }, transaction },
      );
    });
    return 'done';
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    const permanent = e instanceof EngineInputError;
    await ReferenceSpectrum.update({ status: permanent || lastAttempt ? 'failed' : 'queued', message }, { where: { id: row.id, status: { [Op.ne]: 'ready' } } });
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
function jobLoop<T extends object>(ctx: WorkerContext, name: string, handle: (job: PgBoss.JobWithMetadata<T>) => Promise<void>): { stop(): Promise<void> } {
  const boss = ctx.queue.boss;
  const pollMs = ctx.queue.options.pollingIntervalSeconds * 1000;
  let stopping = false;
  let wake: (() => void) | null = null;
  const done = (async () => {
    while (!stopping) {
      let jobs: PgBoss.JobWithMetadata<T>[] = [];
      try {
        jobs = await boss.fetch<T>(name, { batchSize: 1, includeMetadata: true });
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
      for (const job of jobs) {
        try {
          await handle(job);
          await boss.complete(name, job.id);
        } catch (err) {
          await boss.fail(name, job.id, { message: err instanceof Error ? err.message : String(err) }).catch(() => undefined);
        }
      }
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
    loops.push(jobLoop<{ referenceId: number }>(ctx, queueNames.reference, async (job) => void (await runReferenceJob(ctx, job.data.referenceId, job.retryCount >= job.retryLimit))));
  }
  loops.push(jobLoop<MailJobData>(ctx, queueNames.mail, mailJobHandler(ctx)));
  await sweepOutbox({ queue: ctx.queue, logger: ctx.logger });
  loops.push(jobLoop<{ courseId: number; userId: number }>(ctx, queueNames.variants, async (job) => void (await variantsForLateJoiner(deps, job.data.courseId, job.data.userId))));
  // References left queued with no job (seeded without a queue, or a worker stopped mid-way) are sent again; handlers are idempotent.
  const orphans = await ReferenceSpectrum.findAll({ where: { status: { [Op.in]: ['queued', 'running'] }, updatedAt: { [Op.lt]: new Date(Date.now() - 60_000) } }, attributes: ['id'] });
  await ctx.queue.sendMany('reference', orphans.map((r) => ({ data: { referenceId: r.id }, singletonKey: `reference-${r.id}` })));
  return async () => {
    await Promise.all(loops.map((l) => l.stop()));
  };
}
