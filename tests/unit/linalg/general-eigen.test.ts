import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { linearSumAssignment } from 'linear-sum-assignment';
import { describe, expect, it } from 'vitest';
import { cadjoint, cinverse, columnNorm, complexFromReal, type ComplexMatrix } from '../../../grading/linalg/complex.js';
import { eigenvaluesOnly, generalEigen, rightEigen, rightEigenMlMatrix, type GeneralEigen } from '../../../grading/linalg/eigen.js';
import { EigenConvergenceError, realEigen } from '../../../grading/linalg/real-eigen.js';
import { seeded } from './numpy-helper.js';

// Reference library: numpy.linalg.eig and scipy.linalg.eig(A, left=True, right=True) run through
// python3 on the same bytes (tests/oracle/eig_oracle.py); eigenvalues matched by optimal assignment
// (linear-sum-assignment) on |λ − λ_ref|, never by position.
const ORACLE = join(__dirname, '..', '..', 'oracle', 'eig_oracle.py');
const HAVE_SCIPY = spawnSync('python3', ['-c', 'import numpy, scipy'], { encoding: 'utf8' }).status === 0;
if (!HAVE_SCIPY) console.warn('SKIPPED: python3 with NumPy/SciPy is not available on this machine; the reference-library comparison cannot run');

interface Oracle {
  np_re: number[];
  np_im: number[];
  re: number[];
  im: number[];
  vr_re: number[];
  vr_im: number[];
  vl_re: number[];
  vl_im: number[];
  kappa: (number | null)[];
}

function runOracle(cases: { k: number; a: Float64Array }[]): Oracle[] {
  const input = JSON.stringify(cases.map((c) => ({ k: c.k, a: Array.from(c.a) })));
  const r = spawnSync('python3', [ORACLE], { input, encoding: 'utf8', maxBuffer: 256 << 20 });
  if (r.status !== 0) throw new Error(`eig_oracle.py failed: ${r.stderr}`);
  return JSON.parse(r.stdout) as Oracle[];
}

// ---------------------------------------------------------------- test matrices (column-major)

/** Seeded entries uniform in [−0.5, 0.5). */
function dense(k: number, seed: number): Float64Array {
  const r = seeded(seed);
  return Float64Array.from({ length: k * k }, () => r());
}

function symmetric(k: number, seed: number): Float64Array {
  const b = dense(k, seed);
  const a = new Float64Array(k * k);
  for (let j = 0; j < k; j++) for (let i = 0; i < k; i++) a[i + j * k] = 0.5 * (b[i + j * k] + b[j + i * k]);
  return a;
}

/** Upper triangular with diagonal 1, 2, …, k and seeded entries above it. */
function upperTriangular(k: number, seed: number): Float64Array {
  const b = dense(k, seed);
  const a = new Float64Array(k * k);
  for (let j = 0; j < k; j++) {
    for (let i = 0; i < j; i++) a[i + j * k] = b[i + j * k];
    a[j + j * k] = j + 1;
  }
  return a;
}

/** Product of three seeded Householder reflectors (orthogonal, column-major). */
function orthogonal(k: number, seed: number): Float64Array {
  const r = seeded(seed);
  const q = new Float64Array(k * k);
  for (let i = 0; i < k; i++) q[i + i * k] = 1;
  for (let h = 0; h < 3; h++) {
    const v = Array.from({ length: k }, () => r());
    const vv = v.reduce((s, x) => s + x * x, 0);
    // Q ← Q (I − 2 v vᵀ / vᵀv)
    for (let i = 0; i < k; i++) {
      let s = 0;
      for (let t = 0; t < k; t++) s += q[i + t * k] * v[t];
      for (let t = 0; t < k; t++) q[i + t * k] -= (2 * s * v[t]) / vv;
    }
  }
  return q;
}

