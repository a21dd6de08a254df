/**
 * Assignments end to end through the API, the real PostgreSQL test database,
 * the pg-boss queue and the engine worker pool: authoring, validation, uploads,
 * publishing, variants (also for late joiners), reference jobs with retry,
 * separation, downloads checked against NumPy, and every refusal.
 */
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AssignmentConfigInput, AssignmentDetail, DatasetDetail, PreviewResponse, ReferenceProgress, ReferenceResponse, VariantMetadata } from '../../shared/assignment.js';
import { createEnginePool, type Engine } from '../../server/jobs/engine-pool.js';
import { startQueue, type JobQueue } from '../../server/jobs/queue.js';
import { startWorkers } from '../../server/jobs/handlers.js';
import { ReferenceSpectrum, Variant } from '../../server/models/index.js';
import type { ModewrightApp } from '../../server/app.js';
import { courseIdByCode, createOutsider, demo, setupApi, signedIn, testDatabaseUrl, userIdByEmail, type Client, type TestContext } from './helpers.js';

let ctx: TestContext;
let app: ModewrightApp;
let queue: JobQueue;
let engine: Engine;
let stopWorkers: () => Promise<void>;
/** Reference jobs throw this many times before they run (the retry test). */
let failNext = 0;
let courseId: number;
let otherCourseId: number;
let mara: Client;
let tomasz: Client;
let priya: Client;
let mateo: Client;
let jonas: Client;

beforeAll(async () => {
  ctx = await setupApi();
  queue = await startQueue({ connectionString: testDatabaseUrl(), retryLimit: 2, retryDelaySeconds: 1, pollingIntervalSeconds: 0.5 });
  const real = createEnginePool(1);
  engine = {
    async reference(...args) {
      if (failNext > 0) {
        failNext--;
        throw new Error('simulated crash of the engine worker');
      }
      return real.reference(...args);
    },
    materialize: (...args) => real.materialize(...args),
    close: () => real.close(),
  };
  stopWorkers = await startWorkers({ sequelize: ctx.sequelize, queue, engine });
  app = ctx.makeApp({ queue, engine });
  courseId = await courseIdByCode('DDS-301');
  otherCourseId = await courseIdByCode('KMW-210');
  [mara, tomasz, priya, mateo, jonas] = await Promise.all([demo.instructor, demo.assistant, demo.student, demo.student2, demo.otherInstructor].map((e) => signedIn(app, e)));
}, 120_000);

afterAll(async () => {
  await stopWorkers?.();
  await queue?.stop();
  await engine?.close();
  await ctx?.close();
});

const base = () => `/api/courses/${courseId}`;

async function scenarioDataset(body: object): Promise<DatasetDetail> {
  const res = await mara.post(`${base()}/datasets/scenario`, body).expect(201);
  return res.body as DatasetDetail;
}

function dmdConfig(datasetId: number, extra: Partial<AssignmentConfigInput> = {}): AssignmentConfigInput {
  return {
    title: 'Exact DMD of the sensor array',
    statement: 'Compute $\\lambda_j$ of $\\tilde A$.',
    dueAt: new Date(Date.now() + 7 * 86_400_000).toISOString(),
    timeZone: 'Europe/Oslo',
    datasetId,
    variants: { mode: 'per-student', noise: 0.001, jitter: 0.02 },
    method: { method: 'dmd', rankRule: { kind: 'rank', rank: 7 } },
    order: 'magnitude',
    domain: 'discrete',
    parts: [{ name: 'eigenvalues', kind: 'eigenvalues', weight: 10 }],
    ...extra,
  };
}

/** Wait until every student reference of the assignment's current version is ready or failed. */
async function settled(assignmentId: number, timeoutMs = 90_000): Promise<ReferenceProgress> {
  const t0 = Date.now();
  for (;;) {
    const p = (await mara.get(`${base()}/assignments/${assignmentId}/progress`).expect(200)).body as ReferenceProgress;
    if (p.total > 0 && p.ready + p.failed === p.total) return p;
    if (Date.now() - t0 > timeoutMs) throw new Error(`references not settled: ${JSON.stringify(p)}`);
    await new Promise((r) => setTimeout(r, 300));
  }
}

async function progressOf(assignmentId: number): Promise<ReferenceProgress> {
  return (await mara.get(`${base()}/assignments/${assignmentId}/progress`).expect(200)).body as ReferenceProgress;
}

