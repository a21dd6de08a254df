/**
 * Truncation rank from singular values: given rank, energy fraction, relative
 * threshold, numerical rank, or the optimal hard threshold of Gavish & Donoho
 * (2014, IEEE Trans. Inf. Theory 60:5040–5053): τ = ω(β)·median(σ),
 * ω(β) ≈ 0.56β³ − 0.95β² + 1.82β + 1.43, β = short side / long side.
 */
import { SpectrumInputError, type RankRule } from './types.js';

/** ω(β) of the optimal hard threshold for unknown noise (cubic approximation). */
export function optimalHardThresholdCoefficient(beta: number): number {
  return 0.56 * beta ** 3 - 0.95 * beta ** 2 + 1.82 * beta + 1.43;
}

function median(v: Float64Array): number {
  const s = Float64Array.from(v).sort();
  const h = s.length >> 1;
  return s.length % 2 === 1 ? s[h] : 0.5 * (s[h - 1] + s[h]);
}

/** Numerical rank of a rows×cols matrix from its singular values σ (descending). */
export function numericalRank(sigma: Float64Array, rows: number, cols: number): number {
  if (sigma.length === 0 || !(sigma[0] > 0)) return 0;
  const tol = Math.max(rows, cols) * Number.EPSILON * sigma[0];
  let r = 0;
  while (r < sigma.length && sigma[r] > tol) r++;
  return r;
}

/**
 * Rank chosen by `rule` from singular values σ (descending, length min(rows, cols))
 * of a rows×cols matrix; refuses a rank above the numerical rank, naming the maximum.
 */
export function chooseRank(
  sigma: Float64Array,
  rows: number,
  cols: number,
  rule: RankRule,
  maxRankOverride?: number,
): { rank: number; threshold?: number; maxRank: number } {
  const maxRank = maxRankOverride ?? numericalRank(sigma, rows, cols);
  if (maxRank === 0) throw new SpectrumInputError('the snapshot matrix is zero; there is nothing to decompose', 0);
  switch (rule.kind) {
    case 'rank': {
      if (!Number.isInteger(rule.rank) || rule.rank < 1) throw new SpectrumInputError(`rank must be a positive integer, got ${rule.rank}`, maxRank);
      if (rule.rank > maxRank) {
        throw new SpectrumInputError(`rank ${rule.rank} is more than the data allows: the maximum is ${maxRank} (numerical rank of a ${rows}×${cols} matrix)`, maxRank);
      }
      return { rank: rule.rank, maxRank };
    }
    case 'energy': {
      if (!(rule.fraction > 0 && rule.fraction <= 1)) throw new SpectrumInputError(`energy fraction must be in (0, 1], got ${rule.fraction}`, maxRank);
      let total = 0;
      for (let i = 0; i < maxRank; i++) total += sigma[i] ** 2;
      let acc = 0;
      let r = 0;
      while (r < maxRank) {
        acc += sigma[r] ** 2;
        r++;
        if (acc >= rule.fraction * total * (1 - 1e-15)) break;
      }
      return { rank: r, maxRank };
    }
    case 'tolerance': {
      if (!(rule.tol >= 0 && rule.tol < 1)) throw new SpectrumInputError(`relative tolerance must be in [0, 1), got ${rule.tol}`, maxRank);
      const t = rule.tol * sigma[0];
      let r = 0;
      while (r < maxRank && sigma[r] > t) r++;
      return { rank: Math.max(r, 1), threshold: t, maxRank };
    }
    case 'optimal': {
      const beta = Math.min(rows, cols) / Math.max(rows, cols);
      const tau = optimalHardThresholdCoefficient(beta) * median(sigma.subarray(0, Math.min(rows, cols)));
      let r = 0;
      while (r < maxRank && sigma[r] > tau) r++;
      return { rank: Math.max(r, 1), threshold: tau, maxRank };
    }
    case 'numerical':
      return { rank: maxRank, maxRank };
  }
}