function matmul(a: Float64Array, b: Float64Array, k: number): Float64Array {
  const c = new Float64Array(k * k);
  for (let j = 0; j < k; j++) for (let t = 0; t < k; t++) for (let i = 0; i < k; i++) c[i + j * k] += a[i + t * k] * b[t + j * k];
  return c;
}

function transpose(a: Float64Array, k: number): Float64Array {
  const t = new Float64Array(k * k);
  for (let j = 0; j < k; j++) for (let i = 0; i < k; i++) t[j + i * k] = a[i + j * k];
  return t;
}

/** Q B Qᵀ with B block diagonal: rotation generators [[0, −ω], [ω, 0]] (ω = 0.5, 0.8, …) and a trailing 0.25 for odd k. Eigenvalues ±iω. */
function rotationBlocks(k: number, seed: number): { a: Float64Array; omegas: number[] } {
  const b = new Float64Array(k * k);
  const omegas: number[] = [];
  for (let j = 0; j + 1 < k; j += 2) {
    const w = 0.5 + 0.3 * (j / 2);
    omegas.push(w);
    b[j + 1 + j * k] = w;
    b[j + (j + 1) * k] = -w;
  }
  if (k % 2 === 1) b[k * k - 1] = 0.25;
  const q = orthogonal(k, seed);
  return { a: matmul(matmul(q, b, k), transpose(q, k), k), omegas };
}

/** S D S⁻¹ with S = I + 0.3·(seeded) and D = diag(values): a non-normal matrix with a prescribed (possibly repeated) spectrum. */
function withSpectrum(values: number[], seed: number): Float64Array {
  const k = values.length;
  const s = dense(k, seed);
  for (let t = 0; t < k * k; t++) s[t] *= 0.3;
  for (let i = 0; i < k; i++) s[i + i * k] += 1;
  const d = new Float64Array(k * k);
  values.forEach((v, i) => (d[i + i * k] = v));
  const sInv = cinverse(complexFromReal(s, k, k)).re;
  return matmul(matmul(s, d, k), sInv, k);
}

/** B C with B k×(k−1), C (k−1)×k seeded: rank k−1, so one eigenvalue is 0. */
function rankDeficient(k: number, seed: number): Float64Array {
  const b = dense(k, seed);
  const c = dense(k, seed + 1);
  for (let i = 0; i < k; i++) b[i + (k - 1) * k] = 0; // last column of B zero
  return matmul(b, c, k);
}

// ---------------------------------------------------------------- measures

function frobenius(a: Float64Array): number {
  let s = 0;
  for (const x of a) s += x * x;
  return Math.sqrt(s);
}

/** Optimal assignment of ours to ref on |λ − λ_ref|; returns for each of ours its index in ref. */
function matchTo(oursRe: ArrayLike<number>, oursIm: ArrayLike<number>, refRe: number[], refIm: number[]): number[] {
  const cost = Array.from(oursRe, (r, i) => refRe.map((rr, j) => Math.hypot(r - rr, oursIm[i] - refIm[j])));
  return Array.from(linearSumAssignment(cost, { maximaze: false }).rowAssignments, Number);
}

/** max_j ‖A v_j − λ_j v_j‖ / (‖A‖_F ‖v_j‖). */
function rightResidual(a: Float64Array, k: number, e: GeneralEigen): number {
  const scale = frobenius(a) || 1;
  let worst = 0;
  for (let j = 0; j < k; j++) {
    const lr = e.valuesRe[j];
    const li = e.valuesIm[j];
    let s = 0;
    for (let i = 0; i < k; i++) {
      let xr = 0;
      let xi = 0;
      for (let t = 0; t < k; t++) {
        xr += a[i + t * k] * e.right.re[t + j * k];
        xi += a[i + t * k] * e.right.im[t + j * k];
      }
      const vr = e.right.re[i + j * k];
      const vi = e.right.im[i + j * k];
      s += (xr - (lr * vr - li * vi)) ** 2 + (xi - (lr * vi + li * vr)) ** 2;
    }
    worst = Math.max(worst, Math.sqrt(s) / (scale * columnNorm(e.right, j)));
  }
  return worst;
}

