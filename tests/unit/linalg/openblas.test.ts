/**
 * The OpenBLAS backend (grading/linalg/openblas.ts and the addon in native/):
 * argument checks, agreement with the TypeScript backend to 1e-10 relative on
 * well-conditioned problems (kernel by kernel and method by method), calls from
 * a worker thread, the thread-count rule, backend selection.
 *
 * Where the addon is not built these tests are skipped with a message, unless
 * MODEWRIGHT_REQUIRE_OPENBLAS=1 (set by `npm test` after it built the addon),
 * which turns a missing addon into a failure.
 */
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { afterAll, afterEach, describe, expect, it } from 'vitest';
import { backend, chooseBackend, jsBackend, setBackend, type DenseBackend } from '../../../grading/linalg/backend.js';
import { ADDON_PATH, addonError, configureBlasThreads, loadAddon, openblasBackend } from '../../../grading/linalg/openblas.js';
import { closePool } from '../../../grading/linalg/pool.js';
import { exactDmd } from '../../../grading/methods/dmd.js';
import { edmd } from '../../../grading/methods/edmd.js';
import { kernelEdmd } from '../../../grading/methods/kernel-edmd.js';
import { toReferenceSpectrum } from '../../../grading/methods/reference.js';
import type { PairSource, SpectrumResult } from '../../../grading/methods/types.js';
import { referenceSpectrum } from '../../../shared/reference.js';
import { gaussianMatrix, linearTrajectory } from '../engine/helpers.js';

const lib = loadAddon();
const required = process.env.MODEWRIGHT_REQUIRE_OPENBLAS === '1';
const initial = backend();
afterEach(() => setBackend(initial));
afterAll(() => closePool());

it('the OpenBLAS addon is present when the test run requires it', () => {
  if (!lib && !required) console.warn(`SKIPPED (OpenBLAS backend tests): ${addonError()}`);
  if (required) expect(lib, `MODEWRIGHT_REQUIRE_OPENBLAS=1 but: ${addonError()}`).not.toBeNull();
});

const ob = lib ? openblasBackend(lib) : (null as unknown as ReturnType<typeof openblasBackend>);

/** max |a − b| / max |b| over two arrays of the same length. */
function relDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  expect(a.length).toBe(b.length);
  let d = 0, s = 0;
  for (let i = 0; i < a.length; i++) {
    d = Math.max(d, Math.abs(a[i] - b[i]));
    s = Math.max(s, Math.abs(b[i]));
  }
  return s > 0 ? d / s : d;
}

/** Symmetric k×k Q diag(λ) Qᵀ with well separated λ (1, 2, …, k scaled), Q from a Gram–Schmidt of a Gaussian matrix. */
function wellSeparatedSymmetric(k: number, seed: number): Float64Array {
  const q = gaussianMatrix(seed, k, k);
  for (let j = 0; j < k; j++) {
    for (let pass = 0; pass < 2; pass++) {
      for (let t = 0; t < j; t++) {
        let c = 0;
        for (let i = 0; i < k; i++) c += q[i + t * k] * q[i + j * k];
        for (let i = 0; i < k; i++) q[i + j * k] -= c * q[i + t * k];
      }
    }
    let nrm = 0;
    for (let i = 0; i < k; i++) nrm += q[i + j * k] ** 2;
    nrm = Math.sqrt(nrm);
    for (let i = 0; i < k; i++) q[i + j * k] /= nrm;
  }
  const a = new Float64Array(k * k);
  for (let t = 0; t < k; t++) {
    const lam = (t + 1) / k;
    for (let j = 0; j < k; j++) for (let i = 0; i < k; i++) a[i + j * k] += lam * q[i + t * k] * q[j + t * k];
  }
  for (let j = 0; j < k; j++) for (let i = 0; i < j; i++) a[i + j * k] = a[j + i * k];
  return a;
}

