import { describe, expect, it } from 'vitest';
import { exactDmd } from '../../../grading/methods/dmd';
import { edmd } from '../../../grading/methods/edmd';
import { kernelEdmd } from '../../../grading/methods/kernel-edmd';
import { continuousEigenvalue } from '../../../grading/methods/spectrum';
import { chooseRank, optimalHardThresholdCoefficient } from '../../../grading/methods/truncation';
import { singularValues } from '../../../grading/linalg/svd';
import type { Complex } from '../../../grading/methods/types';
import { gaussianMatrix, linearTrajectory, mapPairs, maxDistanceToSet } from './helpers';

const re = (v: number): Complex => ({ re: v, im: 0 });

/** {0.9^i 0.8^j : i + j ≤ p} */
function linearMapSpectrum(p: number): Complex[] {
  const out: Complex[] = [];
  for (let i = 0; i <= p; i++) for (let j = 0; i + j <= p; j++) out.push(re(0.9 ** i * 0.8 ** j));
  return out;
}

// Published worked example: Williams, Kevrekidis & Rowley 2015, J. Nonlinear Sci. 25:1307–1346, §4.1 —
// x_{k+1} = J x_k, J = [[0.9, −0.1], [0, 0.8]], standard normal inputs; Koopman eigenvalues 0.9^i 0.8^j.
describe('Published worked example: EDMD paper linear map (Williams, Kevrekidis & Rowley 2015, §4.1)', () => {
  const src = mapPairs(2015, 2, 300, (x) => [0.9 * x[0] - 0.1 * x[1], 0.8 * x[1]]);
  for (const p of [2, 3, 4]) {
    const expected = linearMapSpectrum(p);
    it(`EDMD with monomials of total degree ≤ ${p} returns exactly {0.9^i 0.8^j : i+j ≤ ${p}}`, async () => {
      const r = await edmd(src, { dictionary: { kind: 'monomial', degree: p } });
      expect(r.eigenvalues).toHaveLength(expected.length);
      const got = r.eigenvalues.map((e) => e.lambda);
      expect(maxDistanceToSet(expected, got)).toBeLessThan(1e-10);
      expect(maxDistanceToSet(got, expected)).toBeLessThan(1e-10);
    });
    it(`EDMD with probabilists' Hermite products of degree ≤ ${p} returns the same set`, async () => {
      const r = await edmd(src, { dictionary: { kind: 'hermite', degree: p } });
      const got = r.eigenvalues.map((e) => e.lambda);
      expect(got).toHaveLength(expected.length);
      expect(maxDistanceToSet(got, expected)).toBeLessThan(1e-10);
    });
    it(`kernel EDMD with (1 + xᵀy)^${p} returns exactly the same set`, async () => {
      const r = await kernelEdmd(src, { kernel: { kind: 'polynomial', degree: p } });
      expect(r.rank).toBe(expected.length);
      const got = r.eigenvalues.map((e) => e.lambda);
      expect(maxDistanceToSet(expected, got)).toBeLessThan(1e-9);
      expect(maxDistanceToSet(got, expected)).toBeLessThan(1e-9);
    });
  }
});