/** max_j ‖w_jᴴ A − λ_j w_jᴴ‖ / (‖A‖_F ‖w_j‖). */
function leftResidual(a: Float64Array, k: number, e: GeneralEigen): number {
  const scale = frobenius(a) || 1;
  let worst = 0;
  for (let j = 0; j < k; j++) {
    const lr = e.valuesRe[j];
    const li = e.valuesIm[j];
    let s = 0;
    for (let i = 0; i < k; i++) {
      // (w_jᴴ A)_i = Σ_t conj(w_tj) a_ti
      let xr = 0;
      let xi = 0;
      for (let t = 0; t < k; t++) {
        xr += e.left.re[t + j * k] * a[t + i * k];
        xi -= e.left.im[t + j * k] * a[t + i * k];
      }
      const wr = e.left.re[i + j * k];
      const wi = -e.left.im[i + j * k];
      s += (xr - (lr * wr - li * wi)) ** 2 + (xi - (lr * wi + li * wr)) ** 2;
    }
    worst = Math.max(worst, Math.sqrt(s) / (scale * columnNorm(e.left, j)));
  }
  return worst;
}

/** max |(Wᴴ V − I)_ij|. */
function biorthogonality(e: GeneralEigen, k: number): number {
  let worst = 0;
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      let sr = 0;
      let si = 0;
      for (let t = 0; t < k; t++) {
        const wr = e.left.re[t + i * k];
        const wi = e.left.im[t + i * k];
        const vr = e.right.re[t + j * k];
        const vi = e.right.im[t + j * k];
        sr += wr * vr + wi * vi;
        si += wr * vi - wi * vr;
      }
      worst = Math.max(worst, Math.hypot(sr - (i === j ? 1 : 0), si));
    }
  }
  return worst;
}

/** |⟨x, y⟩| / (‖x‖‖y‖) for column jx of (xr, xi) and column jy of (yr, yi), both k-vectors. */
function alignment(xr: ArrayLike<number>, xi: ArrayLike<number>, jx: number, yr: ArrayLike<number>, yi: ArrayLike<number>, jy: number, k: number): number {
  let sr = 0;
  let si = 0;
  let nx = 0;
  let ny = 0;
  for (let t = 0; t < k; t++) {
    const ar = xr[t + jx * k];
    const ai = xi[t + jx * k];
    const br = yr[t + jy * k];
    const bi = yi[t + jy * k];
    sr += ar * br + ai * bi;
    si += ar * bi - ai * br;
    nx += ar * ar + ai * ai;
    ny += br * br + bi * bi;
  }
  return Math.hypot(sr, si) / Math.sqrt(nx * ny);
}

/** The block structure promised by generalEigen: pairs exact conjugates (positive imaginary part first), real values with real vectors, unit right vectors. */
function expectContract(e: GeneralEigen, k: number): void {
  let j = 0;
  while (j < k) {
    const o = j * k;
    expect(Math.abs(columnNorm(e.right, j) - 1)).toBeLessThan(1e-14);
    if (e.valuesIm[j] !== 0) {
      expect(e.valuesIm[j]).toBeGreaterThan(0);
      expect(j + 1).toBeLessThan(k);
      expect(e.valuesRe[j + 1]).toBe(e.valuesRe[j]);
      expect(e.valuesIm[j + 1]).toBe(-e.valuesIm[j]);
      for (let i = 0; i < k; i++) {
        expect(e.right.re[o + k + i]).toBe(e.right.re[o + i]);
        expect(e.right.im[o + k + i]).toBe(-e.right.im[o + i]);
        expect(e.left.re[o + k + i]).toBe(e.left.re[o + i]);
        expect(e.left.im[o + k + i]).toBe(-e.left.im[o + i]);
      }
      expect(e.condition[j + 1]).toBe(e.condition[j]);
      j += 2;
    } else {
      for (let i = 0; i < k; i++) {
        expect(e.right.im[o + i]).toBe(0);
        expect(e.left.im[o + i]).toBe(0);
      }
      j += 1;
    }
  }
}

