import { afterAll, describe, expect, it } from 'vitest';
import {
  lstsqConjugateColumns, lstsqConjugateColumnsTall, clstsq, complexZeros, rcmatmul, selectColumns, takeColumnsInPlace, type ComplexMatrix,
} from '../../../grading/linalg/complex.js';
import {
  gramCross, gramCrossSync, gramSymmetric, gramSymmetricSync, matProduct, matProductSync, setPooledCopyLimit,
} from '../../../grading/linalg/gram.js';
import { productRows } from '../../../grading/linalg/kernels-wasm.js';
import { productRowsInto } from '../../../grading/linalg/kernels.js';
import { closePool, helperKernel, sharedFloat64, warmUp } from '../../../grading/linalg/pool.js';
import { NUMPY_MISSING, numpyAvailable, runNumpy, seeded, withEnvAsync } from './numpy-helper.js';

function randomMatrix(len: number, seed: number, into?: Float64Array): Float64Array {
  const r = seeded(seed);
  const d = into ?? new Float64Array(len);
  for (let i = 0; i < len; i++) d[i] = r() + 0.1 * Math.cos(0.7 * i);
  return d;
}

function expectSameBits(x: Float64Array, y: Float64Array, what: string): void {
  expect(x.length).toBe(y.length);
  for (let i = 0; i < x.length; i++) {
    if (!Object.is(x[i], y[i])) throw new Error(`${what}: entry ${i} is ${x[i]} against ${y[i]}`);
  }
}

afterAll(() => closePool());

function naive(a: Float64Array, p: number, q: number, b: Float64Array, s: number): Float64Array {
  const c = new Float64Array(p * s);
  for (let j = 0; j < s; j++) for (let i = 0; i < p; i++) {
    let acc = 0;
    for (let t = 0; t < q; t++) acc += a[i + t * p] * b[t + j * q];
    c[i + j * p] = acc;
  }
  return c;
}

describe('real times complex (eigenvector matrices: real columns and conjugate pairs; Fact of the trade: common practice, no source — the triple loop as the comparison)', () => {
  it('a mix of real columns, conjugate pairs and a lone complex column gives the straightforward complex product; pairs come out exactly conjugate', () => {
    const p = 37, q = 9, s = 7;
    const a = randomMatrix(p * q, 5);
    const r = seeded(9);
    const b: ComplexMatrix = { rows: q, cols: s, re: new Float64Array(q * s), im: new Float64Array(q * s) };
    // columns: 0 real, 1–2 conjugate pair, 3 complex (no partner), 4 real, 5–6 conjugate pair
    for (let j = 0; j < s; j++) for (let t = 0; t < q; t++) {
      b.re[t + j * q] = r();
      b.im[t + j * q] = j === 0 || j === 4 ? 0 : r();
    }
    for (const j of [2, 6]) for (let t = 0; t < q; t++) {
      b.re[t + j * q] = b.re[t + (j - 1) * q];
      b.im[t + j * q] = -b.im[t + (j - 1) * q];
    }
    const c = rcmatmul(a, p, q, b);
    const cre = naive(a, p, q, b.re, s), cim = naive(a, p, q, b.im, s);
    for (let i = 0; i < p * s; i++) {
      expect(Math.abs(c.re[i] - cre[i])).toBeLessThan(1e-13 * q);
      expect(Math.abs(c.im[i] - cim[i])).toBeLessThan(1e-13 * q);
    }
    for (const j of [2, 6]) for (let i = 0; i < p; i++) {
      expect(c.re[i + j * p]).toBe(c.re[i + (j - 1) * p]);
      expect(c.im[i + j * p]).toBe(-c.im[i + (j - 1) * p]);
    }
    for (const j of [0, 4]) for (let i = 0; i < p; i++) expect(c.im[i + j * p]).toBe(0);
  });

  it('refuses shapes that do not fit', () => {
    const b: ComplexMatrix = { rows: 2, cols: 1, re: new Float64Array(2), im: new Float64Array(2) };
    expect(() => rcmatmul(new Float64Array(6), 2, 3, b)).toThrow(/cannot multiply 2×3 by 2×1/);
  });
});

