/**
 * The 'mail' job: deliver one outbox row (server/services/outbox.ts). A thrown
 * error (SMTP refused, server down) makes pg-boss retry with exponential
 * backoff; the row records each attempt's error and becomes failed after the
 * last, which the course's instructors see.
 */
import type { Logger } from 'pino';
import type PgBoss from 'pg-boss';
import { createMailTransport, type MailTransport } from '../mail/transport.js';
import { deliverOutboxMessage } from '../services/outbox.js';

export interface MailJobData {
  outboxId: number;
}

export interface MailJobContext {
  /** Default: the transport from the environment (SMTP_URL, or SMTP_HOST / SMTP_PORT). */
  mailTransport?: MailTransport;
  logger?: Logger;
}

/** A handler for jobLoop: one transport per worker process, made on first use. */
export function mailJobHandler(ctx: MailJobContext): (job: PgBoss.JobWithMetadata<MailJobData>) => Promise<void> {
  let transport = ctx.mailTransport ?? null;
  return async (job) => {
    transport ??= createMailTransport();
    await deliverOutboxMessage(transport, job.data.outboxId, { lastAttempt: job.retryCount >= job.retryLimit, logger: ctx.logger });
  };
}
