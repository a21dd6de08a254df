import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eigenKernels } from '../../../grading/linalg/eigen-wasm.js';
import { gramSymmetricSync } from '../../../grading/linalg/gram.js';
import { leadingSymmetricEigen, leadingSymmetricEigenFull } from '../../../grading/linalg/symmetric-eigen.js';
import { NUMPY_MISSING, numpyAvailable, runNumpy, seeded } from './numpy-helper.js';

const EIGH = 'import sys, json, numpy as np\n'
  + 'o = json.load(sys.stdin); k = o["k"]\n'
  + 'A = np.array(o["a"]).reshape(k, k).T\n'
  + 'w, v = np.linalg.eigh(A)\n'
  + 'idx = np.argsort(w)[::-1][:o["r"]]\n'
  + 'print(json.dumps({"values": w[idx].tolist(), "vectors": v[:, idx].T.tolist()}))';

/** A well-conditioned symmetric test matrix: Gram matrix of seeded random snapshots with distinct leading eigenvalues. */
function gramCase(n: number, k: number, seed: number): Float64Array {
  const r = seeded(seed);
  const d = new Float64Array(n * k);
  for (let j = 0; j < k; j++) for (let t = 0; t < n; t++) d[j * n + t] = r() * (1 + 3 / (1 + t)) + 0.3 * Math.cos(0.1 * t * (j % 7));
  return gramSymmetricSync(d, n, k);
}

/** Q diag(λ) Qᵀ with a seeded orthogonal Q (product of reflectors) and given eigenvalues. */
function withSpectrum(lams: number[], seed: number): Float64Array {
  const k = lams.length;
  const r = seeded(seed);
  const a = new Float64Array(k * k);
  for (let i = 0; i < k; i++) a[i + i * k] = lams[i];
  for (let h = 0; h < 3; h++) {
    const v = Array.from({ length: k }, () => r());
    const vv = v.reduce((s, x) => s + x * x, 0);
    // A ← H A H with H = I − 2vvᵀ/vᵀv
    const av = new Float64Array(k);
    for (let j = 0; j < k; j++) for (let i = 0; i < k; i++) av[i] += a[i + j * k] * v[j];
    const vav = v.reduce((s, x, i) => s + x * av[i], 0);
    for (let j = 0; j < k; j++) {
      for (let i = 0; i < k; i++) {
        a[i + j * k] += (-2 * (av[i] * v[j] + v[i] * av[j])) / vv + (4 * vav * v[i] * v[j]) / (vv * vv);
      }
    }
  }
  for (let j = 0; j < k; j++) for (let i = 0; i < j; i++) a[i + j * k] = a[j + i * k] = 0.5 * (a[i + j * k] + a[j + i * k]);
  return a;
}

function column(v: Float64Array, k: number, c: number): Float64Array {
  return v.subarray(c * k, c * k + k);
}

function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i] * b[i];
  return s;
}

function expectOrthonormal(v: Float64Array, k: number, r: number, tol: number): void {
  for (let c = 0; c < r; c++) {
    for (let d = 0; d <= c; d++) {
      const x = dot(column(v, k, c), column(v, k, d));
      expect(Math.abs(x - (c === d ? 1 : 0))).toBeLessThan(tol);
    }
  }
}

/** Run a describe block's tests with MODEWRIGHT_WASM set as given (undefined: unset), restoring it afterwards. */
function withWasmSetting(value: string | undefined): void {
  let saved: string | undefined;
  beforeAll(() => {
    saved = process.env.MODEWRIGHT_WASM;
    if (value === undefined) delete process.env.MODEWRIGHT_WASM;
    else process.env.MODEWRIGHT_WASM = value;
  });
  afterAll(() => {
    if (saved === undefined) delete process.env.MODEWRIGHT_WASM;
    else process.env.MODEWRIGHT_WASM = saved;
  });
}

