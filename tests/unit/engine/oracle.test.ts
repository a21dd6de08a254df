import { describe, expect, it } from 'vitest';
import { exactDmd } from '../../../grading/methods/dmd';
import { edmd } from '../../../grading/methods/edmd';
import { kernelEdmd } from '../../../grading/methods/kernel-edmd';
import type { Kernel, PairSource, Snapshots } from '../../../grading/methods/types';
import { gaussianMatrix, numpyAvailable, NUMPY_MISSING, runSpectraOracle } from './helpers';

// Reference library: NumPy 2.x / SciPy 1.x via python3 (tests/oracle/spectra_oracle.py), a plain
// transcription of the same formulas (numpy.linalg.svd / eig / eigh / pinv), eigenvalues matched by
// scipy.optimize.linear_sum_assignment. Tolerance: 1e-8 relative on these well-conditioned random cases.
const HAVE_NUMPY = numpyAvailable();
if (!HAVE_NUMPY) console.warn(NUMPY_MISSING);
const TOL = 1e-8;

/** Y = tanh(B X) with a random B scaled to keep the map contractive-ish. */
function nonlinearImage(x: Snapshots, seed: number): Snapshots {
  const n = x.n;
  const b = gaussianMatrix(seed, n, n);
  const y = new Float64Array(n * x.k);
  for (let j = 0; j < x.k; j++) {
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let t = 0; t < n; t++) s += (b[i + t * n] / Math.sqrt(n)) * x.data[t + j * n];
      y[i + j * n] = Math.tanh(s);
    }
  }
  return { data: y, n, k: x.k };
}

function pairsOf(source: PairSource): { x: Snapshots; y: Snapshots } {
  if (source.kind === 'pairs') return { x: source.x, y: source.y };
  if (source.kind === 'trajectory') {
    const s = source.snapshots;
    const m = s.k - 1;
    return { x: { data: s.data.slice(0, s.n * m), n: s.n, k: m }, y: { data: s.data.slice(s.n), n: s.n, k: m } };
  }
  throw new Error('not used');
}

describe.skipIf(!HAVE_NUMPY)('Reference library (NumPy/SciPy): exact DMD on random data', () => {
  const cases: { label: string; n: number; m: number; rank: number; svd: 'auto' | 'snapshots' | 'direct'; trajectory: boolean }[] = [
    { label: 'n ≫ m (method of snapshots, one trajectory, Gram reuse)', n: 300, m: 16, rank: 16, svd: 'auto', trajectory: true },
    { label: 'n ≫ m (explicit pairs, method of snapshots)', n: 200, m: 12, rank: 10, svd: 'snapshots', trajectory: false },
    { label: 'n ≈ m (direct SVD)', n: 30, m: 28, rank: 20, svd: 'auto', trajectory: false },
    { label: 'n ≪ m (direct SVD, one trajectory)', n: 6, m: 250, rank: 6, svd: 'auto', trajectory: true },
  ];
  for (const c of cases) {
    it(`${c.label}: n = ${c.n}, m = ${c.m}, r = ${c.rank}; eigenvalues of Ã agree to ${TOL} relative`, async () => {
      let source: PairSource;
      if (c.trajectory) source = { kind: 'trajectory', snapshots: { data: gaussianMatrix(c.n * 31 + c.m, c.n, c.m + 1), n: c.n, k: c.m + 1 } };
      else {
        const x = { data: gaussianMatrix(c.n + c.m, c.n, c.m), n: c.n, k: c.m };
        source = { kind: 'pairs', x, y: { data: gaussianMatrix(c.n * c.m, c.n, c.m), n: c.n, k: c.m } };
      }
      const r = await exactDmd(source, { truncation: { kind: 'rank', rank: c.rank }, svd: c.svd, rankBand: false });
      const { x, y } = pairsOf(source);
      const o = runSpectraOracle(x, y, r.eigenvalues.map((e) => e.lambda), { method: 'dmd', rank: c.rank });
      expect(o.eigenvalues).toHaveLength(r.eigenvalues.length);
      expect(o.matched).toBe(c.rank);
      expect(o.maxRelErr).toBeLessThan(TOL);
    });
  }
});

