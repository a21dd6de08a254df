import { randomBytes } from 'node:crypto';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createApp, defaultLogger } from './app.js';
import { createSequelize } from './db/sequelize.js';
import { migrate } from './db/migrate.js';
import { seedDemo } from './db/seed.js';
import { initModels } from './models/index.js';
import { createEnginePool, engineWorkerCount } from './jobs/engine-pool.js';
import { startQueue } from './jobs/queue.js';
import { startWorkers } from './jobs/handlers.js';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const logger = defaultLogger();

const port = Number(process.env.MODEWRIGHT_PORT ?? 5480);
let sessionSecret = process.env.SESSION_SECRET ?? '';
if (sessionSecret.length < 16) {
  logger.warn('SESSION_SECRET is not set (or shorter than 16 characters); using a random one, so sessions end on restart');
  sessionSecret = randomBytes(32).toString('base64url');
}

const sequelize = createSequelize(process.env.DATABASE_URL, logger);
await sequelize.authenticate();
const applied = await migrate(sequelize, logger);
if (applied.length) logger.info({ applied }, 'migrations applied');
initModels(sequelize);
const queue = await startQueue({ connectionString: process.env.DATABASE_URL!, logger });
const engine = createEnginePool();
void engine.warmUp?.().catch((err: Error) => logger.warn({ err: err.message }, 'engine warm-up failed'));
// Workers in this process unless MODEWRIGHT_WORKERS=0 (then run `npm run worker` elsewhere).
const stopWorkers = process.env.MODEWRIGHT_WORKERS === '0' ? null : await startWorkers({ sequelize, queue, engine, logger }, { concurrency: engineWorkerCount() * 2 });
if (process.env.MODEWRIGHT_SEED === '1') logger.info(await seedDemo(sequelize, { queue }), 'demo seed');

const app = createApp({
  sequelize,
  sessionSecret,
  logger,
  queue,
  engine,
  clientDir: process.env.MODEWRIGHT_CLIENT_DIR ?? path.join(root, 'dist', 'client'),
});

const server = app.listen(port, '127.0.0.1', () => {
  console.log(`Modewright is running at http://127.0.0.1:${port}`);
});
server.on('error', (err) => {
  logger.error({ err: err.message }, 'the server could not start');
  process.exit(1);
});

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  logger.info({ signal }, 'shutting down');
  const force = setTimeout(() => process.exit(1), 10_000);
  force.unref();
  const closed = new Promise<void>((resolve) => server.close(() => resolve()));
  server.closeIdleConnections();
  await closed;
  await app.close();
  if (stopWorkers) await stopWorkers();
  await queue.stop();
  await engine.close();
  await sequelize.close();
  process.exit(0);
}
process.on('SIGINT', () => void shutdown('SIGINT'));
process.on('SIGTERM', () => void shutdown('SIGTERM'));
