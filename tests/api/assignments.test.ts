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

describe('EDMD with Gaussian radial functions', () => {
  let datasetId: number;
  let assignmentId: number;
  const radial = { method: 'edmd', dictionary: 'radial', sigma: 0.5, centres: { kind: 'every', step: 20 } } as const;
  const radialConfig = (extra: Partial<AssignmentConfigInput> = {}) =>
    dmdConfig(datasetId, { title: 'Radial functions on the drift map', statement: 'EDMD with Gaussian radial functions.', variants: { mode: 'per-student', noise: 0.001, jitter: 0.02 }, method: radial, ...extra });
  const download = async (client: Client, id: number, query: string) =>
    (
      await client
        .get(`${base()}/assignments/${id}/dataset?${query}`)
        .buffer(true)
        .parse((res, cb) => {
          const chunks: Buffer[] = [];
          res.on('data', (c: Buffer) => chunks.push(c));
          res.on('end', () => cb(null, Buffer.concat(chunks)));
        })
        .expect(200)
    ).body as Buffer;

  beforeAll(async () => {
    // 400 one-step pairs of a planar map, X and Y given explicitly.
    datasetId = (await scenarioDataset({ name: 'Drift pairs for radial functions', scenario: 'drift-map', seed: 21 })).id;
  });

  it('refuses a radial dictionary without σ or centres, centres past the end of X, and more centres than the engine allows, naming each field', async () => {
    const missing = await mara.post(`${base()}/assignments`, radialConfig({ method: { method: 'edmd', dictionary: 'radial' } })).expect(400);
    expect((missing.body.error.details as { path: string }[]).map((d) => d.path).sort()).toEqual(['method.centres', 'method.sigma']);
    const past = await mara.post(`${base()}/assignments`, radialConfig({ method: { ...radial, centres: { kind: 'indices', indices: [0, 399, 400, 512] } } })).expect(400);
    expect(past.body.error.details).toEqual([{ path: 'method.centres.indices', message: 'X has 400 snapshots (0-based columns 0 … 399): 400, 512 are past the end' }]);
    const twice = await mara.post(`${base()}/assignments`, radialConfig({ method: { ...radial, centres: { kind: 'indices', indices: [3, 3] } } })).expect(400);
    expect(twice.body.error.details[0]).toMatchObject({ path: 'method.centres.indices', message: expect.stringContaining('Snapshot 3 is listed twice') });
    const big = await scenarioDataset({ name: 'Many drift pairs', scenario: 'drift-map', seed: 22, samples: 4500 });
    const tooMany = await mara.post(`${base()}/assignments`, radialConfig({ datasetId: big.id, method: { ...radial, centres: { kind: 'every', step: 2 } } })).expect(400);
    expect(tooMany.body.error.details).toEqual([
      {
        path: 'method.centres.step',
        message: "A step of 2 over the 4500 snapshots of X makes 2250 centres; at most 1999, as the dictionary may have at most 2000 functions with the constant (the engine's limit). Take a step of at least 3.",
      },
    ]);
  });

  it('the preview reference takes its centres from the dataset as given and says which they are', async () => {
    const res = await mara.post(`${base()}/assignments`, radialConfig()).expect(201);
    assignmentId = res.body.id;
    const a = res.body as AssignmentDetail;
    expect(a.task).toMatchObject({ method: 'edmd', dictionary: 'radial', sigma: 0.5, centres: { kind: 'every', step: 20 } });
    expect(a.task.centres!.indices).toEqual(Array.from({ length: 20 }, (_, i) => 20 * i));
    expect(a.task.cli).toBe('--method edmd --dictionary radial --sigma 0.5 --centres-every 20 --dt 1 --order magnitude');
    const p = await previewReady(assignmentId);
    expect(p.reference!.status, p.reference!.message ?? '').toBe('ready');
    const ref = p.reference!.reference!;
    expect(ref).toMatchObject({ method: 'edmd', rank: 21, dictionaryRank: 21, n: 2, m: 400 });
    expect(ref.options).toMatchObject({ dictionary: { kind: 'gaussian-radial', sigma: 0.5, centres: 20 }, centres: { of: 'X', indexBase: 0, rule: { kind: 'every', step: 20 }, indices: a.task.centres!.indices } });
    expect(p.warnings.map((w) => w.code)).not.toContain('dictionary-rank-deficient');
    expect(p.reference!.classification!.filter((c) => c.state === 'graded').length).toBeGreaterThan(0);
    expect(p.reference!.modes!.length).toBeGreaterThan(0);
  });

  it('published: every student’s reference uses centres from her own variant, and a NumPy least-squares hand-in from her download gets full points', async () => {
    await mara.post(`${base()}/assignments/${assignmentId}/publish`).expect(202);
    // Every student of the course (the twelve of the demo, and the late joiner when the whole file runs).
    const p = await settled(assignmentId);
    expect(p.total).toBeGreaterThanOrEqual(12);
    expect(p).toMatchObject({ ready: p.total, failed: 0 });
    const priyaId = await userIdByEmail(demo.student);
    const mine = (await tomasz.get(`${base()}/assignments/${assignmentId}/reference?student=${priyaId}`).expect(200)).body as ReferenceResponse;
    const other = (await tomasz.get(`${base()}/assignments/${assignmentId}/reference?student=${await userIdByEmail(demo.student2)}`).expect(200)).body as ReferenceResponse;
    expect(mine.reference!.hash).not.toBe(other.reference!.hash);

    // The student reads the task (words and JSON) and downloads her own X and Y.
    const detail = (await priya.get(`${base()}/assignments/${assignmentId}`).expect(200)).body as AssignmentDetail;
    expect(detail.task).toMatchObject({ dictionary: 'radial', sigma: 0.5, rank: 21 });
    expect(detail.task.centres!.description).toBe('every 20th snapshot of X from the first (0-based columns 0, 20, 40, …; 20 centres)');
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'mw-radial-'));
    fs.writeFileSync(path.join(dir, 'x.npy'), await download(priya, assignmentId, 'format=npy'));
    fs.writeFileSync(path.join(dir, 'y.npy'), await download(priya, assignmentId, 'format=npy&part=y'));
    // Reference library: NumPy. EDMD as least squares (Williams, Kevrekidis & Rowley 2015, J. Nonlinear Sci.
    // 25:1307–1346): Ψ_X K ≈ Ψ_Y by numpy.linalg.lstsq, eigenvalues by numpy.linalg.eigvals, printed by numpy's print();
    // σ and the centre columns are read from the task JSON the student sees.
    const script = [
      'import sys, json, numpy as np',
      'x, y = np.load(sys.argv[1]), np.load(sys.argv[2])',
      'task = json.loads(sys.argv[3])',
      'c, s = x[:, task["centres"]["indices"]], task["sigma"]',
      'def psi(z):',
      '    d2 = ((z[:, :, None] - c[:, None, :]) ** 2).sum(axis=0)',
      '    return np.hstack([np.ones((z.shape[1], 1)), np.exp(-d2 / (2 * s * s))])',
      'k = np.linalg.lstsq(psi(x), psi(y), rcond=None)[0]',
      'np.set_printoptions(precision=17)',
      'print(np.linalg.eigvals(k))',
    ].join('\n');
    const r = spawnSync('python3', ['-c', script, path.join(dir, 'x.npy'), path.join(dir, 'y.npy'), JSON.stringify(detail.task)], { encoding: 'utf8' });
    fs.rmSync(dir, { recursive: true, force: true });
    expect(r.status, r.stderr).toBe(0);
    const sub = await priya.agent.post(`${base()}/assignments/${assignmentId}/submissions`).set('x-csrf-token', priya.csrf).attach('file', Buffer.from(r.stdout), 'eigvals.txt').expect(202);
    const t0 = Date.now();
    let row: { status: string; points: number | null; maxPoints: number; values?: { status: string }[] } | undefined;
    while (Date.now() - t0 < 60_000) {
      const list = (await priya.get(`${base()}/assignments/${assignmentId}/submissions/mine`).expect(200)).body as { submissions: (typeof row & { id: number })[] };
      row = list.submissions.find((x) => x!.id === sub.body.submission.id);
      if (row && (row.status === 'scored' || row.status === 'failed')) break;
      await new Promise((res) => setTimeout(res, 300));
    }
    expect(row).toMatchObject({ status: 'scored', points: 10, maxPoints: 10 });
    expect(row!.values!.filter((v) => v.status === 'matched').length).toBeGreaterThan(0);
    expect(row!.values!.every((v) => v.status === 'matched' || v.status === 'not-graded')).toBe(true);
  });

  it('σ and the centre rule alter the references; the statement alone does not', async () => {
    const put = (config: AssignmentConfigInput) => mara.agent.put(`${base()}/assignments/${assignmentId}`).set('x-csrf-token', mara.csrf).send(config).expect(200);
    await put(radialConfig({ statement: 'Reworded.' }));
    await put(radialConfig({ statement: 'Reworded.', method: { ...radial, sigma: 0.6 } }));
    const last = await put(radialConfig({ statement: 'Reworded.', method: { ...radial, sigma: 0.6, centres: { kind: 'indices', indices: [5, 50, 150, 250, 350] } } }));
    expect(last.body.versions.map((v: { altersReferences: boolean }) => v.altersReferences)).toEqual([true, false, true, true]);
    const p = await settled(assignmentId);
    expect(p).toMatchObject({ ready: p.total, failed: 0 });
    const ref = (await tomasz.get(`${base()}/assignments/${assignmentId}/reference?student=${await userIdByEmail(demo.student)}`).expect(200)).body as ReferenceResponse;
    expect(ref.version).toBe(4);
    expect(ref.reference!.rank).toBe(6);
    expect(ref.reference!.options).toMatchObject({ dictionary: { sigma: 0.6, centres: 5 }, centres: { indices: [5, 50, 150, 250, 350] } });
    const detail = (await priya.get(`${base()}/assignments/${assignmentId}`).expect(200)).body as AssignmentDetail;
    expect(detail.task.cli).toBe('--method edmd --dictionary radial --sigma 0.6 --centres-at 5,50,150,250,350 --dt 1 --order magnitude');
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
    const extra: number[] = [];
    for (let i = 0; i < 3; i++) extra.push((await mara.post(`${base()}/assignments`, dmdConfig(d.id, { title: `Extra ${i}` })).expect(201)).body.id);
    expect(await count(mara)).toBe(staffBefore);
    expect(await count(priya)).toBe(studentBefore);
    // Students see published ones with their own standing (due date, attempts left, latest attempt): still no N+1.
    await mara.post(`${base()}/assignments/${extra[0]}/publish`).expect(202);
    const studentOne = await count(priya);
    for (const id of extra.slice(1)) await mara.post(`${base()}/assignments/${id}/publish`).expect(202);
    expect(await count(priya)).toBe(studentOne);
    const mine = (await priya.get(`${base()}/assignments`).expect(200)).body.assignments.find((a: { id: number }) => a.id === extra[2]);
    expect(mine.mine).toMatchObject({ latest: null, released: false, attemptsLeft: 3 });
    expect(Date.parse(mine.mine.cutoffAt) - Date.parse(mine.mine.dueAt)).toBe(3 * 86_400_000); // the late policy's default cut-off
    expect(mine.progress).toBeUndefined();
    expect((await mara.get(`${base()}/assignments`).expect(200)).body.assignments[0].mine).toBeUndefined();
  });
});
