// The outbox and the mail job against the real PostgreSQL test database and a real pg-boss
// queue, delivering over real SMTP to an smtp-server instance this file starts and stops on
// a free port (so the shared mail catcher is left alone). Expectations: the outbox contract in
// server/services/outbox.ts (at most one message per key; retried with backoff while SMTP is
// down; failures recorded and shown to instructors): facts of this project, no outside source.
import net from 'node:net';
import nodemailer from 'nodemailer';
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createEnginePool, type Engine } from '../../server/jobs/engine-pool.js';
import { startQueue, type JobQueue } from '../../server/jobs/queue.js';
import { startWorkers } from '../../server/jobs/handlers.js';
import { OutboxMessage } from '../../server/models/index.js';
import type { ModewrightApp } from '../../server/app.js';
import { deliverOutboxMessage, enqueueMail, enqueueMails } from '../../server/services/outbox.js';
import { courseIdByCode, demo, setupApi, signedIn, testDatabaseUrl, type TestContext } from './helpers.js';

interface Received {
  to: string[];
  subject: string;
  messageId: string;
}

/** An SMTP server on a fixed port that can be stopped and started again; it keeps what it received. */
class Inbox {
  received: Received[] = [];
  private server: SMTPServer | null = null;
  /** Refuse this many RCPT commands (451, try later) before accepting. */
  refuseNext = 0;
  constructor(readonly port: number) {}

  start(): Promise<void> {
    const server = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      logger: false,
      onRcptTo: (_address, _session, callback) => {
        if (this.refuseNext > 0) {
          this.refuseNext -= 1;
          const err = Object.assign(new Error('Mailbox busy, try again later'), { responseCode: 451 });
          return callback(err);
        }
        callback();
      },
      onData: (stream, session, callback) => {
        simpleParser(stream)
          .then((mail) => {
            this.received.push({ to: session.envelope.rcptTo.map((r) => r.address), subject: mail.subject ?? '', messageId: mail.messageId ?? '' });
            callback();
          })
          .catch((err: Error) => callback(err));
      },
    });
    this.server = server;
    return new Promise((resolve, reject) => {
      server.once('error', reject);
      server.listen(this.port, '127.0.0.1', () => resolve());
    });
  }

  stop(): Promise<void> {
    const s = this.server;
    this.server = null;
    return new Promise((resolve) => (s ? s.close(() => resolve()) : resolve()));
  }
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

async function until<T>(what: string, probe: () => Promise<T | null | false>, timeoutMs = 25_000): Promise<T> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    const v = await probe();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

let ctx: TestContext;
let queue: JobQueue;
let engine: Engine;
let stopWorkers: () => Promise<void>;
let inbox: Inbox;
let studio: number;
let app: ModewrightApp;
const run = Date.now().toString(36);

beforeAll(async () => {
  ctx = await setupApi();
  await OutboxMessage.destroy({ where: {} });
  inbox = new Inbox(await freePort());
  const transport = nodemailer.createTransport({ host: '127.0.0.1', port: inbox.port, ignoreTLS: true, connectionTimeout: 2000 });
  queue = await startQueue({ connectionString: testDatabaseUrl(), retryDelaySeconds: 1, pollingIntervalSeconds: 0.2 });
  engine = createEnginePool();
  stopWorkers = await startWorkers({ sequelize: ctx.sequelize, queue, engine, mailTransport: transport });
  studio = await courseIdByCode('DDS-301');
  // The site's own mail (a resend) goes through the same queue and workers.
  app = ctx.makeApp({ queue, engine });
});
afterAll(async () => {
  await stopWorkers?.();
  await queue?.stop();
  await engine?.close();
  await inbox?.stop();
  await ctx?.close();
});

const deps = () => ({ queue });
const receivedFor = (subjectPart: string) => inbox.received.filter((m) => m.subject.includes(subjectPart));

