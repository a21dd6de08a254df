import { describe, expect, it } from 'vitest';
import { cadjoint, cmatmul } from '../../../grading/linalg/complex';
import { generalEigen } from '../../../grading/linalg/eigen';
import { exactDmd } from '../../../grading/methods/dmd';
import { edmd } from '../../../grading/methods/edmd';
import { kernelEdmd, kernelGramMatrices } from '../../../grading/methods/kernel-edmd';
import { innerProducts, innerProductsDirect } from '../../../grading/methods/pairs';
import type { ComplexMatrix, PairSource } from '../../../grading/methods/types';
import { gaussianMatrix, mapPairs, maxDistanceToSet } from './helpers';

// Internal consistency (numerics.md; checks.md "Internal consistency"): not outside sources, but cheap and strong.

function nonzero<T extends { lambda: { re: number; im: number } }>(list: T[]): T[] {
  return list.filter((e) => Math.hypot(e.lambda.re, e.lambda.im) > 1e-9);
}

describe('Internal consistency: DMD = kernel EDMD with the linear kernel (nonzero eigenvalues)', () => {
  for (const [n, m] of [
    [40, 12],
    [5, 60],
    [20, 20],
  ]) {
    it(`n = ${n}, m = ${m}`, async () => {
      const source: PairSource = { kind: 'trajectory', snapshots: { data: gaussianMatrix(n * m + 1, n, m + 1), n, k: m + 1 } };
      const r = Math.min(n, m);
      const d = await exactDmd(source, { truncation: { kind: 'rank', rank: r }, rankBand: false });
      const k = await kernelEdmd(source, { kernel: { kind: 'linear' }, truncation: { kind: 'rank', rank: r }, rankBand: false });
      const a = nonzero(d.eigenvalues).map((e) => e.lambda);
      const b = nonzero(k.eigenvalues).map((e) => e.lambda);
      expect(a.length).toBe(b.length);
      expect(maxDistanceToSet(a, b)).toBeLessThan(1e-9);
      expect(maxDistanceToSet(b, a)).toBeLessThan(1e-9);
    });
  }
});

describe('Internal consistency: EDMD monomials ≤ p = kernel EDMD with (1 + xᵀy)^p when m ≥ N', () => {
  const f = (x: Float64Array) => [0.8 * x[0] + 0.1 * Math.sin(x[1]), 0.7 * x[1] - 0.2 * x[0] * x[0]];
  for (const p of [2, 3]) {
    it(`degree ${p}, d = 2, m = 120 on a nonlinear map`, async () => {
      const src = mapPairs(p * 11, 2, 120, f);
      const e = await edmd(src, { dictionary: { kind: 'monomial', degree: p } });
      const k = await kernelEdmd(src, { kernel: { kind: 'polynomial', degree: p }, truncation: { kind: 'rank', rank: e.rank }, rankBand: false });
      const a = e.eigenvalues.map((x) => x.lambda);
      const b = k.eigenvalues.map((x) => x.lambda);
      expect(b).toHaveLength(a.length);
      expect(maxDistanceToSet(a, b)).toBeLessThan(1e-8);
      expect(maxDistanceToSet(b, a)).toBeLessThan(1e-8);
    });
  }
});

describe('Internal consistency: single-trajectory Gram reuse = direct formulas', () => {
  const n = 9;
  const k = 14;
  const traj = { data: gaussianMatrix(3, n, k), n, k };
  it('one trajectory: XᵀX, YᵀX and norms from S = DᵀD equal gram(X), cross(Y, X)', async () => {
    const source: PairSource = { kind: 'trajectory', snapshots: traj };
    const a = await innerProducts(source);
    const b = await innerProductsDirect(source);
    for (const key of ['xx', 'yx', 'xNorm2', 'yNorm2'] as const) {
      expect(a[key].length).toBe(b[key].length);
      a[key].forEach((v, i) => expect(Math.abs(v - b[key][i])).toBeLessThan(1e-12 * Math.max(1, Math.abs(v))));
    }
  });
  it('several trajectories: per-block products equal the direct formulas on the stacked pairs', async () => {
    const list = [traj, { data: gaussianMatrix(4, n, 6), n, k: 6 }, { data: gaussianMatrix(5, n, 3), n, k: 3 }];
    const source: PairSource = { kind: 'trajectories', list };
    const a = await innerProducts(source);
    const b = await innerProductsDirect(source);
    expect(a.m).toBe(13 + 5 + 2);
    for (const key of ['xx', 'yx', 'xNorm2', 'yNorm2'] as const) a[key].forEach((v, i) => expect(Math.abs(v - b[key][i])).toBeLessThan(1e-12 * Math.max(1, Math.abs(v))));
  });
  it('Gaussian kernel matrices from the Gram reuse equal exp(−‖x−y‖²/(2σ²)) evaluated directly', async () => {
    const source: PairSource = { kind: 'trajectory', snapshots: traj };
    const { g, a } = kernelGramMatrices({ kind: 'gaussian', sigma: 2.5 }, await innerProducts(source));
    const m = k - 1;
    const col = (j: number) => traj.data.subarray(j * n, j * n + n);
    const kern = (u: Float64Array, v: Float64Array) => Math.exp(-u.reduce((s, x, t) => s + (x - v[t]) ** 2, 0) / (2 * 2.5 * 2.5));
    for (let i = 0; i < m; i++) {
      for (let j = 0; j < m; j++) {
        expect(g[i + j * m]).toBeCloseTo(kern(col(i), col(j)), 12);
        expect(a[i + j * m]).toBeCloseTo(kern(col(i + 1), col(j)), 12);
      }
    }
  });
  it('kernel EDMD on one trajectory equals kernel EDMD on the same pairs given explicitly', async () => {
    const m = k - 1;
    const x = { data: traj.data.slice(0, n * m), n, k: m };
    const y = { data: traj.data.slice(n), n, k: m };
    const opts = { kernel: { kind: 'polynomial' as const, degree: 2 }, truncation: { kind: 'rank' as const, rank: 8 }, rankBand: false };
    const a = await kernelEdmd({ kind: 'trajectory', snapshots: traj }, opts);
    const b = await kernelEdmd({ kind: 'pairs', x, y }, opts);
    expect(maxDistanceToSet(a.eigenvalues.map((e) => e.lambda), b.eigenvalues.map((e) => e.lambda))).toBeLessThan(1e-10);
  });
});