// Published worked example (checks.md item 2; Williams, Kevrekidis & Rowley 2015, the general statement behind §4.1):
// exact DMD of a trajectory of x_{k+1} = A x_k exciting every direction returns eig(A).
describe('Published worked example: exact DMD of a linear map with complex eigenvalues (Tu et al. 2014; WKR 2015)', () => {
  // A = P diag-blocks P⁻¹ with eigenvalues 0.95 e^{±0.3i}, 0.7 e^{±1.1i}, 0.5 (constructed here).
  const blocks = [
    [0.95, 0.3],
    [0.7, 1.1],
  ];
  const d = 5;
  const b = Array.from({ length: d }, () => new Array(d).fill(0));
  blocks.forEach(([rho, th], i) => {
    b[2 * i][2 * i] = rho * Math.cos(th);
    b[2 * i][2 * i + 1] = -rho * Math.sin(th);
    b[2 * i + 1][2 * i] = rho * Math.sin(th);
    b[2 * i + 1][2 * i + 1] = rho * Math.cos(th);
  });
  b[4][4] = 0.5;
  // P = I + small upper triangle (invertible, known inverse is not needed: A = P B P⁻¹ computed by substitution)
  const p = Array.from({ length: d }, (_, i) => Array.from({ length: d }, (_, j) => (i === j ? 1 : j > i ? 0.3 * (i + 1) - 0.1 * j : 0)));
  // A = P B P⁻¹: solve P⁻¹ column by column (P upper triangular).
  const pinv = Array.from({ length: d }, () => new Array(d).fill(0));
  for (let c = 0; c < d; c++) {
    for (let i = d - 1; i >= 0; i--) {
      let s = i === c ? 1 : 0;
      for (let t = i + 1; t < d; t++) s -= p[i][t] * pinv[t][c];
      pinv[i][c] = s / p[i][i];
    }
  }
  const mul = (x: number[][], y: number[][]) => x.map((row) => y[0].map((_, j) => row.reduce((s, v, t) => s + v * y[t][j], 0)));
  const a = mul(mul(p, b), pinv);
  const expected: Complex[] = [];
  for (const [rho, th] of blocks) expected.push({ re: rho * Math.cos(th), im: rho * Math.sin(th) }, { re: rho * Math.cos(th), im: -rho * Math.sin(th) });
  expected.push(re(0.5));
  for (const svd of ['direct', 'snapshots'] as const) {
    it(`returns eig(A) = {0.95e^{±0.3i}, 0.7e^{±1.1i}, 0.5} (${svd} SVD route)`, async () => {
      const traj = linearTrajectory(a, [1, -0.5, 0.8, 0.3, -1.2], 30);
      const r = await exactDmd({ kind: 'trajectory', snapshots: traj }, { svd });
      expect(r.rank).toBe(5);
      const got = r.eigenvalues.map((e) => e.lambda);
      expect(maxDistanceToSet(expected, got)).toBeLessThan(1e-9);
      // Fact of the trade (common practice, no source): real data gives exact conjugate pairs.
      for (const e of r.eigenvalues) {
        if (e.lambda.im !== 0) {
          const partner = r.eigenvalues[e.partner].lambda;
          expect(partner.re).toBe(e.lambda.re);
          expect(partner.im).toBe(-e.lambda.im);
        }
      }
    });
  }
  it('exact DMD modes reproduce the trajectory: x_k = Σ Φ_j λ_j^k b_j (Tu et al. 2014, §2)', async () => {
    const traj = linearTrajectory(a, [1, -0.5, 0.8, 0.3, -1.2], 30);
    const r = await exactDmd({ kind: 'trajectory', snapshots: traj }, { modes: true });
    // amplitude = ‖Φ_j‖|b_j| > 0 for every mode excited
    for (const e of r.eigenvalues) expect(e.amplitude).toBeGreaterThan(1e-6);
    expect(r.modes?.rows).toBe(5);
    expect(r.modes?.cols).toBe(5);
  });
});

// Published worked example: Brunton, Brunton, Proctor & Kutz 2016, PLoS ONE 11(2):e0150171, slow-manifold example
// in discrete time: x1' = a x1, x2' = b x2 + (a² − b) x1²; eigenvalues {1, a, b, a²} in the degree-2 span.
describe('Published worked example: discrete slow-manifold map (Brunton et al. 2016)', () => {
  const a = 0.9;
  const b = 0.5;
  const src = mapPairs(2016, 2, 200, (x) => [a * x[0], b * x[1] + (a * a - b) * x[0] * x[0]]);
  const expected = [1, a, b, a * a].map(re);
  it('EDMD with monomials of degree ≤ 2 contains {1, a, b, a²}', async () => {
    const r = await edmd(src, { dictionary: { kind: 'monomial', degree: 2 } });
    expect(maxDistanceToSet(expected, r.eigenvalues.map((e) => e.lambda))).toBeLessThan(1e-10);
  });
  it('kernel EDMD with (1 + xᵀy)² contains {1, a, b, a²}', async () => {
    const r = await kernelEdmd(src, { kernel: { kind: 'polynomial', degree: 2 } });
    expect(maxDistanceToSet(expected, r.eigenvalues.map((e) => e.lambda))).toBeLessThan(1e-9);
  });
});