describe('outbox', () => {
  it('sends one message per key, however often the key is enqueued (alone, in a batch, in a transaction)', async () => {
    await inbox.start();
    const key = `test:${run}:once`;
    const mail = { key, to: 'once@inbox.test', subject: `Once ${run}`, text: 'one message' };
    const first = await enqueueMail(deps(), null, mail);
    const second = await enqueueMail(deps(), null, { ...mail, subject: `Twice ${run}` });
    const batch = await enqueueMails(deps(), null, [mail, mail, { ...mail, key: `${key}:other`, subject: `Other ${run}` }]);
    await ctx.sequelize.transaction((t) => enqueueMail(deps(), t, mail));
    expect(first.created).toBe(true);
    expect(second).toEqual({ id: null, created: false });
    expect(batch).toHaveLength(1);
    await until('both rows sent', async () => (await OutboxMessage.count({ where: { key: [key, `${key}:other`], state: 'sent' } })) === 2);
    await new Promise((r) => setTimeout(r, 1000)); // room for any duplicate to show up
    expect(receivedFor(`Once ${run}`)).toHaveLength(1);
    expect(receivedFor(`Twice ${run}`)).toHaveLength(0);
    expect(receivedFor(`Other ${run}`)).toHaveLength(1);
    const row = await OutboxMessage.findOne({ where: { key } });
    expect(row).toMatchObject({ state: 'sent', attempts: 1, lastError: null });
    expect(row!.sentAt).toBeInstanceOf(Date);
    // A job delivered a second time (a duplicate or retried job) finds the row sent and sends nothing.
    const transport = nodemailer.createTransport({ host: '127.0.0.1', port: inbox.port, ignoreTLS: true });
    expect(await deliverOutboxMessage(transport, row!.id, { lastAttempt: false })).toBe('skipped');
    expect(receivedFor(`Once ${run}`)).toHaveLength(1);
  });

  it('sends nothing for a transaction that rolls back', async () => {
    const key = `test:${run}:rolled-back`;
    await expect(
      ctx.sequelize.transaction(async (t) => {
        await enqueueMail(deps(), t, { key, to: 'rollback@inbox.test', subject: `Rolled back ${run}`, text: 'never' });
        throw new Error('the change failed');
      }),
    ).rejects.toThrow('the change failed');
    await new Promise((r) => setTimeout(r, 800));
    expect(await OutboxMessage.count({ where: { key } })).toBe(0);
    expect(receivedFor(`Rolled back ${run}`)).toHaveLength(0);
  });

  it('with the SMTP server stopped during sending, then started, every message arrives exactly once', async () => {
    await inbox.stop();
    const keys = Array.from({ length: 6 }, (_, i) => `test:${run}:outage:${i}`);
    await enqueueMails(
      deps(),
      null,
      keys.map((key, i) => ({ key, to: `student${i}@inbox.test`, subject: `Outage ${run} #${i}`, text: `message ${i}`, courseId: studio, kind: 'test' })),
    );
    // Every message is tried and refused (connection refused), recorded, and waits for its retry.
    const waiting = await until('every message to fail once', async () => {
      const rows = await OutboxMessage.findAll({ where: { key: keys } });
      return rows.every((r) => r.attempts >= 1 && r.state === 'queued' && r.lastError) ? rows : null;
    });
    expect(waiting.map((r) => r.lastError)).toEqual(keys.map(() => expect.stringMatching(/ECONNREFUSED|ESOCKET|ECONNECTION/)));
    expect(receivedFor(`Outage ${run}`)).toHaveLength(0);

    // Instructors see the waiting messages with their error.
    const mara = await signedIn(app, demo.instructor);
    const unsent = await mara.get(`/api/courses/${studio}/outbox`).expect(200);
    expect(unsent.body.messages.filter((m: { subject: string }) => m.subject.startsWith(`Outage ${run}`))).toHaveLength(6);
    expect(unsent.body.counts.queued + unsent.body.counts.sending).toBeGreaterThanOrEqual(1);

    await inbox.start();
    const sent = await until('every message to be sent', async () => {
      const rows = await OutboxMessage.findAll({ where: { key: keys } });
      return rows.every((r) => r.state === 'sent') ? rows : null;
    }, 40_000);
    await new Promise((r) => setTimeout(r, 1500));
    const got = receivedFor(`Outage ${run}`);
    expect(got.map((m) => m.subject).sort()).toEqual(keys.map((_, i) => `Outage ${run} #${i}`).sort());
    expect(new Set(got.map((m) => m.messageId)).size).toBe(6);
    expect(sent.every((r) => r.attempts >= 2 && r.lastError === null)).toBe(true);
    expect((await mara.get(`/api/courses/${studio}/outbox`).expect(200)).body.messages.filter((m: { subject: string }) => m.subject.startsWith(`Outage ${run}`))).toEqual([]);
  });

  it('retries a temporary refusal (451) and sends once', async () => {
    inbox.refuseNext = 1;
    const key = `test:${run}:busy`;
    await enqueueMail(deps(), null, { key, to: 'busy@inbox.test', subject: `Busy ${run}`, text: 'try later' });
    const row = await until('the busy message to be sent', async () => {
      const r = await OutboxMessage.findOne({ where: { key } });
      return r?.state === 'sent' ? r : null;
    });
    expect(row.attempts).toBe(2);
    expect(receivedFor(`Busy ${run}`)).toHaveLength(1);
  });

  it('a message that failed for good is shown to the instructor, and sending it again delivers it once', async () => {
    const key = `test:${run}:failed`;
    // Delivered by hand through a transport to a closed port, as the last attempt: failed for good.
    const { id } = await enqueueMail({ queue: null, transport: nodemailer.createTransport({ host: '127.0.0.1', port: await freePort(), connectionTimeout: 1000 }) }, null, {
      key,
      to: 'failed@inbox.test',
      subject: `Failed ${run}`,
      text: 'failed once',
      courseId: studio,
      kind: 'test',
    });
    const row = await OutboxMessage.findByPk(id!);
    expect(row).toMatchObject({ state: 'failed', attempts: 1 });
    expect(row!.lastError).toMatch(/ECONNREFUSED|ESOCKET|ECONNECTION/);

    const mara = await signedIn(app, demo.instructor);
    const failed = await mara.get(`/api/courses/${studio}/outbox?state=failed`).expect(200);
    expect(failed.body.messages).toEqual([expect.objectContaining({ id, to: 'failed@inbox.test', state: 'failed', kind: 'test', lastError: row!.lastError })]);
    expect(failed.body.counts.failed).toBe(1);

    const tomasz = await signedIn(app, demo.assistant);
    expect((await tomasz.post(`/api/courses/${studio}/outbox/${id}/retry`)).status).toBe(403);
    const again = await mara.post(`/api/courses/${studio}/outbox/${id}/retry`).expect(200);
    expect(again.body.state).toBe('queued');
    await until('the resent message to be sent', async () => (await OutboxMessage.findByPk(id!))?.state === 'sent');
    expect(receivedFor(`Failed ${run}`)).toHaveLength(1);
    const twice = await mara.post(`/api/courses/${studio}/outbox/${id}/retry`);
    expect(twice.status).toBe(409);
    const log = await mara.get(`/api/courses/${studio}/audit?action=mail.resent`).expect(200);
    expect(log.body.events).toEqual([expect.objectContaining({ subjectId: String(id), before: expect.objectContaining({ state: 'failed' }), after: expect.objectContaining({ state: 'queued' }) })]);
  });
});
