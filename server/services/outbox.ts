/**
 * The outbox: every e-mail the site sends is first a row (unique per key, so a
 * message is sent at most once per key), then a 'mail' job that delivers it
 * through the SMTP transport and retries with backoff while the server refuses.
 *
 *   enqueueMail(deps, transaction, mail)   one message (inside the caller's transaction, or alone)
 *   enqueueMails(deps, transaction, mails) many at once (a release to a whole course)
 *   redispatchQueued(deps, key)             a delivery job again for a row still queued (a retried writer)
 *
 * With a transaction, the job is sent after the commit (a rolled-back change sends nothing).
 * Without a queue (some tests, scripts), the message is delivered at once in this process.
 */
import { createHash } from 'node:crypto';
import type { Logger } from 'pino';
import { Op, QueryTypes, type Transaction } from 'sequelize';
import type { OutboxListResponse, OutboxMessageDto } from '../../shared/accounts.js';
import { conflict, notFound } from '../errors.js';
import { createMailTransport, mailFrom, type MailTransport } from '../mail/transport.js';
import { OutboxMessage } from '../models/index.js';
import { queueNames, type JobQueue } from '../jobs/queue.js';

export interface MailDeps {
  /** Where the 'mail' job goes; null delivers at once in this process (no retries). */
  queue: JobQueue | null;
  /** Used only when queue is null (default: the transport from the environment). */
  transport?: MailTransport;
  logger?: Logger;
}

export interface OutboxMail {
  /** Unique per message: the same key twice sends once (e.g. `release:12:student:7`). At most 200 characters. */
  key: string;
  to: string;
  subject: string;
  text: string;
  html?: string | null;
  /** The course the message belongs to, so its instructors see failures (GET /api/courses/:id/outbox). */
  courseId?: number | null;
  /** A short word for what the message is (invitation, release, password-reset, ...). */
  kind?: string | null;
}

let defaultTransport: MailTransport | null = null;
const transportOf = (deps: MailDeps) => deps.transport ?? (defaultTransport ??= createMailTransport());

async function insertRows(transaction: Transaction | null | undefined, mails: OutboxMail[]): Promise<{ id: number; key: string }[]> {
  if (mails.length === 0) return [];
  const sequelize = OutboxMessage.sequelize!;
  const out: { id: number; key: string }[] = [];
  for (let i = 0; i < mails.length; i += 500) {
    const chunk = mails.slice(i, i + 500);
    const values: string[] = [];
    const bind: unknown[] = [];
    for (const m of chunk) {
      if (!m.key || m.key.length > 200) throw new Error(`outbox key must have 1 to 200 characters: ${JSON.stringify(m.key)}`);
      const b = bind.length;
      values.push(`($${b + 1}, $${b + 2}, $${b + 3}, $${b + 4}, $${b + 5}, $${b + 6}, $${b + 7}, 'queued', 0, now(), now())`);
      bind.push(m.key, m.to.trim().toLowerCase(), m.subject.slice(0, 300), m.text, m.html ?? null, m.courseId ?? null, m.kind ?? null);
    }
    const rows = await sequelize.query<{ id: number; key: string }>(
      `INSERT INTO outbox (key, "to", subject, text, html, "courseId", kind, state, attempts, "createdAt", "updatedAt")
       VALUES ${values.join(', ')}
       ON CONFLICT (key) DO NOTHING
       RETURNING id, key`,
      { bind, type: QueryTypes.SELECT, transaction: transaction ?? undefined },
    );
    out.push(...rows);
  }
  return out;
}

async function dispatch(deps: MailDeps, ids: number[]): Promise<void> {
  if (ids.length === 0) return;
  try {
    if (deps.queue) {
      await deps.queue.sendMany(queueNames.mail, ids.map((id) => ({ data: { outboxId: id } })));
      return;
    }
    for (const id of ids) {
      await deliverOutboxMessage(transportOf(deps), id, { lastAttempt: true, logger: deps.logger }).catch(() => undefined);
    }
  } catch (err) {
    // The rows stay queued; a worker's start-up sweep sends their jobs again.
    deps.logger?.error({ err: (err as Error).message, ids }, 'mail jobs could not be queued');
  }
}

/**
 * Record messages in the outbox (ON CONFLICT (key) DO NOTHING) and queue their delivery.
 * Returns the ids of the rows created; a key seen before creates nothing and sends nothing.
 */
export async function enqueueMails(deps: MailDeps, transaction: Transaction | null | undefined, mails: OutboxMail[]): Promise<number[]> {
  const created = await insertRows(transaction, mails);
  const ids = created.map((r) => r.id);
  if (transaction) transaction.afterCommit(() => dispatch(deps, ids));
  else await dispatch(deps, ids);
  return ids;
}

/** One message; `created` is false when its key was enqueued before (then nothing more is sent). */
export async function enqueueMail(deps: MailDeps, transaction: Transaction | null | undefined, mail: OutboxMail): Promise<{ id: number | null; created: boolean }> {
  const [id] = await enqueueMails(deps, transaction, [mail]);
  return { id: id ?? null, created: id !== undefined };
}

/**
 * A job that wrote its message and then failed (its retry finds the key taken) may have stopped
 * before the delivery job was queued: queue it again while the row is still queued. Delivery takes
 * only a queued row, so a second job for a row already on its way sends nothing.
 */
export async function redispatchQueued(deps: MailDeps, key: string): Promise<boolean> {
  const row = await OutboxMessage.findOne({ where: { key, state: 'queued' }, attributes: ['id'] });
  if (!row) return false;
  await dispatch(deps, [row.id]);
  return true;
}