async function previewReady(assignmentId: number, timeoutMs = 60_000): Promise<PreviewResponse> {
  const t0 = Date.now();
  for (;;) {
    const p = (await mara.get(`${base()}/assignments/${assignmentId}/preview`).expect(200)).body as PreviewResponse;
    if (p.reference && (p.reference.status === 'ready' || p.reference.status === 'failed')) return p;
    if (Date.now() - t0 > timeoutMs) throw new Error('preview reference not ready');
    await new Promise((r) => setTimeout(r, 300));
  }
}

describe('datasets', () => {
  it('generates a scenario dataset with shape, dt and a preview picture', async () => {
    const d = await scenarioDataset({ name: 'Sensors', scenario: 'linear-field', seed: 3 });
    expect(d).toMatchObject({ source: 'scenario', n: 24, snapshots: 120, pairs: false, dt: 0.05, layout: 'columns' });
    expect(d.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(d.preview.kind).toBe('heatmap');
    expect(d.preview.values.length).toBe(d.preview.states.length);
  });

  it('stores an uploaded CSV after the engine read it, with a located error for a malformed one', async () => {
    const rows = Array.from({ length: 3 }, (_, i) => Array.from({ length: 6 }, (_, t) => Math.cos(0.3 * t + i).toFixed(6)).join(','));
    const ok = await mara.agent.post(`${base()}/datasets`).set('x-csrf-token', mara.csrf).field('name', 'Three sensors').field('dt', '0.1').attach('file', Buffer.from(rows.join('\n')), 'three.csv').expect(201);
    expect(ok.body).toMatchObject({ n: 3, snapshots: 6, format: 'csv', dt: 0.1, source: 'upload' });

    const bad = rows.slice();
    bad[1] = bad[1].replace(/,[^,]+,/, ',abc,');
    const res = await mara.agent.post(`${base()}/datasets`).set('x-csrf-token', mara.csrf).field('name', 'Broken').attach('file', Buffer.from(bad.join('\n')), 'broken.csv').expect(400);
    const details = res.body.error.details as { path: string; message: string }[];
    expect(details[0].path).toBe('file');
    expect(details[0].message).toMatch(/^broken\.csv:2:\d+: /);
    const list = await mara.get(`${base()}/datasets`).expect(200);
    expect(list.body.datasets.map((d: { name: string }) => d.name)).not.toContain('Broken');
    expect(list.body.maxUploadBytes).toBe(64 * 1024 * 1024);
  });

  it('answers 413 to an upload declared larger than the limit without reading its body', async () => {
    const server = app.listen(0, '127.0.0.1');
    await new Promise((r) => server.once('listening', r));
    const port = (server.address() as AddressInfo).port;
    const cookie = (mara.agent as unknown as { jar: { getCookies(o: object): { toValueString(): string }[] } }).jar
      .getCookies({ domain: '127.0.0.1', path: '/', secure: false, script: false })
      .map((c) => c.toValueString())
      .join('; ');
    const declared = 200 * 1024 * 1024;
    let sent = 0;
    const status = await new Promise<number>((resolve, reject) => {
      const req = http.request(
        { host: '127.0.0.1', port, method: 'POST', path: `${base()}/datasets`, headers: { 'content-type': 'multipart/form-data; boundary=x', 'content-length': declared, cookie, 'x-csrf-token': mara.csrf } },
        (res) => resolve(res.statusCode ?? 0),
      );
      req.on('error', (e) => (sent > 0 ? undefined : reject(e)));
      const chunk = Buffer.alloc(64 * 1024, 97);
      // Send only 1 MB of the declared 200 MB: the answer must come anyway.
      for (let i = 0; i < 16; i++) {
        req.write(chunk);
        sent += chunk.length;
      }
    });
    server.close();
    expect(status).toBe(413);
    expect(sent).toBeLessThan(declared / 100);
  });

  it('refuses uploads from teaching assistants and members of other courses', async () => {
    await tomasz.post(`${base()}/datasets/scenario`, { name: 'x', scenario: 'drift-map' }).expect(403);
    await priya.get(`${base()}/datasets`).expect(403);
    await jonas.get(`${base()}/datasets`).expect(403);
  });
});

describe('authoring and publishing', () => {
  let datasetId: number;
  let assignmentId: number;

  beforeAll(async () => {
    datasetId = (await scenarioDataset({ name: 'Sensor array', scenario: 'linear-field', seed: 11 })).id;
  });

  it('names each invalid field by its path', async () => {
    const res = await mara.post(`${base()}/assignments`, { ...dmdConfig(datasetId), title: 'x', method: { method: 'dmd', rankRule: { kind: 'rank', rank: 0 } }, attempts: 0 }).expect(400);
    const paths = (res.body.error.details as { path: string }[]).map((d) => d.path);
    expect(paths).toEqual(expect.arrayContaining(['title', 'method.rankRule.rank', 'attempts']));
    const tooHigh = await mara.post(`${base()}/assignments`, dmdConfig(datasetId, { method: { method: 'dmd', rankRule: { kind: 'rank', rank: 30 } } })).expect(400);
    expect(tooHigh.body.error.details[0]).toMatchObject({ path: 'method.rankRule.rank', message: expect.stringContaining('at most 24') });
    const foreign = await mara.post(`${base()}/assignments`, dmdConfig(999999)).expect(400);
    expect(foreign.body.error.details[0].path).toBe('datasetId');
  });

  it('creates a draft that students cannot see and assistants can read but not publish', async () => {
    const res = await mara.post(`${base()}/assignments`, dmdConfig(datasetId)).expect(201);
    const a = res.body as AssignmentDetail;
    assignmentId = a.id;
    expect(a).toMatchObject({ status: 'draft', version: 1, task: { method: 'dmd', rank: 7, order: 'magnitude', domain: 'discrete' } });
    expect(a.task.cli).toBe('--method dmd --rank 7 --dt 0.05 --order magnitude');
    const studentList = await priya.get(`${base()}/assignments`).expect(200);
    expect(studentList.body.assignments.map((x: { id: number }) => x.id)).not.toContain(assignmentId);
    await priya.get(`${base()}/assignments/${assignmentId}`).expect(404);
    await tomasz.get(`${base()}/assignments/${assignmentId}`).expect(200);
    await tomasz.post(`${base()}/assignments/${assignmentId}/publish`).expect(403);
    await tomasz.agent.put(`${base()}/assignments/${assignmentId}`).set('x-csrf-token', tomasz.csrf).send(dmdConfig(datasetId)).expect(403);
  });

  it('computes the preview reference of the dataset as given before publishing', async () => {
    const p = await previewReady(assignmentId);
    expect(p.reference!.status).toBe('ready');
    expect(p.reference!.reference!.eigenvalues).toHaveLength(7);
    expect(p.reference!.singularValues!.length).toBeGreaterThanOrEqual(7);
  });

  it('publishes: a variant and a reference per student, computed by jobs, with a progress count', async () => {
    const res = await mara.post(`${base()}/assignments/${assignmentId}/publish`).expect(202);
    expect(res.body.status).toBe('published');
    const p = await settled(assignmentId);
    expect(p).toMatchObject({ total: 12, ready: 12, failed: 0 });
    const variants = await Variant.findAll({ where: { assignmentId } });
    const seeds = new Set(variants.filter((v) => v.userId !== null).map((v) => v.seed));
    expect(seeds.size).toBe(12);
    expect(variants.every((v) => v.checksum && /^[0-9a-f]{64}$/.test(v.checksum))).toBe(true);
    const list = await priya.get(`${base()}/assignments`).expect(200);
    expect(list.body.assignments[0]).toMatchObject({ id: assignmentId, title: 'Exact DMD of the sensor array', status: 'published' });
  });

  it('a student downloads only their own variant; NumPy computes the stored reference from it', async () => {
    const meta = (await priya.get(`${base()}/assignments/${assignmentId}/dataset?format=json`).expect(200)).body as VariantMetadata;
    expect(meta).toMatchObject({ assignmentId, shape: [24, 120], layout: 'columns', pairs: false, dt: 0.05 });
    const npy = await priya.get(`${base()}/assignments/${assignmentId}/dataset?format=npy`).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    }).expect(200);
    const csv = await priya.get(`${base()}/assignments/${assignmentId}/dataset?format=csv`).expect(200);
    expect(csv.text.split('\n').filter(Boolean)).toHaveLength(24);
    await priya.get(`${base()}/assignments/${assignmentId}/dataset?format=npy&student=${await userIdByEmail(demo.student2)}`).expect(403);
    await priya.get(`${base()}/assignments/${assignmentId}/reference?student=${await userIdByEmail(demo.student)}`).expect(403);

    const priyaId = await userIdByEmail(demo.student);
    const ref = (await tomasz.get(`${base()}/assignments/${assignmentId}/reference?student=${priyaId}`).expect(200)).body as ReferenceResponse;
    expect(ref.status).toBe('ready');
    // Reference library: NumPy transcription of exact DMD (tests/oracle/spectra_oracle.py) on the downloaded bytes.
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'mw-variant-'));
    fs.writeFileSync(path.join(dir, 'd.npy'), npy.body as Buffer);
    fs.writeFileSync(path.join(dir, 'job.json'), JSON.stringify({ method: 'dmd', trajectory: 'd.npy', rank: 7 }));
    const r = spawnSync('python3', [path.join('tests', 'oracle', 'spectra_oracle.py'), dir], { encoding: 'utf8' });
    fs.rmSync(dir, { recursive: true, force: true });
    expect(r.status, r.stderr).toBe(0);
    const numpy = (JSON.parse(r.stdout) as { eigenvalues: [number, number][] }).eigenvalues;
    const ours = ref.reference!.eigenvalues;
    expect(ours).toHaveLength(numpy.length);
    for (const [re, im] of numpy) {
      const nearest = Math.min(...ours.map((e) => Math.hypot(e.re - re, e.im - im)));
      expect(nearest).toBeLessThan(1e-8 * Math.max(1, Math.hypot(re, im)));
    }
    // Two students' variants differ.
    const other = (await tomasz.get(`${base()}/assignments/${assignmentId}/reference?student=${await userIdByEmail(demo.student2)}`).expect(200)).body as ReferenceResponse;
    expect(other.reference!.hash).not.toBe(ref.reference!.hash);
  });

  it('an edit after publishing makes a new version; a reference-altering one recomputes as jobs', async () => {
    const statementOnly = await mara.agent.put(`${base()}/assignments/${assignmentId}`).set('x-csrf-token', mara.csrf).send(dmdConfig(datasetId, { statement: 'Reworded.' })).expect(200);
    expect(statementOnly.body.version).toBe(2);
    expect(statementOnly.body.versions.map((v: { altersReferences: boolean }) => v.altersReferences)).toEqual([true, false]);
    expect((await settled(assignmentId)).ready).toBe(12);
    const before = await ReferenceSpectrum.count();
    const rank5 = await mara.agent.put(`${base()}/assignments/${assignmentId}`).set('x-csrf-token', mara.csrf).send(dmdConfig(datasetId, { method: { method: 'dmd', rankRule: { kind: 'rank', rank: 5 } } })).expect(200);
    expect(rank5.body.version).toBe(3);
    const p = await settled(assignmentId);
    expect(p).toMatchObject({ total: 12, ready: 12 });
    expect(await ReferenceSpectrum.count()).toBe(before + 13);
    const ref = (await tomasz.get(`${base()}/assignments/${assignmentId}/reference?student=${await userIdByEmail(demo.student)}`).expect(200)).body as ReferenceResponse;
    expect(ref.reference!.rank).toBe(5);
  });

  it('a student who joins later gets a variant and a reference through a job', async () => {
    const email = await createOutsider('late-joiner');
    const late = await signedIn(app, email);
    await late.post('/api/courses/join', { code: 'ORBIT-4821' }).expect(201);
    const userId = await userIdByEmail(email);
    const t0 = Date.now();
    let row: ReferenceSpectrum | null = null;
    while (Date.now() - t0 < 60_000) {
      const v = await Variant.findOne({ where: { assignmentId, userId } });
      row = v ? await ReferenceSpectrum.findOne({ where: { variantId: v.id, status: 'ready' } }) : null;
      if (row) break;
      await new Promise((r) => setTimeout(r, 300));
    }
    expect(row).not.toBeNull();
    const detail = (await late.get(`${base()}/assignments/${assignmentId}`).expect(200)).body as AssignmentDetail;
    expect(detail.variant).toMatchObject({ checksum: expect.stringMatching(/^[0-9a-f]{64}$/) });
    expect(detail.task.rank).toBe(5);
    // Nothing of any reference reaches a student.
    expect(detail).not.toHaveProperty('config');
    expect(JSON.stringify(detail)).not.toMatch(/"condition"|"reference"|"hash"|"re":/);
  });

  it('refuses other courses everywhere, and assistants cannot publish or close', async () => {
    const paths = ['', '/progress', '/preview', '/variants', '/reference', '/dataset?format=json'];
    for (const p of paths) await jonas.get(`${base()}/assignments/${assignmentId}${p}`).expect(403);
    await jonas.get(`${base()}/assignments`).expect(403);
    await jonas.post(`${base()}/assignments/${assignmentId}/publish`).expect(403);
    await tomasz.post(`${base()}/assignments/${assignmentId}/close`).expect(403);
    await mateo.post(`${base()}/assignments/${assignmentId}/close`).expect(403);
    await jonas.get(`/api/courses/${otherCourseId}/assignments`).expect(200);
  });
});

