/**
 * Our side of one benchmark workload, in a process of its own so that its
 * peak resident memory is not mixed with data generation or other workloads.
 * Usage: tsx bench/engine-child.ts FILE.npy WORKLOAD_JSON REPS [DRAWS]
 * With DRAWS the run includes the measured sensitivity (DRAWS float32-level perturbed recomputations at the
 * same rank, the step computeReference adds to a reference); without, it is one plain run.
 * The backend is the engine's own choice (MODEWRIGHT_LINALG set by run.ts).
 * Prints one JSON line: {"times", "re", "im", "maxrss_mb", "route", "threads", "backend", "blas_threads", "draws"}.
 */
import { backend } from '../grading/linalg/backend.js';
import { eigenKernelError, eigenKernels } from '../grading/linalg/eigen-wasm.js';
import { loadAddon } from '../grading/linalg/openblas.js';
import { closePool, helperError, warmUp } from '../grading/linalg/pool.js';
import { exactDmd } from '../grading/methods/dmd.js';
import { kernelEdmd } from '../grading/methods/kernel-edmd.js';
import type { SpectrumResult } from '../grading/methods/types.js';
import { readNpyShared } from './npy-lean.js';
import type { Workload } from './workloads.js';

interface Eigenvalues {
  re: number[];
  im: number[];
}
type Runner = () => Promise<Eigenvalues>;

function fromResult(res: SpectrumResult): Eigenvalues {
  return { re: res.eigenvalues.map((e) => e.lambda.re), im: res.eigenvalues.map((e) => e.lambda.im) };
}

async function main(): Promise<void> {
  const [file, wjson, repsText, drawsText] = process.argv.slice(2);
  const draws = drawsText === undefined ? 0 : Number(drawsText);
  if (!Number.isInteger(draws) || draws < 0) throw new Error(`DRAWS must be a whole number ≥ 0, got "${drawsText}"`);
  const sensitivity = draws > 0 ? { draws } : false;
  const w = JSON.parse(wjson) as Workload;
  const reps = Number(repsText);
  const { data, rows, cols } = readNpyShared(file);
  if (rows !== w.n || cols !== w.m + 1) throw new Error(`${file}: shape ${rows}×${cols}, expected ${w.n}×${w.m + 1}`);
  const be = backend();
  // The helper thread serves the TypeScript kernels only; the OpenBLAS backend has its own threads.
  const threads = be.name === 'typescript' ? await warmUp() : false;
  const snapshots = { data, n: rows, k: cols };
  let route: string;
  let run: Runner;
  if (w.method === 'kernel-edmd') {
    route = 'grading/methods kernelEdmd';
    run = async () =>
      fromResult(
        await kernelEdmd(
          { kind: 'trajectory', snapshots },
          { kernel: { kind: 'polynomial', degree: 2 }, truncation: { kind: 'rank', rank: w.rank }, rankBand: false, modes: false, sensitivity },
        ),
      );
  } else {
    route = 'grading/methods exactDmd';
    run = async () =>
      fromResult(
        await exactDmd(
          { kind: 'trajectory', snapshots },
          { truncation: { kind: 'rank', rank: w.rank }, svd: 'snapshots', rankBand: false, modes: true, sensitivity },
        ),
      );
  }
  // Warm-up, not counted (JIT tiers, helper thread, pooled buffers): runs until BENCH_WARMUP_S seconds have passed, at least one.
  const warmupS = Number(process.env.BENCH_WARMUP_S ?? 1);
  const w0 = performance.now();
  let ev = await run();
  while ((performance.now() - w0) / 1000 < warmupS) ev = await run();
  const times: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    ev = await run();
    times.push((performance.now() - t0) / 1000);
  }
  await closePool();
  if (be.name === 'typescript') route += eigenKernels() ? '; eigensolver kernels: wasm SIMD' : `; eigensolver kernels: scalar (${eigenKernelError() ?? 'MODEWRIGHT_WASM=0'})`;
  const blasThreads = be.name === 'openblas' ? loadAddon()?.threads() ?? null : null;
  const maxrss = process.resourceUsage().maxRSS / 1024; // kB → MB
  process.stdout.write(JSON.stringify({ times, re: ev.re, im: ev.im, maxrss_mb: maxrss, route, threads, helperError: helperError(), backend: be.name, blas_threads: blasThreads, draws }) + '\n');
}

main().catch((err) => {
  process.stderr.write(`engine child failed: ${err instanceof Error ? err.stack : String(err)}\n`);
  process.exit(1);
});
