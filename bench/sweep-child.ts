/**
 * Our side of one point of the growth sweep (`npm run bench -- --sweep`), in a
 * process of its own: kernel EDMD (polynomial kernel of degree 2, rank r, no
 * rank band, no modes) on one trajectory, and its two dominant steps timed
 * alone on the same data: the Gram step S = DᵀD (backend().gram) and the
 * leading-r symmetric eigen step on Ĝ (backend().symmetricEigen).
 * Usage: tsx bench/sweep-child.ts FILE.npy N M R REPS
 * Prints one JSON line: {"total", "gram", "eigen" (seconds per run), "backend"}.
 */
import { backend } from '../grading/linalg/backend.js';
import { closePool, warmUp } from '../grading/linalg/pool.js';
import { kernelEdmd } from '../grading/methods/kernel-edmd.js';
import { readNpyShared } from './npy-lean.js';

async function main(): Promise<void> {
  const [file, nText, mText, rText, repsText] = process.argv.slice(2);
  const n = Number(nText), m = Number(mText), r = Number(rText), reps = Number(repsText);
  const { data, rows, cols } = readNpyShared(file);
  if (rows !== n || cols !== m + 1) throw new Error(`${file}: shape ${rows}×${cols}, expected ${n}×${m + 1}`);
  const be = backend();
  if (be.name === 'typescript') await warmUp();
  const snapshots = { data, n, k: m + 1 };
  const total = async () => {
    await kernelEdmd(
      { kind: 'trajectory', snapshots },
      { kernel: { kind: 'polynomial', degree: 2 }, truncation: { kind: 'rank', rank: r }, rankBand: false, modes: false },
    );
  };
  // Ĝ = (1 + XᵀX)² from one Gram product (X = the first m snapshots), for the eigen step alone.
  const s = await be.gram(data, n, m + 1);
  const g = new Float64Array(m * m);
  for (let j = 0; j < m; j++) for (let i = 0; i < m; i++) g[i + j * m] = (1 + s[i + j * (m + 1)]) ** 2;
  const steps: Record<'total' | 'gram' | 'eigen', () => Promise<unknown>> = {
    total,
    gram: () => be.gram(data, n, m + 1),
    eigen: async () => be.symmetricEigen(g, m, r),
  };
  const out: Record<string, number[]> = { total: [], gram: [], eigen: [] };
  for (const [name, f] of Object.entries(steps)) {
    // Warm-up by the bench's rule (untimed runs for BENCH_WARMUP_S seconds, at least one), as NumPy's side does.
    const w0 = performance.now();
    await f();
    while ((performance.now() - w0) / 1000 < Number(process.env.BENCH_WARMUP_S ?? 1)) await f();
    for (let i = 0; i < reps; i++) {
      const t0 = performance.now();
      await f();
      out[name].push((performance.now() - t0) / 1000);
    }
  }
  await closePool();
  process.stdout.write(JSON.stringify({ ...out, backend: be.name }) + '\n');
}

main().catch((err) => {
  process.stderr.write(`sweep child failed: ${err instanceof Error ? err.stack : String(err)}\n`);
  process.exit(1);
});
