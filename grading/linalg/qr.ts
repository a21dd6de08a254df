/**
 * Householder QR with column pivoting, truncated at a relative cut-off, for
 * least-squares problems A K ≈ B (Golub & Van Loan, Matrix Computations, 4th
 * ed., §5.4.2 "QR with column pivoting" and §5.5.6 "basic solutions"; common
 * practice). A P = Q R; columns are chosen greedily by largest remaining norm,
 * and the factorisation stops at the first pivot whose remaining norm is at or
 * below `cutoff` × |R₁₁|: that count is the numerical rank r. The basic
 * solution uses only the r chosen columns: K_sel = R₁₁⁻¹ (Qᵀ B)_{1:r}, the
 * other rows of K are zero.
 *
 * Matrices are column-major Float64Arrays.
 */

export interface PivotedQr {
  /** Numerical rank r (number of pivots taken). */
  rank: number;
  /** Column order: perm[i] is the original index of pivot column i (all `cols` entries; the first `rank` are chosen). */
  perm: Int32Array;
  /** |R_ii| for i < rank, then the remaining column norm at which the factorisation stopped (0 if it ran to the end). */
  diagonal: Float64Array;
  /** R₁₁ (rank×rank, upper triangular, column-major). */
  r11: Float64Array;
  /** (Qᵀ B)_{1:r} (rank×bcols, column-major). */
  qtb: Float64Array;
  /** R₁₂ (rank×(cols−rank), column-major): the columns not chosen, in the order of perm[rank…]. With R₁₁ it gives the null-space basis [−R₁₁⁻¹R₁₂; I] of the truncated factorisation. */
  r12: Float64Array;
  /** Norm of what is left of each column not chosen (perm[rank…]) after projecting out the chosen ones: ‖R₂₂ e_j‖. */
  residualNorms: Float64Array;
}

export interface PivotedQrOptions {
  /** Relative cut-off on the pivots (default 1e-10). */
  cutoff?: number;
  /** Columns to take first, in this order, whatever their norms (e.g. the constant function). */
  first?: readonly number[];
  /** Take exactly these pivot columns in this order, no pivoting and no cut-off (re-running a factorisation on perturbed data). */
  fixedOrder?: readonly number[];
}

/**
 * Pivoted QR of A (rows×cols) and Qᵀ applied to B (rows×bcols). A and B are
 * copied, not modified.
 */