describe('reference jobs', () => {
  it('a job that throws stores its message, is retried, and succeeds exactly once', async () => {
    const d = await scenarioDataset({ name: 'Drift pairs', scenario: 'drift-map', seed: 4 });
    failNext = 1;
    const res = await mara
      .post(`${base()}/assignments`, dmdConfig(d.id, { title: 'Kernel EDMD on the drift map', variants: { mode: 'same' }, method: { method: 'kernel-edmd', kernel: 'polynomial', degree: 3, rankRule: { kind: 'rank', rank: 10 } }, top: 5 }))
      .expect(201);
    const p = await previewReady(res.body.id);
    expect(p.reference!.status).toBe('ready');
    const v = await Variant.findOne({ where: { assignmentId: res.body.id, userId: null } });
    const row = await ReferenceSpectrum.findOne({ where: { variantId: v!.id } });
    expect(row!.attempts).toBe(2);
    expect(row!.message).toBe('simulated crash of the engine worker');
    expect(await ReferenceSpectrum.count({ where: { variantId: v!.id } })).toBe(1);
  });

  it('after the retries are spent the failure is shown with its message, and a retry computes it', async () => {
    const d = await scenarioDataset({ name: 'Waves', scenario: 'wave-field', seed: 2 });
    const res = await mara.post(`${base()}/assignments`, dmdConfig(d.id, { title: 'Waves', method: { method: 'dmd', rankRule: { kind: 'rank', rank: 4 } } })).expect(201);
    const id = res.body.id as number;
    await previewReady(id);
    failNext = 100;
    try {
      await mara.post(`${base()}/assignments/${id}/publish`).expect(202);
      const p = await settled(id);
      expect(p.failed).toBe(p.total);
      // Each was tried again before it was given up (retry limit 2 here), and the message is kept.
      for (const f of p.failures) {
        expect(f.message).toBe('simulated crash of the engine worker');
        expect(f.attempts).toBeGreaterThanOrEqual(2);
      }
    } finally {
      failNext = 0;
    }
    const p = await progressOf(id);
    await mara.post(`${base()}/assignments/${id}/references/retry`).expect(202);
    const again = await settled(id);
    expect(again).toMatchObject({ ready: p.total, failed: 0 });
  });

  it('warns when per-student variants cannot be told apart (small noise, no jitter)', async () => {
    const d = await scenarioDataset({ name: 'Sensors, clean', scenario: 'linear-field', seed: 8 });
    const res = await mara.post(`${base()}/assignments`, dmdConfig(d.id, { title: 'Identical variants', variants: { mode: 'per-student', noise: 0.001, jitter: 0 } })).expect(201);
    await mara.post(`${base()}/assignments/${res.body.id}/publish`).expect(202);
    await settled(res.body.id);
    const p = (await mara.get(`${base()}/assignments/${res.body.id}/preview`).expect(200)).body as PreviewResponse;
    expect(p.separation!.smallest, JSON.stringify(p)).toBeLessThan(3);
    expect(p.warnings.map((w) => w.code)).toContain('separation');

    const apart = await mara.post(`${base()}/assignments`, dmdConfig(d.id, { title: 'Jittered variants', variants: { mode: 'per-student', noise: 0.001, jitter: 0.15 } })).expect(201);
    await mara.post(`${base()}/assignments/${apart.body.id}/publish`).expect(202);
    await settled(apart.body.id);
    const q = (await mara.get(`${base()}/assignments/${apart.body.id}/preview`).expect(200)).body as PreviewResponse;
    expect(q.separation!.smallest).toBeGreaterThan(10 * p.separation!.smallest!);
  });
});

