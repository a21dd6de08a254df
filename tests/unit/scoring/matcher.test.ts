import { execFileSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { matchWithCutoff, solveAssignment } from '../../../grading/scoring/assignment';
import { repoRoot } from './helpers';

/** Deterministic pseudo-random numbers (mulberry32), so that both sides get the same bytes. */
function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function randomMatrix(r: () => number, rows: number, cols: number, kind: number): number[][] {
  return Array.from({ length: rows }, () =>
    Array.from({ length: cols }, () => {
      const u = r();
      // plain uniform, integer costs with many ties, and wide dynamic range
      return kind === 0 ? u : kind === 1 ? Math.floor(u * 4) : Math.exp(20 * (u - 0.5));
    }),
  );
}

function bruteForce(cost: number[][]): number {
  const rows = cost.length;
  const cols = cost[0].length;
  const t = rows <= cols ? cost : cost[0].map((_, j) => cost.map((row) => row[j]));
  const n = t.length;
  const m = t[0].length;
  let best = Infinity;
  const used = new Array<boolean>(m).fill(false);
  const go = (i: number, acc: number) => {
    if (acc >= best) return;
    if (i === n) {
      best = acc;
      return;
    }
    for (let j = 0; j < m; j++) {
      if (used[j]) continue;
      used[j] = true;
      go(i + 1, acc + t[i][j]);
      used[j] = false;
    }
  };
  go(0, 0);
  return best;
}

describe('optimal assignment', () => {
  it('Reference library: SciPy linear_sum_assignment gives the same total cost on random rectangular cost matrices', () => {
    const r = rng(20261201);
    const mats: number[][][] = [];
    for (let k = 0; k < 120; k++) {
      const rows = 1 + Math.floor(r() * 14);
      const cols = 1 + Math.floor(r() * 14);
      mats.push(randomMatrix(r, rows, cols, k % 3));
    }
    // JSON carries doubles exactly (shortest round-trip representation), so both sides see the same bytes.
    const out = execFileSync('python3', [`${repoRoot}tests/oracle/lsa_oracle.py`], { input: JSON.stringify(mats) }).toString();
    const scipy = JSON.parse(out) as number[];
    expect(scipy).toHaveLength(mats.length);
    mats.forEach((m, k) => {
      const ours = solveAssignment(m);
      expect(ours.pairs).toHaveLength(Math.min(m.length, m[0].length));
      expect(Math.abs(ours.totalCost - scipy[k])).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(scipy[k])));
    });
  });

  it('matches brute force on small matrices (every row and column used at most once)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 6 }),
        fc.integer({ min: 1, max: 6 }),
        fc.integer({ min: 0, max: 2 }),
        fc.integer(),
        (rows, cols, kind, seed) => {
          const m = randomMatrix(rng(seed), rows, cols, kind);
          const ours = solveAssignment(m);
          const rowsUsed = new Set(ours.pairs.map(([i]) => i));
          const colsUsed = new Set(ours.pairs.map(([, j]) => j));
          expect(rowsUsed.size).toBe(ours.pairs.length);
          expect(colsUsed.size).toBe(ours.pairs.length);
          expect(Math.abs(ours.totalCost - bruteForce(m))).toBeLessThanOrEqual(1e-9 * Math.max(1, ours.totalCost));
        },
      ),
      { numRuns: 400 },
    );
  });

  it('never matches by position: a reversed list is paired by value', () => {
    const sub = [1, 2, 3, 4];
    const ref = [4, 3, 2, 1];
    const { pairs, totalCost } = solveAssignment(sub.map((s) => ref.map((x) => Math.abs(s - x))));
    expect(totalCost).toBe(0);
    expect(pairs).toEqual([
      [0, 3],
      [1, 2],
      [2, 1],
      [3, 0],
    ]);
  });

  it('leaves pairs above the cut-off unmatched, and the capped problem is optimal with a "no partner" option (brute force)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5 }), fc.integer({ min: 1, max: 5 }), fc.integer(), (rows, cols, seed) => {
        const r = rng(seed);
        const m = randomMatrix(r, rows, cols, 0).map((row) => row.map((x) => x * 4));
        const cutoff = 1.5;
        const got = matchWithCutoff(m, cutoff);
        for (const [i, j] of got.pairs) expect(m[i][j]).toBeLessThanOrEqual(cutoff);
        // Brute force over partial matchings: cost = matched sum + cutoff per pair left unmatched (min(rows, cols) - k).
        let best = Infinity;
        const usedC = new Array<boolean>(cols).fill(false);
        const go = (i: number, acc: number, k: number) => {
          if (i === rows) {
            best = Math.min(best, acc + cutoff * (Math.min(rows, cols) - k));
            return;
          }
          go(i + 1, acc, k);
          for (let j = 0; j < cols; j++) {
            if (usedC[j] || m[i][j] > cutoff) continue;
            usedC[j] = true;
            go(i + 1, acc + m[i][j], k + 1);
            usedC[j] = false;
          }
        };
        go(0, 0, 0);
        const ours = got.totalCost + cutoff * (Math.min(rows, cols) - got.pairs.length);
        expect(Math.abs(ours - best)).toBeLessThanOrEqual(1e-9);
      }),
      { numRuns: 300 },
    );
  });

  it('handles empty sides', () => {
    expect(solveAssignment([])).toEqual({ pairs: [], totalCost: 0 });
    expect(solveAssignment([[]])).toEqual({ pairs: [], totalCost: 0 });
  });
});
