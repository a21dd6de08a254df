/**
 * Our side of one benchmark workload, in a process of its own so that its
 * peak resident memory is not mixed with data generation or other workloads.
 * Usage: tsx bench/engine-child.ts FILE.npy WORKLOAD_JSON REPS
 * Prints one JSON line: {"times", "re", "im", "maxrss_mb", "route", "threads"}.
 */
import { closePool, helperError, warmUp } from '../grading/linalg/pool.js';
import { exactDmdMinimal, kernelEdmdMinimal, type Eigenvalues } from './minimal-route.js';
import { readNpyShared } from './npy-lean.js';
import type { Workload } from './workloads.js';

type Runner = () => Promise<Eigenvalues>;

interface MethodsModule {
  kernelEdmd?: (source: unknown, options: unknown) => Promise<{ eigenvalues: { lambda: { re: number; im: number } }[] }>;
  exactDmd?: (source: unknown, options: unknown) => Promise<{ eigenvalues: { lambda: { re: number; im: number } }[] }>;
}

async function tryImport(rel: string): Promise<MethodsModule | null> {
  try {
    return (await import(new URL(rel, import.meta.url).href)) as MethodsModule;
  } catch {
    return null;
  }
}

function fromResult(res: { eigenvalues: { lambda: { re: number; im: number } }[] }): Eigenvalues {
  return { re: res.eigenvalues.map((e) => e.lambda.re), im: res.eigenvalues.map((e) => e.lambda.im) };
}

async function main(): Promise<void> {
  const [file, wjson, repsText] = process.argv.slice(2);
  const w = JSON.parse(wjson) as Workload;
  const reps = Number(repsText);
  const { data, rows, cols } = readNpyShared(file);
  if (rows !== w.n || cols !== w.m + 1) throw new Error(`${file}: shape ${rows}×${cols}, expected ${w.n}×${w.m + 1}`);
  const threads = await warmUp();
  const snapshots = { data, n: rows, k: cols };
  let route = 'bench stand-in (grading/methods not available)';
  let run: Runner;
  if (w.method === 'kernel-edmd') {
    const mod = await tryImport('../grading/methods/kernel-edmd.ts');
    if (mod?.kernelEdmd) {
      const f = mod.kernelEdmd;
      route = 'grading/methods kernelEdmd';
      run = async () => fromResult(await f({ kind: 'trajectory', snapshots }, {
        kernel: { kind: 'polynomial', degree: 2 },
        truncation: { kind: 'rank', rank: w.rank },
        rankBand: false,
        modes: false,
      }));
    } else run = () => kernelEdmdMinimal(data, rows, w.m, 2, w.rank);
  } else {
    const mod = await tryImport('../grading/methods/dmd.ts');
    if (mod?.exactDmd) {
      const f = mod.exactDmd;
      route = 'grading/methods exactDmd';
      run = async () => fromResult(await f({ kind: 'trajectory', snapshots }, {
        truncation: { kind: 'rank', rank: w.rank },
        svd: 'snapshots',
        rankBand: false,
        modes: true,
      }));
    } else run = () => exactDmdMinimal(data, rows, w.m, w.rank);
  }
  let ev = await run(); // warm-up: JIT and helper thread, not counted
  const times: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    ev = await run();
    times.push((performance.now() - t0) / 1000);
  }
  await closePool();
  const maxrss = process.resourceUsage().maxRSS / 1024; // kB → MB
  process.stdout.write(JSON.stringify({ times, re: ev.re, im: ev.im, maxrss_mb: maxrss, route, threads, helperError: helperError() }) + '\n');
}

main().catch((err) => {
  process.stderr.write(`engine child failed: ${err instanceof Error ? err.stack : String(err)}\n`);
  process.exit(1);
});
