/**
 * A one-worker piscina pool for the dense kernels. The main thread computes
 * one row half of every product while the worker computes the other, so two
 * cores are busy with one extra thread only (less memory than two workers).
 *
 * The worker file is TypeScript: it is started with the tsx loader, which
 * works under `tsx` (CLI, bench, server) and inside Vitest. When the worker
 * cannot start, or MODEWRIGHT_THREADS=1, every part runs on the main thread
 * and the result is bit-identical (see kernels.ts).
 */
import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import { pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import type { KernelTask } from './gram-worker.js';
import { wasmWanted } from './kernels-wasm.js';

let pool: Piscina<KernelTask, number> | null | undefined;
let lastError: string | null = null;
let lastHelperKernel: 'wasm' | 'js' | null = null;

function loaderArgs(): string[] {
  const argv = process.execArgv.slice();
  const hasTsx = argv.some((a) => a.includes('tsx'));
  if (hasTsx) return argv;
  const req = createRequire(import.meta.url);
  return [...argv, '--import', pathToFileURL(req.resolve('tsx')).href];
}

/** True when a helper thread may be used (more than one core, not disabled). */
export function threadsWanted(): boolean {
  if (process.env.MODEWRIGHT_THREADS === '1') return false;
  return availableParallelism() > 1;
}

function getPool(): Piscina<KernelTask, number> | null {
  if (pool !== undefined) return pool;
  if (!threadsWanted()) return (pool = null);
  try {
    pool = new Piscina<KernelTask, number>({
      filename: new URL('./gram-worker.ts', import.meta.url).href,
      minThreads: 1,
      maxThreads: 1,
      idleTimeout: 60_000,
      execArgv: loaderArgs(),
    });
  } catch (err) {
    lastError = String(err);
    pool = null;
  }
  return pool;
}

/** Start the helper thread (and its wasm kernel) ahead of the first product (optional). Resolves to whether it runs. */
export async function warmUp(): Promise<boolean> {
  const p = getPool();
  if (!p) return false;
  const out = new Float64Array(new SharedArrayBuffer(8));
  const data = new Float64Array(new SharedArrayBuffer(8));
  data[0] = 2;
  const ok = await runOnHelper({ op: 'gram', data, ld: 1, k: 1, r0: 0, r1: 1, out, wasm: wasmWanted() }, []);
  return ok && out[0] === 4;
}

/**
 * Run a task on the helper thread. Resolves true when done there; false when
 * no helper is available or it failed (the caller then computes the part itself).
 */
export async function runOnHelper(task: KernelTask, transfer: ArrayBuffer[]): Promise<boolean> {
  const p = getPool();
  if (!p) return false;
  try {
    const used = await p.run(task, { transferList: transfer });
    lastHelperKernel = used === 1 ? 'wasm' : 'js';
    return true;
  } catch (err) {
    lastError = String(err);
    // A worker that cannot load is not retried for every product.
    pool = null;
    void p.destroy().catch(() => undefined);
    return false;
  }
}

/** Which kernel the helper thread ran its last part in (null before the first part). */
export function helperKernel(): 'wasm' | 'js' | null {
  return lastHelperKernel;
}

/** Why the helper thread is not in use, if it failed. */
export function helperError(): string | null {
  return lastError;
}

/** Stop the helper thread (tests, CLI exit). A later product starts it again. */
export async function closePool(): Promise<void> {
  const p = pool;
  pool = undefined;
  if (p) await p.destroy();
}

/** A Float64Array in shared memory: data read into it is handed to the helper thread without a copy. */
export function sharedFloat64(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * 8));
}