describe('list routes', () => {
  it('run a fixed number of queries whatever the number of assignments (no N+1)', async () => {
    // The workers share this Sequelize instance: count only once they are idle.
    const idle = async () => {
      while ((await ReferenceSpectrum.count({ where: { status: ['queued', 'running'] } })) > 0) await new Promise((r) => setTimeout(r, 200));
      await new Promise((r) => setTimeout(r, 300));
    };
    const count = async (client: Client) => {
      await idle();
      let n = 0;
      // Sequelize reads options.logging for every query (not in its public typings).
      const options = (ctx.sequelize as unknown as { options: { logging: unknown } }).options;
      const before = options.logging;
      options.logging = () => {
        n++;
      };
      try {
        await client.get(`${base()}/assignments`).expect(200);
      } finally {
        options.logging = before;
      }
      return n;
    };
    const staffBefore = await count(mara);
    const studentBefore = await count(priya);
    const d = await scenarioDataset({ name: 'More', scenario: 'linear-field', seed: 9 });
    for (let i = 0; i < 3; i++) await mara.post(`${base()}/assignments`, dmdConfig(d.id, { title: `Extra ${i}` })).expect(201);
    expect(await count(mara)).toBe(staffBefore);
    expect(await count(priya)).toBe(studentBefore);
  });
});
