import { linearSumAssignment } from 'linear-sum-assignment';

/**
 * Optimal assignment on a rectangular cost matrix (rows: submitted values,
 * columns: reference values), by the Jonker–Volgenant shortest augmenting
 * path method of the `linear-sum-assignment` package. Never by position.
 */

export interface Assignment {
  /** Pairs [row, column], min(rows, columns) of them, in row order. */
  pairs: [number, number][];
  /** Sum of the assigned costs. */
  totalCost: number;
}

export function solveAssignment(cost: number[][]): Assignment {
  const rows = cost.length;
  const cols = rows > 0 ? cost[0].length : 0;
  if (rows === 0 || cols === 0) return { pairs: [], totalCost: 0 };
  for (const r of cost) {
    if (r.length !== cols) throw new Error('cost matrix rows must all have the same length');
    for (const c of r) if (!Number.isFinite(c)) throw new Error('cost matrix entries must be finite');
  }
  const result = linearSumAssignment(cost, { maximaze: false });
  const pairs: [number, number][] = [];
  let totalCost = 0;
  for (let i = 0; i < rows; i++) {
    const j = result.rowAssignments[i];
    if (j >= 0) {
      pairs.push([i, j]);
      totalCost += cost[i][j];
    }
  }
  if (pairs.length !== Math.min(rows, cols)) throw new Error('assignment solver returned an incomplete assignment');
  return { pairs, totalCost };
}

/**
 * Assignment in which a pair may also stay unmatched: a pair costing more
 * than `cutoff` is dropped. Capping every cost at `cutoff` before solving is
 * the same as offering each value a "no partner" option at half the cut-off
 * on either side, so the solution is optimal for that problem too.
 */
export function matchWithCutoff(cost: number[][], cutoff: number): { pairs: [number, number][]; totalCost: number } {
  const capped = cost.map((r) => r.map((c) => Math.min(c, cutoff)));
  const { pairs } = solveAssignment(capped);
  const kept = pairs.filter(([i, j]) => cost[i][j] <= cutoff);
  return { pairs: kept, totalCost: kept.reduce((s, [i, j]) => s + cost[i][j], 0) };
}
