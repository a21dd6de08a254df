/**
 * The engine off the event loop: a piscina pool of worker threads running
 * engine-worker.ts. Sizing rule: each engine call may use two threads of its
 * own (the TypeScript kernels split products with one helper thread; the
 * OpenBLAS backend gets max(1, ⌊(cores − 1) / workers⌋) threads, see
 * blasThreadsPerWorker), so the pool has
 * max(1, floor(cores / 2)) workers and engine threads never outnumber the
 * cores. MODEWRIGHT_ENGINE_WORKERS overrides the size.
 */
import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import { pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import type { ComputedReference, StoredDataset, TaskRun, VariantRecipe } from '../../grading/assignment.js';
import type { EngineFailure, EngineTask } from './engine-worker.js';

export interface ReferenceOutput extends ComputedReference {
  checksum: string;
  parameters: Record<string, number>;
}

export interface MaterializedOutput {
  checksum: string;
  npyX: Uint8Array;
  npyY: Uint8Array | null;
  csvX: string | null;
  csvY: string | null;
  shape: [number, number];
  parameters: Record<string, number>;
  dt: number | null;
}

/** What the jobs and routes need of the engine; tests substitute a failing one. */
export interface Engine {
  reference(dataset: StoredDataset, recipe: VariantRecipe, task: TaskRun, meta: Record<string, unknown>): Promise<ReferenceOutput>;
  materialize(dataset: StoredDataset, recipe: VariantRecipe, csv: boolean): Promise<MaterializedOutput>;
  /** Start every worker thread and load the engine in it (optional; the first job does it otherwise). */
  warmUp?(): Promise<void>;
  close(): Promise<void>;
}

/** A problem of the data or task that no retry changes (a refused rank, a malformed file). */
export class EngineInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'EngineInputError';
  }
}

/**
 * OpenBLAS threads per engine worker in a job process: the cores left after one for the process's own
 * work (queue, database, JSON) shared among the workers, at least 1. Measured on 2 cores: a reference job
 * ran 1.5× slower with 2 BLAS threads than with 1, because the threads spin against the main thread and
 * PostgreSQL. MODEWRIGHT_BLAS_THREADS overrides it.
 */
export function blasThreadsPerWorker(workers: number, cores = availableParallelism()): number {
  const forced = Number(process.env.MODEWRIGHT_BLAS_THREADS);
  if (Number.isInteger(forced) && forced > 0) return forced;
  return Math.max(1, Math.floor((cores - 1) / Math.max(1, workers)));
}

export function engineWorkerCount(): number {
  const forced = Number(process.env.MODEWRIGHT_ENGINE_WORKERS);
  if (Number.isInteger(forced) && forced > 0) return forced;
  return Math.max(1, Math.floor(availableParallelism() / 2));
}

function loaderArgs(): string[] {
  const argv = process.execArgv.slice();
  if (argv.some((a) => a.includes('tsx'))) return argv;
  const req = createRequire(import.meta.url);
  return [...argv, '--import', pathToFileURL(req.resolve('tsx')).href];
}

function unwrap<T>(out: unknown): T {
  const f = out as EngineFailure;
  if (f && f.failed) throw f.permanent ? new EngineInputError(f.message) : new Error(f.message);
  return out as T;
}

export function createEnginePool(size = engineWorkerCount()): Engine {
  const pool = new Piscina<EngineTask, unknown>({
    filename: new URL('./engine-worker.ts', import.meta.url).href,
    minThreads: size,
    maxThreads: size,
    idleTimeout: 60_000,
    execArgv: loaderArgs(),
    // The OpenBLAS backend sizes its threads by the number of engine workers (grading/linalg/openblas.ts).
    env: { ...process.env, MODEWRIGHT_ENGINE_WORKERS: String(size), MODEWRIGHT_BLAS_THREADS: String(blasThreadsPerWorker(size)) },
  });
  return {
    async reference(dataset, recipe, task, meta) {
      return unwrap<ReferenceOutput>(await pool.run({ kind: 'reference', dataset, recipe, task, meta }));
    },
    async materialize(dataset, recipe, csv) {
      return unwrap<MaterializedOutput>(await pool.run({ kind: 'materialize', dataset, recipe, csv }));
    },
    async warmUp() {
      await Promise.all(Array.from({ length: size }, () => pool.run({ kind: 'warm-up' })));
    },
    async close() {
      await pool.destroy();
    },
  };
}