// ---------------------------------------------------------------- cases

interface Case {
  label: string;
  k: number;
  a: Float64Array;
  /** Simple, well-separated eigenvalues: compare κ and eigenvectors with SciPy. */
  simple: boolean;
}

const rot8 = rotationBlocks(8, 71);
const rot37 = rotationBlocks(37, 72);
const CASES: Case[] = [
  ...[1, 2, 5, 37, 100, 150].map((k) => ({ label: `random dense ${k}×${k}`, k, a: dense(k, 1000 + k), simple: true })),
  ...[5, 37, 100].map((k) => ({ label: `symmetric ${k}×${k}`, k, a: symmetric(k, 2000 + k), simple: true })),
  ...[5, 12].map((k) => ({ label: `upper triangular ${k}×${k} (diagonal 1…${k})`, k, a: upperTriangular(k, 3000 + k), simple: true })),
  { label: 'repeated eigenvalue (2 three times, non-normal) 7×7', k: 7, a: withSpectrum([2, 2, 2, -1, 0.5, 3, -0.25], 4001), simple: false },
  { label: 'rotation blocks, purely imaginary pairs 8×8', k: 8, a: rot8.a, simple: true },
  { label: 'rotation blocks, purely imaginary pairs and 0.25, 37×37', k: 37, a: rot37.a, simple: true },
  { label: 'zero matrix 5×5', k: 5, a: new Float64Array(25), simple: false },
  ...[6, 37].map((k) => ({ label: `rank ${k - 1} of ${k}: eigenvalue 0`, k, a: rankDeficient(k, 5000 + k), simple: true })),
];

describe.skipIf(!HAVE_SCIPY)('general eigensolver against NumPy/SciPy (Reference library: numpy.linalg.eig, scipy.linalg.eig with left and right vectors)', () => {
  const oracle = HAVE_SCIPY ? runOracle(CASES) : [];
  CASES.forEach((c, ci) => {
    it(`${c.label}: eigenvalues, residuals, Wᴴ V = I, κ, pair contract`, () => {
      const { k, a } = c;
      const o = oracle[ci];
      const e = generalEigen(a, k);
      expectContract(e, k);
      const norm = frobenius(a);
      // Eigenvalues matched to numpy.linalg.eig: 1e-10 relative to |λ|, with an absolute floor of
      // 1e-13·‖A‖_F·κ_j for eigenvalues near 0 (a backward stable solver errs by about ε‖A‖κ_j).
      const toNp = matchTo(e.valuesRe, e.valuesIm, o.np_re, o.np_im);
      for (let j = 0; j < k; j++) {
        const r = toNp[j];
        const diff = Math.hypot(e.valuesRe[j] - o.np_re[r], e.valuesIm[j] - o.np_im[r]);
        const kappa = Number.isFinite(e.condition[j]) ? e.condition[j] : 1;
        expect(diff).toBeLessThanOrEqual(1e-10 * Math.hypot(o.np_re[r], o.np_im[r]) + 1e-13 * norm * kappa);
      }
      // Residuals relative to ‖A‖_F and the vector's length: backward stability (common practice, no source).
      expect(rightResidual(a, k, e)).toBeLessThan(1e-14);
      expect(leftResidual(a, k, e)).toBeLessThan(1e-14);
      expect(biorthogonality(e, k)).toBeLessThan(1e-13 * Math.max(1, ...e.condition));
      if (!c.simple) return;
      // Simple eigenvalues: κ_j and the eigenvectors themselves are defined; compare with SciPy's.
      const toSp = matchTo(e.valuesRe, e.valuesIm, o.re, o.im);
      for (let j = 0; j < k; j++) {
        const r = toSp[j];
        const ref = o.kappa[r] as number;
        expect(Math.abs(e.condition[j] - ref)).toBeLessThanOrEqual(1e-10 * ref);
        // Up to a complex factor: |⟨v, v_ref⟩| = ‖v‖‖v_ref‖.
        expect(1 - alignment(e.right.re, e.right.im, j, o.vr_re, o.vr_im, r, k)).toBeLessThan(1e-12);
        expect(1 - alignment(e.left.re, e.left.im, j, o.vl_re, o.vl_im, r, k)).toBeLessThan(1e-12);
      }
    });
  });

  it('entries of size 1e200 and 1e-200: eigenvalues to 1e-10 relative, no overflow or underflow', () => {
    const k = 20;
    const base = dense(k, 6020);
    const big = Float64Array.from(base, (x) => x * 1e200);
    const small = Float64Array.from(base, (x) => x * 1e-200);
    const [ob, os] = runOracle([
      { k, a: big },
      { k, a: small },
    ]);
    for (const [a, o] of [
      [big, ob],
      [small, os],
    ] as const) {
      const e = generalEigen(a, k);
      expectContract(e, k);
      const toNp = matchTo(e.valuesRe, e.valuesIm, o.np_re, o.np_im);
      for (let j = 0; j < k; j++) {
        const r = toNp[j];
        const ref = Math.hypot(o.np_re[r], o.np_im[r]);
        expect(Math.hypot(e.valuesRe[j] - o.np_re[r], e.valuesIm[j] - o.np_im[r])).toBeLessThanOrEqual(1e-10 * ref);
        expect(Number.isFinite(e.condition[j])).toBe(true);
      }
    }
  });
});

