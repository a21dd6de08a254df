/**
 * `npm run bench:publish`: references of 300 variants of the demo kernel-EDMD
 * assignment (drift map, polynomial kernel of degree 3, rank 10, per-student
 * variants) computed through the job queue by one and by two `npm run worker`
 * processes, beside the engine alone in a loop over the same variants.
 *
 *   npm run bench:publish                 readable lines
 *   npm run -s bench:publish -- --json    {"workers", "refs_per_s", "engine_refs_per_s", "overhead"} per setting
 *   options: --variants N (default 300), --workers 1,2
 *
 * overhead = engine alone (refs/s) ÷ through the queue (refs/s). The workers
 * are started and idle before publishing, so their start-up is not counted;
 * the clock runs from the publish call until every reference is ready.
 * Needs the private PostgreSQL (`node scripts/run.mjs db`); uses its own
 * database modewright_bench, dropped and created afresh.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';
import pg from 'pg';
import { computeVariantReference, materializeVariant } from '../grading/assignment.js';
import { closePool } from '../grading/linalg/pool.js';
import { createSequelize } from '../server/db/sequelize.js';
import { migrate } from '../server/db/migrate.js';
import { Course, Enrollment, ReferenceSpectrum, User, Variant, initModels } from '../server/models/index.js';
import { createScenarioDataset } from '../server/services/datasets.js';
import { createAssignment, publishAssignment, recipeOf, storedDataset, taskRunOf } from '../server/services/assignments.js';
import { startQueue } from '../server/jobs/queue.js';
import { blasThreadsPerWorker, engineWorkerCount } from '../server/jobs/engine-pool.js';
import { AssignmentVersion, Dataset } from '../server/models/index.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
// The engine alone runs with the same OpenBLAS thread count as one job worker (on 2 cores: 1, also its fastest setting here).
process.env.MODEWRIGHT_BLAS_THREADS ??= String(blasThreadsPerWorker(engineWorkerCount()));
const { values } = parseArgs({ options: { json: { type: 'boolean' }, variants: { type: 'string' }, workers: { type: 'string' } } });
const count = Number(values.variants ?? 300);
const workerSettings = (values.workers ?? '1,2').split(',').map(Number);
const pgPort = Number(process.env.MODEWRIGHT_PG_PORT ?? 5479);
const dbName = 'modewright_bench';
const url = `postgres://postgres@127.0.0.1:${pgPort}/${dbName}`;

async function freshDatabase() {
  const c = new pg.Client({ connectionString: `postgres://postgres@127.0.0.1:${pgPort}/postgres` });
  await c.connect();
  await c.query(`DROP DATABASE IF EXISTS "${dbName}" WITH (FORCE)`);
  await c.query(`CREATE DATABASE "${dbName}"`);
  await c.end();
}

function startWorker(): Promise<ChildProcess> {
  return new Promise((resolve, reject) => {
    const child = spawn(join(root, 'node_modules', '.bin', 'tsx'), ['server/worker.ts'], {
      cwd: root,
      env: { ...process.env, DATABASE_URL: url, LOG_LEVEL: 'warn' },
      stdio: ['ignore', 'pipe', 'inherit'],
    });
    child.stdout!.on('data', (b: Buffer) => {
      if (b.toString().includes('is taking jobs')) resolve(child);
    });
    child.once('exit', (code) => reject(new Error(`worker exited with ${code}`)));
  });
}

const stopWorker = (c: ChildProcess) => new Promise<void>((r) => (c.exitCode !== null ? r() : (c.once('exit', () => r()), c.kill('SIGTERM'))));

async function main() {
  await freshDatabase();
  const sequelize = createSequelize(url);
  initModels(sequelize);
  await migrate(sequelize);
  const queue = await startQueue({ connectionString: url, pollingIntervalSeconds: 0.5 });
  const teacher = await User.create({ email: 'bench-teacher@modewright.test', displayName: 'Bench Teacher', passwordHash: 'x', canTeach: true });
  const course = await Course.create({ title: 'Bench course', code: 'BENCH-1', term: 'Bench', joinCode: null, createdById: teacher.id });
  await Enrollment.create({ userId: teacher.id, courseId: course.id, role: 'instructor' });
  const students = await User.bulkCreate(Array.from({ length: count }, (_, i) => ({ email: `s${i}@bench.test`, displayName: `Student ${i}`, passwordHash: 'x', canTeach: false })));
  await Enrollment.bulkCreate(students.map((s) => ({ userId: s.id, courseId: course.id, role: 'student' as const })));
  const dataset = await createScenarioDataset(course.id, teacher, { name: 'Drift map pairs', scenario: 'drift-map', seed: 23, noise: 0 });
  const config = {
    title: 'Kernel EDMD on a drift map',
    dueAt: new Date(Date.now() + 7 * 86_400_000).toISOString(),
    datasetId: dataset.id,
    variants: { mode: 'per-student' as const, noise: 0.0005, jitter: 0.02 },
    method: { method: 'kernel-edmd' as const, kernel: 'polynomial' as const, degree: 3, coef0: 1, gamma: 1, rankRule: { kind: 'rank' as const, rank: 10 } },
    top: 5,
  };
  const results: { workers: number; refs_per_s: number; engine_refs_per_s: number; overhead: number; seconds: number; cores: number }[] = [];

  // The engine alone, in this process, over the same recipes (made by the first publish below).
  let engineRate = 0;
  for (const workers of workerSettings) {
    const assignment = await createAssignment({ sequelize, queue: null }, course.id, teacher, { ...config, title: `${config.title} (${workers})` });
    const procs: ChildProcess[] = [];
    for (let i = 0; i < workers; i++) procs.push(await startWorker());
    const t0 = performance.now();
    await publishAssignment({ sequelize, queue }, assignment);
    const total = count + 1;
    for (;;) {
      const ready = await ReferenceSpectrum.count({ where: { status: 'ready' }, include: [{ model: Variant, as: 'variant', where: { assignmentId: assignment.id }, attributes: [] }] });
      const failed = await ReferenceSpectrum.count({ where: { status: 'failed' }, include: [{ model: Variant, as: 'variant', where: { assignmentId: assignment.id }, attributes: [] }] });
      if (failed > 0) throw new Error(`${failed} references failed`);
      if (ready >= total) break;
      await new Promise((r) => setTimeout(r, 50));
    }
    const seconds = (performance.now() - t0) / 1000;
    for (const p of procs) await stopWorker(p);

    if (engineRate === 0) {
      const variants = await Variant.findAll({ where: { assignmentId: assignment.id } });
      const ds = (await Dataset.findByPk(dataset.id))!;
      const stored = storedDataset(ds);
      const version = (await AssignmentVersion.findOne({ where: { assignmentId: assignment.id } }))!;
      const run = taskRunOf(version.config, ds.dt);
      const e0 = performance.now();
      for (const v of variants) {
        const mv = materializeVariant(stored, recipeOf(v));
        await computeVariantReference(mv.source, { ...run, dt: run.dt ?? mv.dt ?? undefined }, {});
      }
      engineRate = variants.length / ((performance.now() - e0) / 1000);
    }
    const rate = total / seconds;
    results.push({ workers, refs_per_s: rate, engine_refs_per_s: engineRate, overhead: engineRate / rate, seconds, cores: availableParallelism() });
  }
  await queue.stop();
  await sequelize.close();
  await closePool();
  for (const r of results) {
    if (values.json) {
      console.log(JSON.stringify({ workers: r.workers, refs_per_s: +r.refs_per_s.toFixed(2), engine_refs_per_s: +r.engine_refs_per_s.toFixed(2), overhead: +r.overhead.toFixed(3), variants: count, seconds: +r.seconds.toFixed(2), cores: r.cores }));
    } else {
      console.log(
        `${r.workers} worker process${r.workers > 1 ? 'es' : ''}: ${count + 1} references in ${r.seconds.toFixed(2)} s = ${r.refs_per_s.toFixed(1)} refs/s; engine alone ${r.engine_refs_per_s.toFixed(1)} refs/s; overhead ${r.overhead.toFixed(2)} (target ≤ 1.2 with one worker; ${r.cores} cores)`,
      );
    }
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