const MATMUL = 'import sys, json, numpy as np\n'
  + 'o = json.load(sys.stdin)\n'
  + 'A = np.array(o["a"]).reshape(o["q"], o["p"]).T; B = np.array(o["b"]).reshape(o["s"], o["q"]).T\n'
  + 'print(json.dumps((A @ B).T.reshape(-1).tolist()))';

describe('C = A·B on the dense kernels (Fact of the trade: common practice, no source — the wasm and scalar kernels sum every entry from 0 in the same order, so they agree bit for bit)', () => {
  for (const [p, q, s] of [[1, 1, 1], [5, 3, 2], [130, 17, 9], [257, 64, 6], [600, 41, 13]] as const) {
    it(`${p}×${q} times ${q}×${s}: wasm rows equal the scalar rows bit for bit, also for a row range`, () => {
      const a = randomMatrix(p * q, p + q), b = randomMatrix(q * s, s + 3);
      const scalar = new Float64Array(p * s);
      productRowsInto(a, p, q, b, s, 0, p, scalar, p);
      const wasm = new Float64Array(p * s);
      expect(productRows(a, p, q, b, s, 0, p, wasm, p, true)).toBe(true);
      expectSameBits(wasm, scalar, 'wasm product');
      const part = new Float64Array(p * s).fill(7);
      const r0 = Math.floor(p / 3), r1 = p - Math.floor(p / 5);
      productRows(a, p, q, b, s, r0, r1, part, p, true);
      for (let j = 0; j < s; j++) for (let i = 0; i < p; i++) {
        expect(part[i + j * p]).toBe(i >= r0 && i < r1 ? scalar[i + j * p] : 7);
      }
    });
  }

  it('threaded (copied and shared input), single-thread and scalar routes give the same bits', async () => {
    expect(await warmUp()).toBe(true);
    const p = 3001, q = 70, s = 31; // above the threading threshold
    const a = randomMatrix(p * q, 8), b = randomMatrix(q * s, 9);
    const sync = matProductSync(a, p, q, b, s);
    expectSameBits(await matProduct(a, p, q, b, s), sync, 'threaded, copied input');
    expect(helperKernel()).toBe('wasm');
    expectSameBits(await matProduct(randomMatrix(p * q, 8, sharedFloat64(p * q)), p, q, b, s), sync, 'threaded, shared input');
    expectSameBits(await withEnvAsync('MODEWRIGHT_WASM', '0', () => matProduct(a, p, q, b, s)), sync, 'threaded scalar route');
    expect(helperKernel()).toBe('js');
    expectSameBits(await withEnvAsync('MODEWRIGHT_THREADS', '1', () => matProduct(a, p, q, b, s)), sync, 'MODEWRIGHT_THREADS=1');
    // AᵀB with one operand in shared memory and the other not (the helper then reads copies of both)
    const sharedA = randomMatrix(p * q, 8, sharedFloat64(p * q));
    const other = randomMatrix(p * 5, 10);
    expectSameBits(await gramCross(sharedA, other, p, q, 5), gramCrossSync(a, other, p, q, 5), 'cross, mixed shared and copied input');
    expectSameBits(await gramCross(other, sharedA, p, 5, q), gramCrossSync(other, a, p, 5, q), 'cross, mixed the other way');
  });

  it('copies moved to the helper (instead of pooled) give the same bits', async () => {
    const p = 3001, q = 70, s = 31;
    const a = randomMatrix(p * q, 8), b = randomMatrix(q * s, 9), other = randomMatrix(p * 5, 10);
    const sharedA = randomMatrix(p * q, 8, sharedFloat64(p * q));
    setPooledCopyLimit(0);
    try {
      expectSameBits(await matProduct(a, p, q, b, s), matProductSync(a, p, q, b, s), 'product, moved copy');
      expectSameBits(await gramCross(sharedA, other, p, q, 5), gramCrossSync(a, other, p, q, 5), 'cross, mixed, moved copies');
      expectSameBits(await gramSymmetric(a, p, q), gramSymmetricSync(a, p, q), 'gram, moved copy');
      expect(helperKernel()).toBe('wasm');
    } finally {
      setPooledCopyLimit();
    }
  });

  it('writes the rows it is given to the output rows it is told (oc), leaving the rest alone', () => {
    const p = 40, q = 9, s = 5;
    const a = randomMatrix(p * q, 31), b = randomMatrix(q * s, 32);
    const full = matProductSync(a, p, q, b, s);
    for (const wasm of [true, false]) {
      const out = new Float64Array(13 * s).fill(-1);
      productRows(a, p, q, b, s, 17, 27, out, 13, wasm, 2); // rows 17…26 of C into rows 2…11 of a 13-row block
      for (let j = 0; j < s; j++) for (let i = 0; i < 13; i++) {
        expect(out[i + j * 13]).toBe(i >= 2 && i < 12 ? full[17 + i - 2 + j * p] : -1);
      }
    }
  });

  it.skipIf(!numpyAvailable())('agrees with NumPy\'s A @ B to 1e-13 relative (Reference library: NumPy)', () => {
    const p = 211, q = 37, s = 12;
    const a = randomMatrix(p * q, 21), b = randomMatrix(q * s, 22);
    const ref = runNumpy<number[]>(MATMUL, { a: Array.from(a), b: Array.from(b), p, q, s });
    const c = matProductSync(a, p, q, b, s);
    const scale = Math.max(...ref.map(Math.abs));
    for (let i = 0; i < c.length; i++) expect(Math.abs(c[i] - ref[i])).toBeLessThanOrEqual(1e-13 * scale);
  });

  it('refuses arrays shorter than their stated shape', async () => {
    await expect(matProduct(new Float64Array(5), 2, 3, new Float64Array(6), 2)).rejects.toThrow(/A has 5 entries, expected at least 2×3/);
  });
});