describe('general eigensolver: known spectra (fact of the trade: common practice, no source)', () => {
  it('a triangular matrix has its diagonal as eigenvalues, exactly', () => {
    const k = 12;
    const e = generalEigen(upperTriangular(k, 3012), k);
    expect(Array.from(e.valuesIm)).toEqual(new Array(k).fill(0));
    expect(Array.from(e.valuesRe).sort((x, y) => x - y)).toEqual(Array.from({ length: k }, (_, i) => i + 1));
  });
  it('Q B Qᵀ with rotation generators has purely imaginary pairs ±iω and κ = 1', () => {
    for (const { k, rot } of [
      { k: 8, rot: rot8 },
      { k: 37, rot: rot37 },
    ]) {
      const e = generalEigen(rot.a, k);
      const positive = Array.from(e.valuesIm)
        .filter((x) => x > 0)
        .sort((x, y) => x - y);
      expect(positive).toHaveLength(rot.omegas.length);
      positive.forEach((w, i) => expect(Math.abs(w - rot.omegas[i])).toBeLessThan(1e-13));
      for (let j = 0; j < k; j++) {
        if (e.valuesIm[j] !== 0) expect(Math.abs(e.valuesRe[j])).toBeLessThan(1e-13);
        else expect(Math.abs(e.valuesRe[j] - 0.25)).toBeLessThan(1e-13);
        expect(Math.abs(e.condition[j] - 1)).toBeLessThan(1e-12);
      }
    }
  });
  it('a symmetric matrix has real eigenvalues, real orthonormal eigenvectors and κ = 1', () => {
    const k = 37;
    const e = generalEigen(symmetric(k, 2037), k);
    expect(Array.from(e.valuesIm)).toEqual(new Array(k).fill(0));
    for (let j = 0; j < k; j++) {
      expect(Math.abs(e.condition[j] - 1)).toBeLessThan(1e-12);
      for (let i = 0; i < j; i++) expect(alignment(e.right.re, e.right.im, i, e.right.re, e.right.im, j, k)).toBeLessThan(1e-13);
    }
  });
  it('the zero matrix: eigenvalues 0, V = W = I, κ = 1', () => {
    const k = 5;
    const e = generalEigen(new Float64Array(k * k), k);
    const eye = Array.from({ length: k * k }, (_, t) => (t % (k + 1) === 0 ? 1 : 0));
    expect(Array.from(e.valuesRe)).toEqual(new Array(k).fill(0));
    expect(Array.from(e.valuesIm)).toEqual(new Array(k).fill(0));
    expect(Array.from(e.right.re)).toEqual(eye);
    expect(Array.from(e.left.re)).toEqual(eye);
    expect(Array.from(e.condition)).toEqual(new Array(k).fill(1));
  });
  it('a rank-deficient matrix has an eigenvalue 0 (to round-off relative to ‖A‖)', () => {
    const k = 37;
    const a = rankDeficient(k, 5037);
    const e = generalEigen(a, k);
    const smallest = Math.min(...Array.from(e.valuesRe, (r, j) => Math.hypot(r, e.valuesIm[j])));
    expect(smallest).toBeLessThan(1e-14 * frobenius(a));
  });
  it('cyclic permutation matrices (where plain Francis shifts stall) give the roots of unity', () => {
    for (const k of [4, 7, 16]) {
      const a = new Float64Array(k * k);
      for (let i = 0; i < k; i++) a[((i + 1) % k) + i * k] = 1;
      const e = generalEigen(a, k);
      expectContract(e, k);
      for (let j = 0; j < k; j++) {
        const angle = Math.atan2(e.valuesIm[j], e.valuesRe[j]);
        const root = (Math.round((angle * k) / (2 * Math.PI)) * 2 * Math.PI) / k;
        expect(Math.hypot(e.valuesRe[j] - Math.cos(root), e.valuesIm[j] - Math.sin(root))).toBeLessThan(1e-13);
        expect(Math.abs(e.condition[j] - 1)).toBeLessThan(1e-12);
      }
    }
  });
  it('a 25×25 Jordan block has a singular eigenvector basis: κ = Infinity and W = 0, as with the ml-matrix route and a complex inverse', () => {
    const k = 25;
    const a = new Float64Array(k * k);
    for (let i = 0; i < k; i++) {
      a[i + i * k] = 1;
      if (i + 1 < k) a[i + (i + 1) * k] = 1;
    }
    const e = generalEigen(a, k);
    expect(Array.from(e.valuesRe)).toEqual(new Array(k).fill(1));
    expect(Array.from(e.condition)).toEqual(new Array(k).fill(Number.POSITIVE_INFINITY));
    expect(e.left.re.every((x) => x === 0) && e.left.im.every((x) => x === 0)).toBe(true);
    // The previous route: ml-matrix's vectors are singular too (its complex LU refuses them or overflows).
    const v = rightEigenMlMatrix(a, k).vectors;
    let singular = false;
    try {
      singular = cadjoint(cinverse(v)).re.some((x) => !Number.isFinite(x));
    } catch {
      singular = true;
    }
    expect(singular).toBe(true);
  });
  it('a 2×2 Jordan block is defective but its basis is not exactly singular: κ is huge and finite', () => {
    const e = generalEigen(Float64Array.from([3, 0, 1, 3]), 2);
    expect(Array.from(e.valuesRe)).toEqual([3, 3]);
    e.condition.forEach((c) => {
      expect(Number.isFinite(c)).toBe(true);
      expect(c).toBeGreaterThan(1e12);
    });
  });
});