describe.skipIf(!HAVE_NUMPY)('Reference library (NumPy/SciPy): EDMD on random data', () => {
  const cases: { label: string; d: number; m: number; degree: number; dictionary: 'monomial' | 'hermite' }[] = [
    { label: 'n ≪ m', d: 2, m: 200, degree: 3, dictionary: 'monomial' },
    { label: 'n ≪ m, Hermite', d: 2, m: 200, degree: 4, dictionary: 'hermite' },
    { label: 'N ≈ m', d: 3, m: 14, degree: 2, dictionary: 'monomial' },
    { label: 'n ≈ m', d: 12, m: 16, degree: 1, dictionary: 'hermite' },
    { label: 'n > m/3, degree 2', d: 8, m: 60, degree: 2, dictionary: 'monomial' },
  ];
  for (const c of cases) {
    it(`${c.label}: d = ${c.d}, m = ${c.m}, ${c.dictionary} degree ${c.degree}; eigenvalues of K = G⁺A agree to ${TOL} relative`, async () => {
      const x = { data: gaussianMatrix(c.d * 7 + c.m, c.d, c.m), n: c.d, k: c.m };
      const y = nonlinearImage(x, c.m);
      const r = await edmd({ kind: 'pairs', x, y }, { dictionary: { kind: c.dictionary, degree: c.degree } });
      const o = runSpectraOracle(x, y, r.eigenvalues.map((e) => e.lambda), { method: 'edmd', degree: c.degree, dictionary: c.dictionary });
      expect(o.eigenvalues).toHaveLength(r.eigenvalues.length);
      expect(o.maxRelErr).toBeLessThan(TOL);
    });
  }
});

describe.skipIf(!HAVE_NUMPY)('Reference library (NumPy/SciPy): kernel EDMD on random data', () => {
  const cases: { label: string; n: number; m: number; rank: number; kernel: Kernel; trajectory: boolean }[] = [
    { label: 'n ≫ m, Gaussian kernel, one trajectory', n: 200, m: 20, rank: 20, kernel: { kind: 'gaussian', sigma: 14 }, trajectory: true },
    { label: 'n ≫ m, polynomial kernel with γ = 1/n', n: 150, m: 18, rank: 18, kernel: { kind: 'polynomial', degree: 2, coef0: 1, gamma: 1 / 150 }, trajectory: false },
    { label: 'n ≈ m, polynomial kernel', n: 30, m: 30, rank: 30, kernel: { kind: 'polynomial', degree: 2 }, trajectory: false },
    { label: 'n ≈ m, linear kernel (rank n)', n: 25, m: 28, rank: 25, kernel: { kind: 'linear' }, trajectory: true },
    { label: 'n ≪ m, polynomial kernel degree 3 (rank N = 10)', n: 2, m: 150, rank: 10, kernel: { kind: 'polynomial', degree: 3, coef0: 2, gamma: 0.5 }, trajectory: false },
    { label: 'n ≪ m, Gaussian kernel, leading 6', n: 2, m: 120, rank: 6, kernel: { kind: 'gaussian', sigma: 2 }, trajectory: false },
  ];
  for (const c of cases) {
    it(`${c.label}: n = ${c.n}, m = ${c.m}, r = ${c.rank}; eigenvalues of K̂ agree to ${TOL} relative`, async () => {
      let source: PairSource;
      if (c.trajectory) source = { kind: 'trajectory', snapshots: { data: gaussianMatrix(c.n + 3 * c.m, c.n, c.m + 1), n: c.n, k: c.m + 1 } };
      else {
        const x = { data: gaussianMatrix(c.n * 5 + c.m, c.n, c.m), n: c.n, k: c.m };
        source = { kind: 'pairs', x, y: nonlinearImage(x, c.n) };
      }
      const r = await kernelEdmd(source, { kernel: c.kernel, truncation: { kind: 'rank', rank: c.rank }, rankBand: false });
      const { x, y } = pairsOf(source);
      const job: Record<string, unknown> = { method: 'kernel-edmd', rank: c.rank, kernel: c.kernel.kind };
      if (c.kernel.kind === 'polynomial') Object.assign(job, { degree: c.kernel.degree, coef0: c.kernel.coef0 ?? 1, gamma: c.kernel.gamma ?? 1 });
      if (c.kernel.kind === 'gaussian') job.sigma = c.kernel.sigma;
      const o = runSpectraOracle(x, y, r.eigenvalues.map((e) => e.lambda), job);
      expect(o.eigenvalues).toHaveLength(c.rank);
      expect(o.matched).toBe(c.rank);
      expect(o.maxRelErr).toBeLessThan(TOL);
    });
  }
});