const LSTSQ = 'import sys, json, numpy as np\n'
  + 'o = json.load(sys.stdin); p, q = o["p"], o["q"]\n'
  + 'A = (np.array(o["re"]) + 1j * np.array(o["im"])).reshape(q, p).T\n'
  + 'b, *_ = np.linalg.lstsq(A, np.array(o["x"]), rcond=None)\n'
  + 'print(json.dumps({"re": b.real.tolist(), "im": b.imag.tolist()}))';

/** Φ with columns: real, a conjugate pair, real, a conjugate pair (as the modes of a real operator). */
function modeLike(p: number, seed: number): ComplexMatrix {
  const q = 6;
  const r = seeded(seed);
  const phi = complexZeros(p, q);
  for (const j of [0, 1, 3, 4]) for (let i = 0; i < p; i++) {
    phi.re[i + j * p] = r();
    phi.im[i + j * p] = j === 0 || j === 3 ? 0 : r();
  }
  for (const j of [2, 5]) for (let i = 0; i < p; i++) {
    phi.re[i + j * p] = phi.re[i + (j - 1) * p];
    phi.im[i + j * p] = -phi.im[i + (j - 1) * p];
  }
  return phi;
}

describe.skipIf(!numpyAvailable())('least squares on conjugate-paired columns (Reference library: NumPy, numpy.linalg.lstsq)', () => {
  it('the real-form solution equals NumPy\'s complex least squares and the complex route, to 1e-12', () => {
    const p = 300;
    const phi = modeLike(p, 5);
    const x = randomMatrix(p, 6);
    const ours = lstsqConjugateColumns(phi, x);
    const ref = runNumpy<{ re: number[]; im: number[] }>(LSTSQ, { re: Array.from(phi.re), im: Array.from(phi.im), x: Array.from(x), p, q: 6 });
    const xb = complexZeros(p, 1);
    xb.re.set(x);
    const complexRoute = clstsq(phi, xb);
    for (let j = 0; j < 6; j++) {
      expect(Math.abs(ours.re[j] - ref.re[j])).toBeLessThan(1e-12);
      expect(Math.abs(ours.im[j] - ref.im[j])).toBeLessThan(1e-12);
      expect(Math.abs(ours.re[j] - complexRoute.re[j])).toBeLessThan(1e-12);
      expect(Math.abs(ours.im[j] - complexRoute.im[j])).toBeLessThan(1e-12);
    }
    // conjugate columns get conjugate coefficients (x is real)
    expect(ours.re[2]).toBe(ours.re[1]);
    expect(ours.im[2]).toBe(-ours.im[1]);
  });

  it('a complex column without its partner goes the complex route and still matches NumPy', () => {
    const p = 50;
    const phi = modeLike(p, 7);
    phi.im[5 * p + 3] += 0.25; // column 5 is no longer the conjugate of column 4
    const x = randomMatrix(p, 8);
    const ours = lstsqConjugateColumns(phi, x);
    const ref = runNumpy<{ re: number[]; im: number[] }>(LSTSQ, { re: Array.from(phi.re), im: Array.from(phi.im), x: Array.from(x), p, q: 6 });
    for (let j = 0; j < 6; j++) {
      expect(Math.abs(ours.re[j] - ref.re[j])).toBeLessThan(1e-11);
      expect(Math.abs(ours.im[j] - ref.im[j])).toBeLessThan(1e-11);
    }
  });

  it('the tall route (CholeskyQR2 on the dense kernels) equals NumPy, on a well-conditioned and on a badly conditioned Φ', async () => {
    for (const [p, squeeze] of [[2500, 1], [400, 1e-9]] as const) {
      const phi = modeLike(p, 11);
      // Make column 4's real part nearly that of column 0 (condition ≈ 1/squeeze; at 1e9, beyond what CholeskyQR2 handles alone).
      for (let i = 0; i < p; i++) phi.re[i + 3 * p] = phi.re[i] + squeeze * phi.re[i + 3 * p];
      const x = randomMatrix(p, 12);
      const ours = await lstsqConjugateColumnsTall(phi, x);
      const ref = runNumpy<{ re: number[]; im: number[] }>(LSTSQ, { re: Array.from(phi.re), im: Array.from(phi.im), x: Array.from(x), p, q: 6 });
      const scale = Math.max(...ref.re.map(Math.abs), ...ref.im.map(Math.abs));
      const tol = squeeze === 1 ? 1e-12 : 1e-5; // the badly conditioned problem's coefficients are themselves sensitive
      for (let j = 0; j < 6; j++) {
        expect(Math.abs(ours.re[j] - ref.re[j])).toBeLessThan(tol * scale);
        expect(Math.abs(ours.im[j] - ref.im[j])).toBeLessThan(tol * scale);
      }
    }
  });

  it('linearly dependent columns are refused with a message', async () => {
    const p = 20;
    const phi = modeLike(p, 9);
    for (let i = 0; i < p; i++) phi.re[i + 3 * p] = 2 * phi.re[i];
    expect(() => lstsqConjugateColumns(phi, randomMatrix(p, 1))).toThrow(/linearly dependent/);
    await expect(lstsqConjugateColumnsTall(phi, randomMatrix(p, 1))).rejects.toThrow(/linearly dependent/);
  });
});