export function pivotedQr(a: Float64Array, rows: number, cols: number, b: Float64Array, bcols: number, options: PivotedQrOptions = {}): PivotedQr {
  const cutoff = options.cutoff ?? 1e-10;
  const w = Float64Array.from(a.subarray(0, rows * cols));
  const bw = Float64Array.from(b.subarray(0, rows * bcols));
  const perm = Int32Array.from({ length: cols }, (_, i) => i);
  const norms2 = new Float64Array(cols);
  for (let j = 0; j < cols; j++) {
    let s = 0;
    for (let i = 0; i < rows; i++) s += w[i + j * rows] ** 2;
    norms2[j] = s;
  }
  const swap = (p: number, q: number) => {
    if (p === q) return;
    for (let i = 0; i < rows; i++) {
      const t = w[i + p * rows];
      w[i + p * rows] = w[i + q * rows];
      w[i + q * rows] = t;
    }
    const t = perm[p];
    perm[p] = perm[q];
    perm[q] = t;
    const u = norms2[p];
    norms2[p] = norms2[q];
    norms2[q] = u;
  };
  const kmax = Math.min(rows, options.fixedOrder ? options.fixedOrder.length : cols);
  const diagonal = new Float64Array(Math.min(rows, cols) + 1);
  const v = new Float64Array(rows);
  let first = 0;
  let rank = 0;
  for (let k = 0; k < kmax; k++) {
    // choose the pivot
    if (options.fixedOrder) {
      const want = options.fixedOrder[k];
      let at = -1;
      for (let j = k; j < cols; j++) if (perm[j] === want) at = j;
      if (at < 0) throw new RangeError(`pivotedQr: fixed column ${want} is not available`);
      swap(k, at);
    } else if (options.first && k < options.first.length) {
      const want = options.first[k];
      let at = -1;
      for (let j = k; j < cols; j++) if (perm[j] === want) at = j;
      if (at >= 0) swap(k, at);
    } else {
      // recompute the remaining norms exactly (downdating loses accuracy near the cut-off; the sizes here are small)
      let best = k;
      let bestN = -1;
      for (let j = k; j < cols; j++) {
        let s = 0;
        for (let i = k; i < rows; i++) s += w[i + j * rows] ** 2;
        norms2[j] = s;
        if (s > bestN) {
          bestN = s;
          best = j;
        }
      }
      swap(k, best);
    }
    let alpha = 0;
    for (let i = k; i < rows; i++) alpha += w[i + k * rows] ** 2;
    alpha = Math.sqrt(alpha);
    if (k === 0) first = alpha;
    if (!options.fixedOrder && (!(alpha > 0) || (k > 0 && alpha <= cutoff * first))) {
      diagonal[k] = alpha;
      break;
    }
    const x0 = w[k + k * rows];
    const beta = x0 >= 0 ? -alpha : alpha; // R_kk, sign opposite to x0 (no cancellation)
    // v = x − β e_1, H = I − 2vvᵀ/(vᵀv)
    let vn = 0;
    for (let i = k; i < rows; i++) {
      v[i] = w[i + k * rows];
      if (i === k) v[i] -= beta;
      vn += v[i] * v[i];
    }
    const apply = (mat: Float64Array, j: number) => {
      if (!(vn > 0)) return;
      const off = j * rows;
      let dot = 0;
      for (let i = k; i < rows; i++) dot += v[i] * mat[off + i];
      const f = (2 * dot) / vn;
      if (f === 0) return;
      for (let i = k; i < rows; i++) mat[off + i] -= f * v[i];
    };
    w[k + k * rows] = beta;
    for (let i = k + 1; i < rows; i++) w[i + k * rows] = 0;
    for (let j = k + 1; j < cols; j++) apply(w, j);
    for (let j = 0; j < bcols; j++) apply(bw, j);
    diagonal[k] = Math.abs(beta);
    rank = k + 1;
  }
  const r11 = new Float64Array(rank * rank);
  for (let j = 0; j < rank; j++) for (let i = 0; i <= j; i++) r11[i + j * rank] = w[i + j * rows];
  const qtb = new Float64Array(rank * bcols);
  for (let j = 0; j < bcols; j++) for (let i = 0; i < rank; i++) qtb[i + j * rank] = bw[i + j * rows];
  const r12 = new Float64Array(rank * (cols - rank));
  for (let j = rank; j < cols; j++) for (let i = 0; i < rank; i++) r12[i + (j - rank) * rank] = w[i + j * rows];
  const residualNorms = new Float64Array(cols - rank);
  for (let j = rank; j < cols; j++) {
    let t = 0;
    for (let i = rank; i < rows; i++) t += w[i + j * rows] ** 2;
    residualNorms[j - rank] = Math.sqrt(t);
  }
  return { rank, perm, r12, residualNorms, diagonal: diagonal.subarray(0, Math.min(diagonal.length, rank + 1)), r11, qtb };
}

/** Solve R X = C in place for upper-triangular R (r×r) and C (r×c), column-major. */
export function solveUpperInPlace(r: Float64Array, size: number, c: Float64Array, ccols: number): Float64Array {
  for (let j = 0; j < ccols; j++) {
    const off = j * size;
    for (let i = size - 1; i >= 0; i--) {
      let s = c[off + i];
      for (let t = i + 1; t < size; t++) s -= r[i + t * size] * c[off + t];
      c[off + i] = s / r[i + i * size];
    }
  }
  return c;
}