for (const [route, setting] of [['WebAssembly SIMD route', undefined], ['scalar route (MODEWRIGHT_WASM=0)', '0']] as const) describe.skipIf(!numpyAvailable())(`partial symmetric eigensolver, ${route} (Reference library: NumPy, numpy.linalg.eigh)`, () => {
  withWasmSetting(setting);
  it('runs on the route named', () => {
    expect(eigenKernels() !== null).toBe(setting === undefined);
  });
  for (const [n, k, r] of [[90, 60, 15], [300, 200, 50], [250, 121, 121], [40, 7, 3], [70, 33, 9], [500, 402, 101]] as const) {
    it(`leading ${r} of ${k}×${k}: eigenvalues to 1e-10 relative, eigenvectors up to sign`, () => {
      const a = gramCase(n, k, 1000 + k);
      const ours = leadingSymmetricEigen(a, k, r);
      const ref = runNumpy<{ values: number[]; vectors: number[][] }>(EIGH, { a: Array.from(a), k, r });
      const top = Math.abs(ref.values[0]);
      for (let c = 0; c < r; c++) {
        expect(Math.abs(ours.values[c] - ref.values[c])).toBeLessThanOrEqual(1e-10 * Math.max(Math.abs(ref.values[c]), 1e-6 * top));
      }
      // Vectors: compare where the eigenvalue is separated from its neighbours (gap ≥ 1e-6·‖A‖).
      for (let c = 0; c < r; c++) {
        const gapLo = c + 1 < ref.values.length ? ref.values[c] - ref.values[c + 1] : Infinity;
        const gapHi = c > 0 ? ref.values[c - 1] - ref.values[c] : Infinity;
        if (Math.min(gapLo, gapHi) < 1e-6 * top) continue;
        const x = Math.abs(dot(column(ours.vectors, k, c), ref.vectors[c]));
        expect(1 - x).toBeLessThan(1e-9);
      }
      expectOrthonormal(ours.vectors, k, r, 1e-12);
    });
  }

  it('a repeated eigenvalue: the values match and the returned vectors span the same invariant subspace', () => {
    const lams = [9, 5, 5, 5, 2, 1, 0.5, 0.25, 0.1, -1, -3];
    const a = withSpectrum(lams, 77);
    const k = lams.length, r = 5;
    const ours = leadingSymmetricEigen(a, k, r);
    const ref = runNumpy<{ values: number[]; vectors: number[][] }>(EIGH, { a: Array.from(a), k, r });
    for (let c = 0; c < r; c++) expect(ours.values[c]).toBeCloseTo(ref.values[c], 12);
    expectOrthonormal(ours.vectors, k, r, 1e-12);
    // Projection of our vectors 1..3 onto NumPy's 3-dimensional eigenspace of 5 keeps their norm.
    for (let c = 1; c <= 3; c++) {
      const ours_c = column(ours.vectors, k, c);
      let proj = 0;
      for (let q = 1; q <= 3; q++) proj += dot(ours_c, ref.vectors[q]) ** 2;
      expect(1 - proj).toBeLessThan(1e-10);
    }
  });

  it('a rank-deficient Gram matrix (n < k), all k pairs: values to 1e-12·λ₁ and an orthonormal basis', () => {
    const n = 12, k = 45;
    const a = gramCase(n, k, 31);
    const ours = leadingSymmetricEigen(a, k, k);
    const ref = runNumpy<{ values: number[]; vectors: number[][] }>(EIGH, { a: Array.from(a), k, r: k });
    for (let c = 0; c < k; c++) expect(Math.abs(ours.values[c] - ref.values[c])).toBeLessThan(1e-12 * ref.values[0]);
    expectOrthonormal(ours.vectors, k, k, 1e-11);
    // The leading n (nonzero) eigenvectors match NumPy's up to sign.
    for (let c = 0; c < n; c++) expect(1 - Math.abs(dot(column(ours.vectors, k, c), ref.vectors[c]))).toBeLessThan(1e-9);
  });

  it('an already tridiagonal (diagonal) matrix and a 1×1 matrix', () => {
    const lams = [3, -2, 7, 0, 1];
    const k = lams.length;
    const a = new Float64Array(k * k);
    lams.forEach((l, i) => (a[i + i * k] = l));
    const ours = leadingSymmetricEigen(a, k, k);
    const ref = runNumpy<{ values: number[]; vectors: number[][] }>(EIGH, { a: Array.from(a), k, r: k });
    for (let c = 0; c < k; c++) expect(Math.abs(ours.values[c] - ref.values[c])).toBeLessThan(4 * Number.EPSILON * 7);
    for (let c = 0; c < k; c++) expect(Math.abs(dot(column(ours.vectors, k, c), ref.vectors[c]))).toBeCloseTo(1, 14);
    const one = leadingSymmetricEigen(new Float64Array([4.5]), 1, 1);
    expect(Array.from(one.values)).toEqual([4.5]);
    expect(Array.from(one.vectors)).toEqual([1]);
  });
});

if (!numpyAvailable()) {
  describe('partial symmetric eigensolver against NumPy', () => {
    it.skip(NUMPY_MISSING, () => undefined);
  });
}