if (!numpyAvailable()) describe('least squares against NumPy', () => it.skip(NUMPY_MISSING, () => undefined));

describe('taking columns in place (common practice, no source: the copy-based selection as the comparison)', () => {
  it('any order and any subset of distinct columns gives what selectColumns gives', () => {
    const rows = 7, cols = 12;
    const r = seeded(41);
    for (let trial = 0; trial < 40; trial++) {
      const a = complexZeros(rows, cols);
      for (let i = 0; i < rows * cols; i++) { a.re[i] = r(); a.im[i] = r(); }
      const order = Array.from({ length: cols }, (_, i) => i).sort(() => r());
      const idx = order.slice(0, 1 + (trial % cols));
      const want = selectColumns(a, idx);
      const got = takeColumnsInPlace({ rows, cols, re: Float64Array.from(a.re), im: Float64Array.from(a.im) }, idx);
      expect(got.cols).toBe(idx.length);
      expect(Array.from(got.re)).toEqual(Array.from(want.re));
      expect(Array.from(got.im)).toEqual(Array.from(want.im));
    }
  });

  it('refuses a repeated or out-of-range index', () => {
    const a = complexZeros(2, 3);
    expect(() => takeColumnsInPlace(a, [0, 0])).toThrow(/column index 0 is out of range or repeated \(3 columns\)/);
    expect(() => takeColumnsInPlace(a, [3])).toThrow(/column index 3/);
  });
});