// Published worked example: Gavish & Donoho 2014, IEEE Trans. Inf. Theory 60:5040–5053 —
// square case threshold ≈ 2.858·median(σ) (the paper's quoted value; recalled from memory), cubic gives 2.86.
describe('Published worked example: optimal hard threshold (Gavish & Donoho 2014)', () => {
  it('the cubic ω(β) is 2.86 at β = 1, within 0.01 of the square-case value 2.858 (recalled from memory)', () => {
    expect(optimalHardThresholdCoefficient(1)).toBeCloseTo(2.86, 12);
    expect(Math.abs(optimalHardThresholdCoefficient(1) - 2.858)).toBeLessThan(0.01);
  });
  for (const [n, m, rank] of [
    [150, 150, 5],
    [300, 120, 4],
    [80, 200, 6],
  ]) {
    it(`a rank-${rank} ${n}×${m} matrix plus small white noise comes back with rank ${rank}`, async () => {
      const l = gaussianMatrix(n + m + rank, n, rank);
      const rr = gaussianMatrix(7 * rank, rank, m);
      const noise = gaussianMatrix(99 + n, n, m);
      const x = new Float64Array(n * m);
      for (let j = 0; j < m; j++) {
        for (let i = 0; i < n; i++) {
          let s = 0;
          for (let t = 0; t < rank; t++) s += l[i + t * n] * rr[t + j * rank];
          x[i + j * n] = s + 0.01 * noise[i + j * n];
        }
      }
      const sigma = singularValues(x, n, m);
      expect(chooseRank(sigma, n, m, { kind: 'optimal' }).rank).toBe(rank);
      const y = gaussianMatrix(5, n, m);
      const r = await exactDmd({ kind: 'pairs', x: { data: x, n, k: m }, y: { data: y, n, k: m } }, { truncation: { kind: 'optimal' }, rankBand: false });
      expect(r.rank).toBe(rank);
    });
  }
});

describe('Fact of the trade (common practice, no source): continuous time ω = log(λ)/dt', () => {
  it('for λ = e^{ω dt} returns ω', () => {
    for (const [wr, wi, dt] of [
      [-0.3, 2.0, 0.1],
      [0.05, -7.5, 0.02],
      [-2, 0, 0.5],
    ]) {
      const lam = { re: Math.exp(wr * dt) * Math.cos(wi * dt), im: Math.exp(wr * dt) * Math.sin(wi * dt) };
      const w = continuousEigenvalue(lam, dt);
      expect(w).not.toBeNull();
      expect(w?.re).toBeCloseTo(wr, 12);
      expect(w?.im).toBeCloseTo(wi, 12);
    }
  });
  it('λ = 0 has no continuous counterpart and the result says so', async () => {
    expect(continuousEigenvalue({ re: 0, im: 0 }, 0.1)).toBeNull();
    // a nilpotent shift map has λ = 0
    const traj = { data: Float64Array.from([1, 0, 0, 0, 1, 0, 0, 0, 0]), n: 3, k: 3 }; // e1 → e2 → 0
    const r = await exactDmd({ kind: 'trajectory', snapshots: traj }, { dt: 0.1, truncation: { kind: 'rank', rank: 2 } });
    expect(r.eigenvalues.some((e) => e.continuous === null)).toBe(true);
    expect(r.notes.join(' ')).toMatch(/no continuous-time counterpart/);
  });
});
