import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { backend, jsBackend, setBackend, type DenseBackend } from '../../../grading/linalg/backend.js';
import { closePool } from '../../../grading/linalg/pool.js';
import { exactDmd } from '../../../grading/methods/dmd.js';
import { edmd } from '../../../grading/methods/edmd.js';
import { kernelEdmd } from '../../../grading/methods/kernel-edmd.js';
import type { PairSource } from '../../../grading/methods/types.js';
import { seeded } from './numpy-helper.js';

// The backend chosen at start-up (OpenBLAS when its addon is built, else TypeScript; MODEWRIGHT_LINALG forces one).
const initial = backend();
afterEach(() => setBackend(initial));
afterAll(() => closePool());

/** A backend that forwards to the start-up one and counts the calls per operation. */
function counting(): { be: DenseBackend; calls: Record<string, number> } {
  const calls: Record<string, number> = {};
  const count = (op: string) => (calls[op] = (calls[op] ?? 0) + 1);
  const be: DenseBackend = {
    name: 'counting',
    firstNonFinite: (x, length) => (count('firstNonFinite'), initial.firstNonFinite(x, length)),
    gram: (d, n, k) => (count('gram'), initial.gram(d, n, k)),
    cross: (a, b, n, ka, kb) => (count('cross'), initial.cross(a, b, n, ka, kb)),
    product: (a, p, q, b, s) => (count('product'), initial.product(a, p, q, b, s)),
    symmetricEigen: (a, k, r, v) => (count('symmetricEigen'), initial.symmetricEigen(a, k, r, v)),
    generalEigen: (a, k) => (count('generalEigen'), initial.generalEigen(a, k)),
    eigenvalues: (a, k) => (count('eigenvalues'), initial.eigenvalues(a, k)),
    svd: (a, rows, cols) => (count('svd'), initial.svd(a, rows, cols)),
    ...(initial.leastSquares ? { leastSquares: initial.leastSquares } : {}),
    pivotedQr: (a, rows, cols, b, bcols, o) => (count('pivotedQr'), (initial.pivotedQr ?? (jsBackend.pivotedQr as NonNullable<DenseBackend['pivotedQr']>))(a, rows, cols, b, bcols, o)),
  };
  return { be, calls };
}

function trajectory(n: number, k: number, seed: number): PairSource {
  const r = seeded(seed);
  const d = new Float64Array(n * k);
  for (let j = 0; j < k; j++) for (let t = 0; t < n; t++) d[j * n + t] = Math.sin(0.2 * j * (t + 1)) + 0.01 * r();
  return { kind: 'trajectory', snapshots: { data: d, n, k } };
}

function rotation(): PairSource {
  const k = 40;
  const d = new Float64Array(2 * k);
  for (let j = 0; j < k; j++) {
    d[2 * j] = Math.cos(0.3 * j);
    d[2 * j + 1] = Math.sin(0.3 * j);
  }
  return { kind: 'trajectory', snapshots: { data: d, n: 2, k } };
}

// Common practice, no source: the interface promise is that a different backend changes nothing in the methods.
describe('the dense-kernel interface (backend.ts)', () => {
  it('all three methods do their dense linear algebra through backend(), and a substituted backend gives the same spectra', async () => {
    const src = trajectory(30, 41, 5);
    const run = async () => [
      await exactDmd(src, { truncation: { kind: 'rank', rank: 8 } }),
      await exactDmd(src, { truncation: { kind: 'rank', rank: 8 }, svd: 'direct' }),
      await edmd(trajectory(2, 60, 6), { dictionary: { kind: 'monomial', degree: 2 } }),
      // a rotation keeps x² + y² constant: a rank-deficient degree-2 dictionary (eigenvalues-only check of another solution)
      await edmd(rotation(), { dictionary: { kind: 'monomial', degree: 2 }, sensitivity: true }),
      await kernelEdmd(src, { kernel: { kind: 'polynomial', degree: 2 }, truncation: { kind: 'rank', rank: 10 } }),
    ].map((res) => res.eigenvalues.map((e) => [e.lambda.re, e.lambda.im]));
    const plain = await run();
    const { be, calls } = counting();
    setBackend(be);
    expect(backend().name).toBe('counting');
    expect(await run()).toEqual(plain);
    for (const op of ['gram', 'cross', 'product', 'symmetricEigen', 'generalEigen', 'eigenvalues', 'svd', 'pivotedQr']) {
      expect(calls[op] ?? 0, `${op} goes through the backend`).toBeGreaterThan(0);
    }
  });
});