describe('general eigensolver: agreement with the ml-matrix route (independent implementation: ml-matrix EigenvalueDecomposition)', () => {
  const cases: Case[] = CASES.filter((c) => c.simple && c.k > 1 && c.k <= 100);
  for (const c of cases) {
    it(`${c.label}: same eigenvalues and, up to a complex factor, the same eigenvectors`, () => {
      const { k, a } = c;
      const e = generalEigen(a, k);
      const ml = rightEigenMlMatrix(a, k);
      const norm = frobenius(a);
      const to = matchTo(e.valuesRe, e.valuesIm, Array.from(ml.re), Array.from(ml.im));
      for (let j = 0; j < k; j++) {
        const r = to[j];
        const diff = Math.hypot(e.valuesRe[j] - ml.re[r], e.valuesIm[j] - ml.im[r]);
        expect(diff).toBeLessThanOrEqual(1e-10 * Math.hypot(ml.re[r], ml.im[r]) + 1e-13 * norm * e.condition[j]);
        expect(1 - alignment(e.right.re, e.right.im, j, ml.vectors.re, ml.vectors.im, r, k)).toBeLessThan(1e-12);
      }
    });
  }
});

describe('general eigensolver: internal consistency (common practice, no source)', () => {
  it('eigenvaluesOnly returns bit for bit the eigenvalues of generalEigen, and rightEigen its right vectors', () => {
    for (const [k, a] of [
      [37, dense(37, 1037)],
      [100, dense(100, 1100)],
      [37, rot37.a],
      [6, rankDeficient(6, 5006)],
    ] as const) {
      const e = generalEigen(a, k);
      const vals = eigenvaluesOnly(a, k);
      expect(Array.from(vals.re)).toEqual(Array.from(e.valuesRe));
      expect(Array.from(vals.im)).toEqual(Array.from(e.valuesIm));
      const r = rightEigen(a, k);
      expect(Array.from(r.vectors.re)).toEqual(Array.from(e.right.re));
      expect(Array.from(r.vectors.im)).toEqual(Array.from(e.right.im));
    }
  });
  it('W from the real block form equals (V⁻¹)ᴴ from a complex LU inverse of V (the previous route)', () => {
    const k = 37;
    const e = generalEigen(dense(k, 7037), k);
    const w: ComplexMatrix = cadjoint(cinverse(e.right));
    let worst = 0;
    let scale = 0;
    for (let t = 0; t < k * k; t++) {
      worst = Math.max(worst, Math.hypot(w.re[t] - e.left.re[t], w.im[t] - e.left.im[t]));
      scale = Math.max(scale, Math.hypot(w.re[t], w.im[t]));
    }
    expect(worst / scale).toBeLessThan(1e-12);
  });
  it('the empty matrix gives empty results', () => {
    const e = generalEigen(new Float64Array(0), 0);
    expect(e.valuesRe).toHaveLength(0);
    expect(e.condition).toHaveLength(0);
  });
});