function reconstructionError(phi: ComplexMatrix, modes: ComplexMatrix, x: Float64Array, n: number, m: number): number {
  let worst = 0;
  let scale = 0;
  for (let i = 0; i < m; i++) {
    for (let t = 0; t < n; t++) {
      let sr = 0;
      let si = 0;
      for (let j = 0; j < phi.cols; j++) {
        const pr = phi.re[i + j * m];
        const pi = phi.im[i + j * m];
        const mr = modes.re[t + j * n];
        const mi = modes.im[t + j * n];
        sr += pr * mr - pi * mi;
        si += pr * mi + pi * mr;
      }
      worst = Math.max(worst, Math.hypot(sr - x[i * n + t], si));
      scale = Math.max(scale, Math.abs(x[i * n + t]));
    }
  }
  return worst / scale;
}

describe('Internal consistency: reconstruction x_i ≈ Σ_j φ_j(x_i) ξ_j on the samples', () => {
  const src = mapPairs(77, 3, 90, (x) => [0.9 * x[0], 0.5 * x[1] + 0.3 * x[0] * x[2], Math.tanh(x[2])]);
  it('kernel EDMD, polynomial kernel of degree 2 (its span contains the state)', async () => {
    const r = await kernelEdmd(src, { kernel: { kind: 'polynomial', degree: 2 }, modes: true, rankBand: false });
    expect(r.modes && r.eigenfunctions).toBeTruthy();
    expect(reconstructionError(r.eigenfunctions as ComplexMatrix, r.modes as ComplexMatrix, src.x.data, 3, 90)).toBeLessThan(1e-10);
  });
  it('EDMD, monomials of degree 2', async () => {
    const r = await edmd(src, { dictionary: { kind: 'monomial', degree: 2 }, modes: true });
    expect(reconstructionError(r.eigenfunctions as ComplexMatrix, r.modes as ComplexMatrix, src.x.data, 3, 90)).toBeLessThan(1e-10);
  });
  it('kernel EDMD eigenfunctions at new points equal those on the samples when the points are the samples', async () => {
    const r = await kernelEdmd(src, { kernel: { kind: 'gaussian', sigma: 1.5 }, truncation: { kind: 'rank', rank: 12 }, modes: true, points: src.x, rankBand: false });
    const a = r.eigenfunctions as ComplexMatrix;
    const b = r.eigenfunctionsAt as ComplexMatrix;
    let worst = 0;
    let scale = 0;
    for (let t = 0; t < a.re.length; t++) {
      worst = Math.max(worst, Math.hypot(a.re[t] - b.re[t], a.im[t] - b.im[t]));
      scale = Math.max(scale, Math.hypot(a.re[t], a.im[t]));
    }
    expect(worst / scale).toBeLessThan(1e-8);
  });
});

describe('Internal consistency: left eigenvectors and condition numbers', () => {
  it('Ŵᴴ V̂ = I and κ_j = ‖w_j‖‖v_j‖/|w_jᴴ v_j| ≥ 1 for a random non-normal matrix', () => {
    const k = 7;
    const a = gaussianMatrix(12, k, k);
    const e = generalEigen(a, k);
    const p = cmatmul(cadjoint(e.left), e.right);
    for (let i = 0; i < k; i++) {
      for (let j = 0; j < k; j++) {
        expect(Math.abs(p.re[i + j * k] - (i === j ? 1 : 0))).toBeLessThan(1e-10);
        expect(Math.abs(p.im[i + j * k])).toBeLessThan(1e-10);
      }
      expect(e.condition[i]).toBeGreaterThanOrEqual(1 - 1e-12);
    }
  });
  it('a symmetric matrix has κ = 1 (Fact of the trade: normal matrices are perfectly conditioned; common practice, no source)', () => {
    const k = 5;
    const b = gaussianMatrix(8, k, k);
    const s = new Float64Array(k * k);
    for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) s[i + j * k] = b[i + j * k] + b[j + i * k];
    const e = generalEigen(s, k);
    e.condition.forEach((c) => expect(c).toBeCloseTo(1, 10));
  });
});