describe.skipIf(!lib)('OpenBLAS addon: argument checks (wrong type, wrong length, non-finite, bad sizes) throw, never crash', () => {
  // Common practice, no source: the contract of native/modewright_linalg.c.
  const d = new Float64Array(12);
  it('wrong type', () => {
    expect(() => lib!.gram([1, 2, 3] as unknown as Float64Array, 3, 1, new Float64Array(1))).toThrow(/D must be a Float64Array/);
    expect(() => lib!.gram(new Float32Array(12) as unknown as Float64Array, 4, 3, new Float64Array(9))).toThrow(TypeError);
    expect(() => lib!.cross(d, 'x' as unknown as Float64Array, 4, 3, 3, new Float64Array(9))).toThrow(/B must be a Float64Array/);
    expect(() => lib!.product(d, 4, 3, d, '3' as unknown as number, new Float64Array(12))).toThrow(/s must be a number/);
    expect(() => (lib!.gram as unknown as (...a: unknown[]) => void)(d, 4)).toThrow(/expected 4 arguments, got 2/);
  });
  it('wrong length', () => {
    expect(() => lib!.gram(d, 5, 3, new Float64Array(9))).toThrow(/gram: D has 12 entries; a 5×3 matrix needs 15/);
    expect(() => lib!.gram(d, 4, 3, new Float64Array(8))).toThrow(/out has 8 entries; a 3×3 matrix needs 9/);
    expect(() => lib!.product(d, 4, 3, new Float64Array(5), 2, new Float64Array(8))).toThrow(/B has 5 entries; a 3×2 matrix needs 6/);
    expect(() => lib!.symmetricEigen(new Float64Array(8), 3, 1, 1, new Float64Array(1), new Float64Array(3))).toThrow(/A has 8 entries; a 3×3/);
    expect(() => lib!.generalEigen(new Float64Array(9), 3, new Float64Array(2), new Float64Array(3), null, null)).toThrow(/wr has 2 entries/);
    expect(() => lib!.svd(new Float64Array(6), 3, 2, new Float64Array(2), new Float64Array(5), new Float64Array(4))).toThrow(/u has 5 entries; a 3×2/);
    expect(() => lib!.leastSquares(new Float64Array(6), 3, 2, new Float64Array(2), 1, -1, new Float64Array(2), new Float64Array(2))).toThrow(/B has 2 entries/);
    // Longer views are fine (pooled working arrays are often larger than the matrix).
    expect(() => lib!.gram(new Float64Array(20), 4, 3, new Float64Array(9))).not.toThrow();
  });
  it('non-finite entries, located', () => {
    const bad = new Float64Array(12).fill(1);
    bad[6] = Number.NaN;
    expect(() => lib!.gram(bad, 4, 3, new Float64Array(9))).toThrow(/D has a non-finite entry \(nan at row 3, column 2 of 4×3\)/);
    bad[6] = Number.POSITIVE_INFINITY;
    expect(() => lib!.cross(d, bad, 4, 3, 3, new Float64Array(9))).toThrow(/B has a non-finite entry \(inf at row 3, column 2/);
    const sym = new Float64Array(9).fill(1);
    sym[5] = Number.NaN; // row 3, column 2: lower triangle, read
    expect(() => lib!.symmetricEigen(sym, 3, 1, 1, new Float64Array(1), new Float64Array(3))).toThrow(/non-finite entry \(nan at row 3, column 2/);
    expect(() => lib!.generalEigen(sym, 3, new Float64Array(3), new Float64Array(3), null, null)).toThrow(RangeError);
    expect(() => lib!.svd(sym, 3, 3, new Float64Array(3), new Float64Array(9), new Float64Array(9))).toThrow(/non-finite/);
    expect(() => lib!.leastSquares(new Float64Array(3).fill(1), 3, 1, Float64Array.of(1, Number.NaN, 1), 1, -1, new Float64Array(1), new Float64Array(1))).toThrow(/B has a non-finite entry/);
  });
  it('bad sizes and options', () => {
    expect(() => lib!.gram(d, -1, 3, new Float64Array(9))).toThrow(/n must be a non-negative integer/);
    expect(() => lib!.gram(d, 4, 2.5, new Float64Array(9))).toThrow(RangeError);
    expect(() => lib!.symmetricEigen(new Float64Array(9), 3, 2, 1, new Float64Array(2), new Float64Array(6))).toThrow(/expected r ≤ valuesCount ≤ k/);
    expect(() => lib!.leastSquares(new Float64Array(3), 3, 1, new Float64Array(3), 1, Number.NaN, new Float64Array(1), new Float64Array(1))).toThrow(/rcond/);
    expect(() => lib!.setThreads(0)).toThrow(/between 1 and 1024/);
  });
  it('firstNonFinite: the first NaN or ±Inf at any position (around the 8-wide unrolling), -1 when all are finite; same answers as the TypeScript scan', () => {
    for (const len of [0, 1, 7, 8, 9, 15, 16, 17, 1000]) {
      const x = new Float64Array(len + 3).map((_, i) => Math.sin(i) * 1e300);
      x[len + 1] = Number.NaN; // beyond `length`: never looked at
      expect(lib!.firstNonFinite(x, len)).toBe(-1);
      expect(jsBackend.firstNonFinite(x, len)).toBe(-1);
      for (const at of new Set([0, len - 1, len >> 1, len - 2].filter((i) => i >= 0 && i < len))) {
        for (const bad of [Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY]) {
          const y = x.slice();
          y[at] = bad;
          if (at + 1 < len) y[len - 1] = Number.NaN; // a later one does not hide the first
          expect(lib!.firstNonFinite(y, len)).toBe(at);
          expect(jsBackend.firstNonFinite(y, len)).toBe(at);
        }
      }
    }
    // ±1e308 · 0 is 0: large finite values are not mistaken for overflow.
    expect(lib!.firstNonFinite(Float64Array.of(1.7e308, -1.7e308, 5e-324), 3)).toBe(-1);
    expect(() => lib!.firstNonFinite(new Float64Array(2), 3)).toThrow(/x has 2 entries/);
    expect(() => lib!.firstNonFinite([1] as unknown as Float64Array, 1)).toThrow(TypeError);
  });
  it('the backend methods pass the checks on (a non-finite reduced operator is refused, not decomposed)', () => {
    expect(() => ob.generalEigen(Float64Array.of(1, Number.NaN, 0, 1), 2)).toThrow(/generalEigen: A has a non-finite entry/);
    expect(() => ob.eigenvalues(new Float64Array(3), 2)).toThrow(/A has 3 entries; a 2×2 matrix needs 4/);
  });
});

describe.skipIf(!lib)('OpenBLAS and TypeScript backends agree to 1e-10 relative on well-conditioned problems', () => {
  // Reference: the TypeScript backend (itself tested against NumPy/SciPy in the other files here).
  it('Gram, cross and plain products (sizes across the blocking edges)', async () => {
    for (const [n, k, kb] of [[1, 1, 1], [7, 5, 3], [130, 41, 17], [1000, 64, 33]]) {
      const a = gaussianMatrix(n * 7 + k, n, k);
      const b = gaussianMatrix(n * 3 + kb, n, kb);
      const g = await ob.gram(a, n, k);
      expect(relDiff(g, await jsBackend.gram(a, n, k))).toBeLessThan(1e-13);
      for (let j = 0; j < k; j++) for (let i = 0; i < j; i++) expect(g[i + j * k]).toBe(g[j + i * k]); // exactly symmetric
      expect(relDiff(await ob.cross(a, b, n, k, kb), await jsBackend.cross(a, b, n, k, kb))).toBeLessThan(1e-13);
      const c = gaussianMatrix(kb + 1, k, kb);
      expect(relDiff(await ob.product(a, n, k, c, kb), await jsBackend.product(a, n, k, c, kb))).toBeLessThan(1e-13);
    }
  });
  it('leading symmetric eigenpairs (partial route, all-vectors route, extra values without vectors; orders on both sides of the two-thread reduction)', () => {
    for (const [k, r, vc] of [[1, 1, 1], [6, 2, 6], [60, 15, 15], [60, 15, 60], [120, 100, 120], [200, 20, 150], [700, 60, 100], [700, 200, 200]]) {
      const a = wellSeparatedSymmetric(k, k + r);
      const mine = ob.symmetricEigen(a, k, r, vc);
      const ref = jsBackend.symmetricEigen(a, k, r, vc);
      expect(relDiff(mine.values, ref.values), `${k}/${r}/${vc} values`).toBeLessThan(1e-10);
      // Both normalise signs the same way (largest entry positive): vectors compare directly.
      expect(relDiff(mine.vectors, ref.vectors), `${k}/${r}/${vc} vectors`).toBeLessThan(1e-8);
      for (let i = 1; i < vc; i++) expect(mine.values[i]).toBeLessThanOrEqual(mine.values[i - 1]);
    }
  });
  it('general eigen: values, right vectors up to a phase, WᴴV = I, κ; eigenvalues-only gives the same values', () => {
    for (const k of [1, 2, 9, 40, 100]) {
      const a = gaussianMatrix(500 + k, k, k);
      const mine = ob.generalEigen(a, k);
      const ref = jsBackend.generalEigen(a, k);
      const key = (re: Float64Array, im: Float64Array) =>
        Array.from(re, (x, i) => [x, im[i], i] as const).sort((p, q) => p[0] - q[0] || p[1] - q[1]);
      const km = key(mine.valuesRe, mine.valuesIm), kr = key(ref.valuesRe, ref.valuesIm);
      let scale = 0;
      for (const v of kr) scale = Math.max(scale, Math.hypot(v[0], v[1]));
      for (let t = 0; t < k; t++) {
        expect(Math.hypot(km[t][0] - kr[t][0], km[t][1] - kr[t][1]) / scale).toBeLessThan(1e-10);
        const i = km[t][2], j = kr[t][2];
        // |v_iᴴ v'_j| = 1 for unit vectors of the same simple eigenvalue; κ the same.
        let dr = 0, di = 0;
        for (let s = 0; s < k; s++) {
          const ar = mine.right.re[s + i * k], ai = mine.right.im[s + i * k], br = ref.right.re[s + j * k], bi = ref.right.im[s + j * k];
          dr += ar * br + ai * bi;
          di += ar * bi - ai * br;
        }
        expect(Math.abs(Math.hypot(dr, di) - 1)).toBeLessThan(1e-9);
        expect(Math.abs(mine.condition[i] - ref.condition[j]) / ref.condition[j]).toBeLessThan(1e-8);
      }
      // Wᴴ V = I and exact conjugate pairs, positive imaginary part first.
      for (let i = 0; i < k; i++) {
        for (let j = 0; j < k; j++) {
          let sr = 0, si = 0;
          for (let s = 0; s < k; s++) {
            const wr = mine.left.re[s + i * k], wi = mine.left.im[s + i * k], vr = mine.right.re[s + j * k], vi = mine.right.im[s + j * k];
            sr += wr * vr + wi * vi;
            si += wr * vi - wi * vr;
          }
          expect(Math.hypot(sr - (i === j ? 1 : 0), si)).toBeLessThan(1e-10 * Math.max(1, mine.condition[i] * mine.condition[j]));
        }
        if (mine.valuesIm[i] > 0) {
          expect(mine.valuesRe[i + 1]).toBe(mine.valuesRe[i]);
          expect(mine.valuesIm[i + 1]).toBe(-mine.valuesIm[i]);
          i++;
        }
      }
      const only = ob.eigenvalues(a, k);
      expect(relDiff(only.re, mine.valuesRe)).toBeLessThan(1e-12);
      expect(relDiff(only.im, mine.valuesIm)).toBeLessThan(1e-12);
    }
  });
  it('a defective matrix (Jordan block): both backends report its eigenvalue as undetermined (κ ≥ 1e14 or infinite)', () => {
    const j = Float64Array.of(2, 0, 1, 2); // [[2, 1], [0, 2]] column-major
    // LAPACK's left and right vectors are orthogonal to round-off (κ ≈ 1/ε, finite); the TypeScript
    // backend finds the block-form eigenvector basis exactly singular (κ = ∞).
    for (const c of [ob.generalEigen(j, 2).condition, jsBackend.generalEigen(j, 2).condition]) {
      for (const x of c) expect(x).toBeGreaterThan(1e14);
    }
  });
  it('thin SVD, tall and wide', () => {
    for (const [rows, cols] of [[50, 12], [12, 50], [30, 30]]) {
      const a = gaussianMatrix(rows + 2 * cols, rows, cols);
      const mine = ob.svd(a, rows, cols);
      const ref = jsBackend.svd(a, rows, cols);
      expect(relDiff(mine.s, ref.s)).toBeLessThan(1e-12);
      // U Σ Vᵀ rebuilds A
      let worst = 0;
      for (let j = 0; j < cols; j++) {
        for (let i = 0; i < rows; i++) {
          let s = 0;
          for (let t = 0; t < mine.k; t++) s += mine.u[i + t * rows] * mine.s[t] * mine.v[j + t * cols];
          worst = Math.max(worst, Math.abs(s - a[i + j * rows]));
        }
      }
      expect(worst / mine.s[0]).toBeLessThan(1e-13);
    }
  });
  it('least squares: the same solution as the normal equations on a well-conditioned problem; rank of dependent columns', () => {
    const rows = 80, cols = 6;
    const a = gaussianMatrix(31, rows, cols);
    const b = gaussianMatrix(32, rows, 2);
    const { x, rank, singularValues } = ob.leastSquares(a, rows, cols, b, 2);
    expect(rank).toBe(cols);
    expect(singularValues.length).toBe(cols);
    // AᵀA x = Aᵀb (common practice, no source)
    for (let c = 0; c < 2; c++) {
      for (let i = 0; i < cols; i++) {
        let lhs = 0, rhs = 0;
        for (let t = 0; t < rows; t++) {
          let ax = 0;
          for (let j = 0; j < cols; j++) ax += a[t + j * rows] * x[j + c * cols];
          lhs += a[t + i * rows] * ax;
          rhs += a[t + i * rows] * b[t + c * rows];
        }
        expect(Math.abs(lhs - rhs)).toBeLessThan(1e-10 * Math.max(1, Math.abs(rhs)));
      }
    }
    const dep = new Float64Array(rows * 3);
    dep.set(a.subarray(0, 2 * rows));
    for (let t = 0; t < rows; t++) dep[t + 2 * rows] = a[t] + a[t + rows];
    expect(ob.leastSquares(dep, rows, 3, b, 1, 1e-12).rank).toBe(2);
    expect(ob.leastSquares(a, rows, cols, b, 1, 1e-12).rank).toBe(cols);
  });
});

/** A linear map with known, well separated eigenvalues (0.95e^{±0.3i}, 0.8e^{±1.1i}, 0.6, −0.4), and a trajectory of it. */
function linearSource(): PairSource {
  const blocks: number[][] = [];
  const rot = (r: number, t: number) => [[r * Math.cos(t), -r * Math.sin(t)], [r * Math.sin(t), r * Math.cos(t)]];
  const a = Array.from({ length: 6 }, () => new Array<number>(6).fill(0));
  const r1 = rot(0.95, 0.3), r2 = rot(0.8, 1.1);
  for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) { a[i][j] = r1[i][j]; a[2 + i][2 + j] = r2[i][j]; }
  a[4][4] = 0.6;
  a[5][5] = -0.4;
  // Mix the coordinates with a fixed well-conditioned change of basis S: S A S⁻¹ with S = I + 0.3·(upper ones).
  const s = Array.from({ length: 6 }, (_, i) => Array.from({ length: 6 }, (_, j) => (i === j ? 1 : j > i ? 0.3 : 0)));
  const sInv = Array.from({ length: 6 }, () => new Array<number>(6).fill(0));
  for (let c = 0; c < 6; c++) {
    const e = new Array<number>(6).fill(0);
    e[c] = 1;
    for (let i = 5; i >= 0; i--) {
      let v = e[i];
      for (let j = i + 1; j < 6; j++) v -= s[i][j] * sInv[j][c];
      sInv[i][c] = v;
    }
  }
  const mul = (x: number[][], y: number[][]) => x.map((row) => y[0].map((_, j) => row.reduce((acc, v, t) => acc + v * y[t][j], 0)));
  blocks.push(...mul(mul(s, a), sInv));
  return { kind: 'trajectory', snapshots: linearTrajectory(blocks, [1, 0.5, -0.3, 0.8, 1.2, -0.7], 60) };
}

function sortedValues(res: SpectrumResult): [number, number][] {
  return res.eigenvalues.map((e) => [e.lambda.re, e.lambda.im] as [number, number]).sort((p, q) => p[0] - q[0] || p[1] - q[1]);
}

async function onBoth<T>(f: () => Promise<T>): Promise<[T, T]> {
  setBackend(jsBackend);
  const ts = await f();
  setBackend(ob as DenseBackend);
  const native = await f();
  setBackend(initial);
  return [ts, native];
}

describe.skipIf(!lib)('the three methods give the same spectra on both backends (1e-10 relative, well-conditioned data)', () => {
  // Reference: the analytic eigenvalues of the map (checked to 1e-8 in tests/unit/engine) and the other backend.
  const cases: [string, () => Promise<SpectrumResult>][] = [
    ['exact DMD, method of snapshots', () => exactDmd(linearSource(), { truncation: { kind: 'rank', rank: 6 }, svd: 'snapshots' })],
    ['exact DMD, direct SVD', () => exactDmd(linearSource(), { truncation: { kind: 'rank', rank: 6 }, svd: 'direct' })],
    ['EDMD, monomials of degree 1', () => edmd(linearSource(), { dictionary: { kind: 'monomial', degree: 1 } })],
    ['kernel EDMD, linear kernel', () => kernelEdmd(linearSource(), { kernel: { kind: 'linear' }, truncation: { kind: 'rank', rank: 6 } })],
  ];
  for (const [name, run] of cases) {
    it(name, async () => {
      const [ts, native] = await onBoth(run);
      const a = sortedValues(ts), b = sortedValues(native);
      expect(b.length).toBe(a.length);
      for (let i = 0; i < a.length; i++) {
        const mag = Math.max(Math.hypot(a[i][0], a[i][1]), 1e-300);
        expect(Math.hypot(a[i][0] - b[i][0], a[i][1] - b[i][1]) / mag, `${name}: λ ${a[i]}`).toBeLessThan(1e-10);
      }
      // The map's eigenvalues are found (every method here spans the linear functions).
      for (const [re, im] of [[0.95 * Math.cos(0.3), 0.95 * Math.sin(0.3)], [0.6, 0], [-0.4, 0]]) {
        expect(Math.min(...b.map((v) => Math.hypot(v[0] - re, v[1] - im)))).toBeLessThan(1e-9);
      }
    });
  }
});

describe.skipIf(!lib)('threads', () => {
  it('the addon runs in a worker thread (where the engine runs), while this thread stays free', async () => {
    const path = fileURLToPath(new URL(ADDON_PATH, new URL('../../../grading/linalg/openblas.ts', import.meta.url)));
    const code = `
      const { parentPort } = require('node:worker_threads');
      const lib = require(${JSON.stringify(path)});
      lib.setThreads(1);
      const n = 300, k = 200, d = new Float64Array(n * k);
      for (let i = 0; i < d.length; i++) d[i] = Math.sin(i);
      const out = new Float64Array(k * k);
      lib.gram(d, n, k, out);
      let err = '';
      try { lib.gram(d, n + 1, k, out); } catch (e) { err = e.message; }
      parentPort.postMessage({ trace: out.reduce((s, v, i) => (i % (k + 1) === 0 ? s + v : s), 0), err });`;
    const worker = new Worker(code, { eval: true });
    let ticks = 0;
    const timer = setInterval(() => ticks++, 1);
    const msg = await new Promise<{ trace: number; err: string }>((resolve, reject) => {
      worker.once('message', resolve);
      worker.once('error', reject);
    });
    clearInterval(timer);
    await worker.terminate();
    let expected = 0;
    for (let i = 0; i < 300 * 200; i++) expected += Math.sin(i) ** 2;
    expect(Math.abs(msg.trace - expected) / expected).toBeLessThan(1e-12);
    expect(msg.err).toMatch(/gram: D has 60000 entries; a 301×200 matrix needs 60200/);
  });
  it('OpenBLAS thread count: max(1, ⌊cores / engine workers⌋), MODEWRIGHT_BLAS_THREADS overrides', () => {
    const cores = availableParallelism();
    const before = process.env.MODEWRIGHT_BLAS_THREADS;
    try {
      delete process.env.MODEWRIGHT_BLAS_THREADS;
      expect(configureBlasThreads(1)).toBe(Math.min(cores, 64));
      expect(configureBlasThreads(cores)).toBe(1);
      expect(configureBlasThreads(cores * 4)).toBe(1);
      process.env.MODEWRIGHT_BLAS_THREADS = '1';
      expect(configureBlasThreads(1)).toBe(1);
    } finally {
      if (before === undefined) delete process.env.MODEWRIGHT_BLAS_THREADS;
      else process.env.MODEWRIGHT_BLAS_THREADS = before;
      configureBlasThreads();
    }
  });
});

describe('backend selection (MODEWRIGHT_LINALG)', () => {
  it('typescript forces the TypeScript kernels; an unknown name is refused; openblas loads the addon or says why', () => {
    expect(chooseBackend('typescript')).toBe(jsBackend);
    expect(() => chooseBackend('cuda')).toThrow(/MODEWRIGHT_LINALG must be "typescript" or "openblas", got "cuda"/);
    if (lib) expect(chooseBackend('openblas').name).toBe('openblas');
    else expect(() => chooseBackend('openblas')).toThrow(/OpenBLAS addon is not available/);
    expect(['typescript', 'openblas']).toContain(chooseBackend(undefined).name);
  });
  it('every reference spectrum records the backend that computed it', async () => {
    const run = () => kernelEdmd(linearSource(), { kernel: { kind: 'linear' }, truncation: { kind: 'rank', rank: 6 }, rankBand: false });
    setBackend(jsBackend);
    const ref = toReferenceSpectrum(await run());
    expect(referenceSpectrum.parse(ref).backend).toBe('typescript');
    if (lib) {
      setBackend(ob as DenseBackend);
      expect(toReferenceSpectrum(await run()).backend).toBe('openblas');
    }
  });
});