describe('general eigensolver: bad input and failure to converge', () => {
  for (const bad of [Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY]) {
    it(`a ${bad} entry is refused with the position of the entry`, () => {
      const k = 4;
      const a = dense(k, 8004);
      a[1 + 2 * k] = bad; // row 2, column 3
      const message = /the reduced operator has a non-finite entry \(.* at row 2, column 3 of 4×4\)/;
      expect(() => generalEigen(a, k)).toThrow(RangeError);
      expect(() => generalEigen(a, k)).toThrow(message);
      expect(() => rightEigen(a, k)).toThrow(message);
      expect(() => eigenvaluesOnly(a, k)).toThrow(message);
      expect(() => rightEigenMlMatrix(a, k)).toThrow(message);
      expect(() => realEigen(a, k)).toThrow(/non-finite entry .* at row 2, column 3/);
    });
  }
  it('a matrix of the wrong length is refused', () => {
    expect(() => generalEigen(new Float64Array(8), 3)).toThrow(/the reduced operator has 8 entries; a 3×3 matrix needs 9/);
    expect(() => realEigen(new Float64Array(8), 3)).toThrow(/a 3×3 matrix needs 9 entries, got 8/);
  });
  it('exceeding the iteration limit throws EigenConvergenceError saying how far it got', () => {
    const k = 10;
    const a = dense(k, 9010);
    expect(() => realEigen(a, k, { maxIterations: 2 })).toThrow(EigenConvergenceError);
    expect(() => realEigen(a, k, { maxIterations: 2 })).toThrow(/did not converge within 2 iterations \(\d+ of 10 eigenvalues found\)/);
    // The default limit is ample for the same matrix.
    expect(realEigen(a, k).re).toHaveLength(k);
  });
});
