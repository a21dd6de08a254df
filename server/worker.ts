/**
 * `npm run worker`: job workers as a separate process against the same
 * PostgreSQL (DATABASE_URL). Start as many as you like, on any machine that
 * reaches the database; each takes jobs from the shared queue.
 */
import { defaultLogger } from './app.js';
import { createSequelize } from './db/sequelize.js';
import { migrate } from './db/migrate.js';
import { initModels } from './models/index.js';
import { createEnginePool, engineWorkerCount } from './jobs/engine-pool.js';
import { startQueue } from './jobs/queue.js';
import { startWorkers } from './jobs/handlers.js';

const logger = defaultLogger();
const url = process.env.DATABASE_URL;
if (!url) {
  logger.error('DATABASE_URL is not set (e.g. postgres://postgres@127.0.0.1:5479/modewright)');
  process.exit(2);
}
const sequelize = createSequelize(url, logger);
await sequelize.authenticate();
await migrate(sequelize, logger);
initModels(sequelize);
const queue = await startQueue({ connectionString: url, logger });
const engine = createEnginePool();
await engine.warmUp?.();
// Two job loops per engine thread: one writes its result while the other computes (the threads stay busy, the cores are not oversubscribed).
const concurrency = engineWorkerCount() * 2;
const stop = await startWorkers({ sequelize, queue, engine, logger }, { concurrency });
logger.info({ concurrency, pid: process.pid }, 'worker is taking jobs');
console.log(`Modewright worker ${process.pid} is taking jobs (${concurrency} at a time)`);

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  logger.info({ signal }, 'worker shutting down');
  setTimeout(() => process.exit(1), 20_000).unref();
  await stop();
  await queue.stop();
  await engine.close();
  await sequelize.close();
  process.exit(0);
}
process.on('SIGINT', () => void shutdown('SIGINT'));
process.on('SIGTERM', () => void shutdown('SIGTERM'));
