/**
 * The 'account' job: one sign-up or password-reset request, as the route
 * accepted it (server/services/accounts.ts). The route answers every address
 * alike after queuing it; this job looks the address up, writes the token and
 * the message. A thrown error (the database went away) is retried by pg-boss;
 * the message's outbox key is the request's id, so a retry never sends twice.
 */
import type { Logger } from 'pino';
import type PgBoss from 'pg-boss';
import type { Sequelize } from 'sequelize';
import { runAccountRequest, type AccountRequest, type AccountRequestSink } from '../services/accounts.js';
import type { Mailer } from '../services/mail.js';
import { queueNames, type JobQueue } from './queue.js';

export interface AccountJobContext {
  sequelize: Sequelize;
  /** Writes the messages (through the outbox) with the site's links. */
  mailer: Mailer;
  logger?: Logger;
}

/** A handler for jobLoop. */
export function accountJobHandler(ctx: AccountJobContext): (job: PgBoss.JobWithMetadata<AccountRequest>) => Promise<void> {
  return async (job) => {
    const result = await runAccountRequest(ctx.sequelize, ctx.mailer, job.data);
    ctx.logger?.info({ jobId: job.id, kind: job.data.kind, result, retry: job.retryCount }, 'account request done');
  };
}

/**
 * Where the routes hand requests over: one 'account' job each. With no queue (some tests and
 * scripts), the request is carried out in this process once the answer is on its way, so the
 * answer still does not wait for (or depend on) the lookup.
 */
export function accountRequestSink(queue: JobQueue | null, ctx: AccountJobContext): AccountRequestSink {
  if (queue) return (request) => queue.send(queueNames.account, request);
  return (request) => {
    setImmediate(() => {
      runAccountRequest(ctx.sequelize, ctx.mailer, request).catch((err: Error) =>
        ctx.logger?.error({ err: err.message, kind: request.kind }, 'account request failed (no queue, not retried)'),
      );
    });
    return Promise.resolve();
  };
}