describe('partial symmetric eigensolver cross-checked with the full ml-matrix decomposition (Fact of the trade: common practice, no source — two correct solvers agree on well-separated eigenpairs)', () => {
  it('leading 40 of 150: same values (1e-10 relative) and vectors up to sign', () => {
    const k = 150, r = 40;
    const a = gramCase(220, k, 5);
    const p = leadingSymmetricEigen(a, k, r);
    const f = leadingSymmetricEigenFull(a, k, r);
    for (let c = 0; c < r; c++) {
      expect(Math.abs(p.values[c] - f.values[c])).toBeLessThanOrEqual(1e-10 * Math.abs(f.values[c]));
      expect(Math.abs(dot(column(p.vectors, k, c), column(f.vectors, k, c)))).toBeCloseTo(1, 9);
    }
  });

  it('refuses bad input with a message saying what is wrong', () => {
    expect(() => leadingSymmetricEigen(new Float64Array(4), 2, 3)).toThrow(/asked for 3 eigenpairs of a 2×2 matrix/);
    expect(() => leadingSymmetricEigen(new Float64Array([1, NaN, NaN, 1]), 2, 1)).toThrow(/entry \(1, 0\) is NaN/);
    expect(() => leadingSymmetricEigen(new Float64Array(3), 2, 1)).toThrow(/3 entries, expected 2×2/);
  });
});

describe('more eigenvalues than eigenvectors (valuesCount) (common practice, no source: the leading pairs must not depend on how many values are asked for)', () => {
  it('all 120 values with 12 vectors: values equal the all-pairs request, vectors the 12-pair request, bit for bit', () => {
    const k = 120, r = 12;
    const a = gramCase(90, k, 11); // rank-deficient (n < k): a large cluster of near-zero eigenvalues
    const some = leadingSymmetricEigen(a, k, r, k);
    const all = leadingSymmetricEigen(a, k, k);
    const few = leadingSymmetricEigen(a, k, r);
    expect(some.values.length).toBe(k);
    expect(some.vectors.length).toBe(k * r);
    expect(Array.from(some.values)).toEqual(Array.from(all.values));
    expect(Array.from(some.vectors)).toEqual(Array.from(few.vectors));
    expect(Array.from(some.vectors)).toEqual(Array.from(all.vectors.subarray(0, k * r)));
    expect(Array.from(leadingSymmetricEigen(a, k, 0, 5).values)).toEqual(Array.from(all.values.subarray(0, 5)));
  });

  it('refuses a values count below the vector count or above the size', () => {
    const a = withSpectrum([3, 2, 1], 4);
    expect(() => leadingSymmetricEigen(a, 3, 2, 1)).toThrow(/asked for 1 eigenvalues with 2 eigenvectors of a 3×3 matrix; expected 2 to 3/);
    expect(() => leadingSymmetricEigen(a, 3, 2, 4)).toThrow(/expected 2 to 3/);
  });
});

describe('WebAssembly SIMD and scalar routes of the eigensolver agree (common practice, no source: the same algorithm summed in two orders agrees to rounding)', () => {
  for (const [n, k, r] of [[50, 9, 9], [80, 64, 30], [400, 257, 77], [160, 150, 150]] as const) {
    it(`leading ${r} of ${k}×${k}: values to 1e-12 relative to λ₁, separated vectors to 1e-9 up to sign`, () => {
      const a = gramCase(n, k, 4000 + k);
      const saved = process.env.MODEWRIGHT_WASM;
      let simd, scalar;
      try {
        delete process.env.MODEWRIGHT_WASM;
        expect(eigenKernels()).not.toBeNull();
        simd = leadingSymmetricEigen(a, k, r);
        process.env.MODEWRIGHT_WASM = '0';
        expect(eigenKernels()).toBeNull();
        scalar = leadingSymmetricEigen(a, k, r);
      } finally {
        if (saved === undefined) delete process.env.MODEWRIGHT_WASM;
        else process.env.MODEWRIGHT_WASM = saved;
      }
      const top = Math.abs(scalar.values[0]);
      for (let c = 0; c < r; c++) expect(Math.abs(simd.values[c] - scalar.values[c])).toBeLessThanOrEqual(1e-12 * top);
      for (let c = 0; c < r; c++) {
        const gapLo = c + 1 < r ? scalar.values[c] - scalar.values[c + 1] : Infinity;
        const gapHi = c > 0 ? scalar.values[c - 1] - scalar.values[c] : Infinity;
        if (Math.min(gapLo, gapHi) < 1e-6 * top) continue;
        expect(1 - Math.abs(dot(column(simd.vectors, k, c), column(scalar.vectors, k, c)))).toBeLessThan(1e-9);
      }
      expectOrthonormal(simd.vectors, k, r, 1e-12);
    });
  }
});
