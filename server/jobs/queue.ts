/**
 * The job queue: pg-boss 10 on the same PostgreSQL (schema "pgboss"). The API
 * process only sends; workers (in-process under `npm start`, or separate
 * `npm run worker` processes on any machine sharing the database) take jobs.
 * Handlers are idempotent: each writes its output row under a unique key.
 */
import PgBoss from 'pg-boss';
import type { Logger } from 'pino';

export const queueNames = { reference: 'reference', variants: 'variants', mail: 'mail', grade: 'grade', account: 'account' } as const;
export type QueueName = (typeof queueNames)[keyof typeof queueNames];

export interface QueueOptions {
  connectionString: string;
  logger?: Logger;
  /** Retries after a thrown error (default 3), with exponential backoff from retryDelaySeconds (default 5). */
  retryLimit?: number;
  retryDelaySeconds?: number;
  /** Retries of a mail job (default 12: with the doubling delay from 5 s, an SMTP server may be down for hours). */
  mailRetryLimit?: number;
  pollingIntervalSeconds?: number;
}

export interface JobQueue {
  readonly boss: PgBoss;
  readonly options: Required<Pick<QueueOptions, 'retryLimit' | 'retryDelaySeconds' | 'mailRetryLimit' | 'pollingIntervalSeconds'>>;
  send(name: QueueName, data: object, singletonKey?: string): Promise<void>;
  /** Many jobs in one statement. */
  sendMany(name: QueueName, items: { data: object; singletonKey?: string }[]): Promise<void>;
  stop(): Promise<void>;
}

export async function startQueue(o: QueueOptions): Promise<JobQueue> {
  const options = {
    retryLimit: o.retryLimit ?? 3,
    retryDelaySeconds: o.retryDelaySeconds ?? 5,
    mailRetryLimit: o.mailRetryLimit ?? 12,
    pollingIntervalSeconds: o.pollingIntervalSeconds ?? 1,
  };
  const boss = new PgBoss({ connectionString: o.connectionString, max: 4, schedule: false });
  boss.on('error', (err) => o.logger?.error({ err: err.message }, 'job queue error'));
  await boss.start();
  for (const name of Object.values(queueNames)) {
    if (await boss.getQueue(name)) continue;
    await boss.createQueue(name, {
      name,
      retryLimit: name === queueNames.mail ? options.mailRetryLimit : options.retryLimit,
      retryDelay: options.retryDelaySeconds,
      retryBackoff: true,
      expireInSeconds: 30 * 60,
    }).catch(async (err: unknown) => {
      // Another process created it at the same moment.
      if (!(await boss.getQueue(name))) throw err;
    });
  }
  return {
    boss,
    options,
    async send(name, data, singletonKey) {
      await boss.send(name, data, singletonKey ? { singletonKey } : {});
    },
    async sendMany(name, items) {
      if (items.length === 0) return;
      for (let i = 0; i < items.length; i += 500) {
        await boss.insert(items.slice(i, i + 500).map((it) => ({ name, data: it.data, singletonKey: it.singletonKey })));
      }
    },
    async stop() {
      await boss.stop({ graceful: true, wait: true, timeout: 15_000 });
    },
  };
}
