import { afterAll, describe, expect, it } from 'vitest';
import {
  gramCross, gramCrossReference, gramCrossSync, gramSymmetric, gramSymmetricReference, gramSymmetricSync,
} from '../../../grading/linalg/gram.js';
import { closePool, sharedFloat64, warmUp } from '../../../grading/linalg/pool.js';
import { colNorms, NUMPY_MISSING, numpyAvailable, runNumpy, seeded } from './numpy-helper.js';

function randomMatrix(n: number, k: number, seed: number, into?: Float64Array): Float64Array {
  const r = seeded(seed);
  const d = into ?? new Float64Array(n * k);
  for (let i = 0; i < n * k; i++) d[i] = r() + 0.2 * Math.sin(i);
  return d;
}

/** |fast − reference| ≤ 4·n·ε·‖a_i‖‖b_j‖ (the summation-order bound for a dot product of length n). */
function expectClose(fast: Float64Array, ref: Float64Array, na: number[], nb: number[], n: number): void {
  expect(fast.length).toBe(ref.length);
  const ka = na.length;
  for (let j = 0; j < nb.length; j++) {
    for (let i = 0; i < ka; i++) {
      const tol = 4 * Math.max(n, 1) * Number.EPSILON * na[i] * nb[j];
      const dev = Math.abs(fast[i + j * ka] - ref[i + j * ka]);
      if (dev > tol) throw new Error(`entry (${i}, ${j}) differs by ${dev} > ${tol}`);
    }
  }
}

const SHAPES: [number, number][] = [[1, 1], [1, 7], [5, 1], [3, 4], [13, 9], [1030, 6], [2049, 13], [4097, 5], [700, 17]];

afterAll(async () => {
  await closePool();
});

describe('blocked Gram products (Fact of the trade: common practice, no source — the defining formula DᵀD as one dot product per entry)', () => {
  for (const [n, k] of SHAPES) {
    it(`S = DᵀD equals the straightforward formula and is exactly symmetric, n=${n}, k=${k}`, async () => {
      const d = randomMatrix(n, k, 17 + n + k);
      const ref = gramSymmetricReference(d, n, k);
      const nrm = colNorms(d, n, k);
      const sync = gramSymmetricSync(d, n, k);
      const asyncS = await gramSymmetric(d, n, k);
      expectClose(sync, ref, nrm, nrm, n);
      expect(Array.from(asyncS)).toEqual(Array.from(sync));
      for (let j = 0; j < k; j++) for (let i = 0; i < j; i++) expect(sync[i + j * k]).toBe(sync[j + i * k]);
    });
    it(`C = AᵀB equals the straightforward formula, n=${n}, ka=${k}, kb=${k + 2}`, async () => {
      const a = randomMatrix(n, k, 5 + n);
      const b = randomMatrix(n, k + 2, 9 + k);
      const ref = gramCrossReference(a, b, n, k, k + 2);
      const c = gramCrossSync(a, b, n, k, k + 2);
      expectClose(c, ref, colNorms(a, n, k), colNorms(b, n, k + 2), n);
      expect(Array.from(await gramCross(a, b, n, k, k + 2))).toEqual(Array.from(c));
    });
  }

  it('the threaded route (helper thread, copied or shared input) is bit-identical to the single-thread route', async () => {
    const started = await warmUp();
    expect(started).toBe(true);
    const n = 3001, k = 75; // above the threading threshold
    const d = randomMatrix(n, k, 99);
    const sync = gramSymmetricSync(d, n, k);
    expect(Array.from(await gramSymmetric(d, n, k))).toEqual(Array.from(sync));
    const shared = randomMatrix(n, k, 99, sharedFloat64(n * k));
    expect(Array.from(await gramSymmetric(shared, n, k))).toEqual(Array.from(sync));
    const y = d.subarray(n); // Y = D[:, 1:], X = D[:, :k−1]
    const cs = gramCrossSync(y, d, n, k - 1, k - 1);
    expect(Array.from(await gramCross(y, d, n, k - 1, k - 1))).toEqual(Array.from(cs));
    expectClose(cs, gramCrossReference(y, d, n, k - 1, k - 1), colNorms(y, n, k - 1), colNorms(d, n, k - 1), n);
  });

  it('with the helper thread switched off (MODEWRIGHT_THREADS=1) the result is the same, bit for bit', async () => {
    const n = 2500, k = 64;
    const d = randomMatrix(n, k, 123);
    const threaded = await gramSymmetric(d, n, k);
    const before = process.env.MODEWRIGHT_THREADS;
    process.env.MODEWRIGHT_THREADS = '1';
    try {
      expect(Array.from(await gramSymmetric(d, n, k))).toEqual(Array.from(threaded));
    } finally {
      if (before === undefined) delete process.env.MODEWRIGHT_THREADS;
      else process.env.MODEWRIGHT_THREADS = before;
    }
  });

  it('refuses a buffer shorter than its stated shape, saying which', async () => {
    await expect(gramSymmetric(new Float64Array(5), 2, 3)).rejects.toThrow(/D has 5 entries, expected at least 2×3/);
    expect(() => gramCrossSync(new Float64Array(6), new Float64Array(5), 2, 3, 3)).toThrow(/B has 5 entries/);
  });
});

describe.skipIf(!numpyAvailable())('Gram products against NumPy (Reference library: NumPy, X.T @ X and Y.T @ X)', () => {
  it('single-trajectory reuse: S = DᵀD holds XᵀX and YᵀX as NumPy computes them', async () => {
    const n = 1500, k = 41;
    const d = randomMatrix(n, k, 4242);
    const s = await gramSymmetric(d, n, k);
    const ref = runNumpy<{ xx: number[][]; yx: number[][] }>(
      'import sys, json, numpy as np\n'
      + 'o = json.load(sys.stdin); D = np.array(o["d"]).reshape(o["k"], o["n"]).T\n'
      + 'X, Y = D[:, :-1], D[:, 1:]\n'
      + 'print(json.dumps({"xx": (X.T @ X).tolist(), "yx": (Y.T @ X).tolist()}))',
      { d: Array.from(d), n, k },
    );
    const m = k - 1;
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < m; j++) {
        expect(s[i + j * k]).toBeCloseTo(ref.xx[i][j], 9);
        expect(s[i + 1 + j * k]).toBeCloseTo(ref.yx[i][j], 9);
      }
    }
  });
});

if (!numpyAvailable()) {
  describe('Gram products against NumPy', () => {
    it.skip(NUMPY_MISSING, () => undefined);
  });
}
