import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeNpy } from '../../../grading/formats/npy';
import type { Complex, PairSource, Snapshots } from '../../../grading/methods/types';
import { createRng } from '../../../grading/scenarios/prng';

export const ORACLE_DIR = join(__dirname, '..', '..', 'oracle');

/** Whether python3 with NumPy and SciPy runs here. */
export function numpyAvailable(): boolean {
  return spawnSync('python3', ['-c', 'import numpy, scipy'], { encoding: 'utf8' }).status === 0;
}
export const NUMPY_MISSING = 'SKIPPED: python3 with NumPy/SciPy is not available on this machine; the reference-library cross-check cannot run';

/** Standard normal n×k matrix from a seed. */
export function gaussianMatrix(seed: number, n: number, k: number): Float64Array {
  const rng = createRng(seed);
  return Float64Array.from({ length: n * k }, () => rng.normal());
}

/** Trajectory of x_{j+1} = A x_j (A n×n row-major nested array) from x_0. */
export function linearTrajectory(a: number[][], x0: number[], k: number): Snapshots {
  const n = x0.length;
  const data = new Float64Array(n * k);
  data.set(x0, 0);
  for (let j = 1; j < k; j++) {
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let t = 0; t < n; t++) s += a[i][t] * data[t + (j - 1) * n];
      data[i + j * n] = s;
    }
  }
  return { data, n, k };
}

/** Pairs (x_i, F(x_i)) for x_i drawn standard normal in d dimensions. */
export function mapPairs(seed: number, d: number, m: number, f: (x: Float64Array) => number[]): PairSource & { kind: 'pairs' } {
  const x = gaussianMatrix(seed, d, m);
  const y = new Float64Array(d * m);
  for (let i = 0; i < m; i++) y.set(f(x.subarray(i * d, i * d + d)), i * d);
  return { kind: 'pairs', x: { data: x, n: d, k: m }, y: { data: y, n: d, k: m } };
}

/** max_i min_j |a_i − b_j| (every expected value is found in the list). */
export function maxDistanceToSet(expected: readonly Complex[], got: readonly Complex[]): number {
  let worst = 0;
  for (const e of expected) {
    let best = Infinity;
    for (const g of got) best = Math.min(best, Math.hypot(e.re - g.re, e.im - g.im));
    worst = Math.max(worst, best);
  }
  return worst;
}

/** Run the NumPy/SciPy oracle on X, Y (n×m) and our eigenvalues; returns its JSON. */
export function runSpectraOracle(
  x: Snapshots,
  y: Snapshots,
  ours: readonly Complex[],
  job: Record<string, unknown>,
): { eigenvalues: [number, number][]; maxRelErr: number; matched: number } {
  const dir = mkdtempSync(join(tmpdir(), 'modewright-oracle-'));
  try {
    writeFileSync(join(dir, 'x.npy'), writeNpy({ rows: x.n, cols: x.k, data: x.data }));
    writeFileSync(join(dir, 'y.npy'), writeNpy({ rows: y.n, cols: y.k, data: y.data }));
    writeFileSync(
      join(dir, 'ours.npy'),
      writeNpy({ rows: ours.length, cols: 1, re: Float64Array.from(ours, (z) => z.re), im: Float64Array.from(ours, (z) => z.im) }, { vector: true }),
    );
    writeFileSync(join(dir, 'job.json'), JSON.stringify({ ...job, x: 'x.npy', y: 'y.npy', ours: 'ours.npy' }));
    const r = spawnSync('python3', [join(ORACLE_DIR, 'spectra_oracle.py'), dir], { encoding: 'utf8', maxBuffer: 64 << 20 });
    if (r.status !== 0) throw new Error(`python3 oracle failed: ${r.stderr}`);
    return JSON.parse(r.stdout);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