const messageId = (row: OutboxMessage) => `<outbox-${row.id}-${createHash('sha256').update(row.key).digest('hex').slice(0, 16)}@modewright>`;

const errorText = (err: unknown) => {
  const e = err as { message?: string; code?: string; responseCode?: number };
  const parts = [e.code, e.responseCode ? `SMTP ${e.responseCode}` : null, e.message ?? String(err)].filter(Boolean);
  return parts.join(': ').slice(0, 1000);
};

/**
 * Deliver one outbox row. Only a queued row is taken (queued -> sending, guarded in one UPDATE),
 * so a duplicate or retried job never sends twice. On SMTP failure the row goes back to queued
 * with lastError (or to failed when this was the last attempt) and the error is thrown, so the
 * queue retries with backoff. Returns 'sent' or 'skipped' (not queued: sent, sending or failed).
 */
export async function deliverOutboxMessage(
  transport: MailTransport,
  id: number,
  { lastAttempt, logger }: { lastAttempt: boolean; logger?: Logger },
): Promise<'sent' | 'skipped'> {
  const [count, rows] = await OutboxMessage.update(
    { state: 'sending', attempts: OutboxMessage.sequelize!.literal('attempts + 1') as unknown as number },
    { where: { id, state: 'queued' }, returning: true },
  );
  if (count === 0) return 'skipped';
  const row = rows[0]!;
  try {
    await transport.sendMail({
      from: mailFrom(),
      to: row.to,
      subject: row.subject,
      text: row.text,
      ...(row.html ? { html: row.html } : {}),
      messageId: messageId(row),
    });
  } catch (err) {
    const message = errorText(err);
    await OutboxMessage.update({ state: lastAttempt ? 'failed' : 'queued', lastError: message }, { where: { id, state: 'sending' } });
    logger?.warn({ outboxId: id, kind: row.kind, attempt: row.attempts, lastAttempt, err: message }, 'mail not delivered');
    throw err;
  }
  await OutboxMessage.update({ state: 'sent', sentAt: new Date(), lastError: null }, { where: { id, state: 'sending' } });
  logger?.info({ outboxId: id, kind: row.kind, attempt: row.attempts }, 'mail sent');
  return 'sent';
}

/**
 * After a worker (re)starts: rows left 'sending' for a long time were interrupted mid-way (the
 * SMTP server may or may not have taken them), so they become failed for a person to decide;
 * rows still queued get a job again (handlers are idempotent).
 */
export async function sweepOutbox(deps: MailDeps): Promise<{ requeued: number; interrupted: number }> {
  const [interrupted] = await OutboxMessage.update(
    { state: 'failed', lastError: 'Sending was interrupted (the worker stopped mid-way); the message may not have arrived. Send it again if needed.' },
    { where: { state: 'sending', updatedAt: { [Op.lt]: new Date(Date.now() - 15 * 60_000) } } },
  );
  const queued = await OutboxMessage.findAll({ where: { state: 'queued', updatedAt: { [Op.lt]: new Date(Date.now() - 60_000) } }, attributes: ['id'] });
  await dispatch(deps, queued.map((r) => r.id));
  return { requeued: queued.length, interrupted };
}

export const toOutboxDto = (m: OutboxMessage): OutboxMessageDto => ({
  id: m.id,
  to: m.to,
  subject: m.subject,
  kind: m.kind,
  state: m.state,
  attempts: m.attempts,
  lastError: m.lastError,
  createdAt: m.createdAt.toISOString(),
  updatedAt: m.updatedAt.toISOString(),
  sentAt: m.sentAt ? m.sentAt.toISOString() : null,
});

/** A course's messages: 'unsent' (queued, sending, failed), 'failed', or 'all'; newest first, at most 500. */
export async function listCourseOutbox(courseId: number, filter: 'unsent' | 'failed' | 'all'): Promise<OutboxListResponse> {
  const where =
    filter === 'all' ? { courseId } : filter === 'failed' ? { courseId, state: 'failed' } : { courseId, state: { [Op.ne]: 'sent' } };
  const rows = await OutboxMessage.findAll({ where, order: [['createdAt', 'DESC'], ['id', 'DESC']], limit: 500 });
  const grouped = (await OutboxMessage.count({ where: { courseId }, group: ['state'] })) as unknown as { state: string; count: string | number }[];
  const counts = { queued: 0, sending: 0, sent: 0, failed: 0 };
  for (const g of grouped) if (g.state in counts) counts[g.state as keyof typeof counts] = Number(g.count);
  return { messages: rows.map(toOutboxDto), counts };
}

/** Send a failed message again (a person's decision): back to queued, attempts kept, a new job. */
export async function retryOutboxMessage(deps: MailDeps, courseId: number, id: number, transaction?: Transaction): Promise<OutboxMessage> {
  const row = await OutboxMessage.findOne({ where: { id, courseId }, transaction });
  if (!row) throw notFound('This course has no such message');
  if (row.state !== 'failed') throw conflict(`Only a failed message can be sent again; this one is ${row.state}`);
  const [count] = await OutboxMessage.update({ state: 'queued' }, { where: { id, state: 'failed' }, transaction });
  if (count === 0) throw conflict('This message changed meanwhile; reload the list');
  await row.reload({ transaction });
  if (transaction) transaction.afterCommit(() => dispatch(deps, [id]));
  else await dispatch(deps, [id]);
  return row;
}
