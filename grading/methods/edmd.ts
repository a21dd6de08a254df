/**
 * EDMD (Williams, Kevrekidis & Rowley 2015, J. Nonlinear Sci. 25:1307–1346).
 * K = G⁺A in exact arithmetic, computed as the least-squares solution of
 * Ψ_X K ≈ Ψ_Y (numerics.md, "EDMD" and "Conditioning"), never through G⁺A
 * (which squares the condition of Ψ_X):
 * - columns of Ψ_X and Ψ_Y scaled by the column norms d of Ψ_X (K ↦ D K D⁻¹,
 *   a similarity: the eigenvalues do not change);
 * - Householder QR with column pivoting of Ψ_X, the constant function first,
 *   stopped at a relative cut-off (default 1e-10): the dictionary's numerical
 *   rank r on the data;
 * - the basic solution on the r chosen functions, Z = R₁₁⁻¹(QᵀΨ_Y)_{1:r}; the
 *   operator on them is M = Z[:, chosen] (r×r); K has M's eigenvalues and N − r
 *   zeros, which the data do not determine (any value solves the least-squares
 *   problem equally well) and are marked so;
 * - the constant function is reproduced exactly: its column of Ψ_Y equals its
 *   column of Ψ_X, so its least-squares solution is e₁ exactly, and is set so
 *   rather than computed with round-off (λ = 1 stays 1).
 * Eigenfunctions φ_j = Ψ_X,chosen z_j; modes of the full state from the left
 * eigenvectors of M: x ≈ Σ_j φ_j(x) (y_jᴴ B) with B = R₁₁⁻¹(QᵀXᵀ)_{1:r}.
 */
import { pivotedQr } from '../linalg/backend.js';
import { backend } from '../linalg/backend.js';
import { cabs, columnNorm, rcmatmul, type Complex, type ComplexMatrix } from '../linalg/complex.js';
import { solveUpperInPlace } from '../linalg/qr.js';
import { buildDictionary } from './dictionaries.js';
import { checkCommonOptions, finalizeSpectrum, wantModes } from './finalize.js';
import { pairMatrices } from './pairs.js';
import { createRng } from '../scenarios/prng.js';
import { deviations, measureSensitivity } from './sensitivity.js';
import { SpectrumInputError, type EdmdOptions, type PairSource, type SpectrumResult } from './types.js';

export const DEFAULT_EDMD_CUTOFF = 1e-10;

/** G⁺ (N×N) of a symmetric positive semi-definite G via its eigendecomposition; eigenvalues ≤ N·ε·λ_max are dropped. Kept for comparisons; EDMD itself no longer uses it. */
export function symmetricPseudoInverse(g: Float64Array, size: number): { pinv: Float64Array; rank: number; eigenvalues: Float64Array } {
  const e = backend().symmetricEigen(g, size, size);
  const tol = size * Number.EPSILON * Math.max(e.values[0], 0);
  const pinv = new Float64Array(size * size);
  let rank = 0;
  for (let c = 0; c < size; c++) {
    const l = e.values[c];
    if (!(l > tol)) continue;
    rank++;
    for (let j = 0; j < size; j++) {
      const vj = e.vectors[j + c * size] / l;
      if (vj === 0) continue;
      for (let i = 0; i < size; i++) pinv[i + j * size] += e.vectors[i + c * size] * vj;
    }
  }
  return { pinv, rank, eigenvalues: e.values };
}

/**
 * Largest move of each eigenvalue of M when the basic least-squares solution K (in pivot order [[M, M₂], [0, 0]])
 * is replaced by K + N C, N = [−R₁₁⁻¹R₁₂; I] spanning the null space of the truncated Ψ_X (only the columns of
 * `use`), C random and scaled so that ‖N C‖_F = ‖M‖_F.
 */
function alternativeSolutionMoves(mOp: Float64Array, z: Float64Array, r11: Float64Array, r12: Float64Array, chosen: number[], rest: number[], r: number, size: number, use: boolean[]): number[] {
  const k = size - r;
  const nTop = solveUpperInPlace(r11, r, Float64Array.from(r12, (v) => -v), k); // r×k
  const order = [...chosen, ...rest];
  const kp = new Float64Array(size * size);
  let mNorm = 0;
  for (let c = 0; c < size; c++) for (let i = 0; i < r; i++) {
    const v = z[i + order[c] * r];
    kp[i + c * size] = v;
    mNorm += v * v;
  }
  let nNorm = 0;
  for (let t = 0; t < k; t++) {
    if (!use[t]) continue;
    for (let i = 0; i < r; i++) nNorm += nTop[i + t * r] ** 2;
    nNorm += 1;
  }
  const rng = createRng(20261202);
  const cMat = Float64Array.from({ length: k * size }, (_, t) => (use[t % k] ? rng.normal() : 0));
  let cNorm = 0;
  for (const v of cMat) cNorm += v * v;
  const f = Math.sqrt(mNorm) / Math.sqrt(nNorm * cNorm);
  for (let c = 0; c < size; c++) {
    for (let t = 0; t < k; t++) {
      const w = cMat[t + c * k] * f;
      for (let i = 0; i < r; i++) kp[i + c * size] += nTop[i + t * r] * w;
      kp[r + t + c * size] += w;
    }
  }
  const alt = backend().eigenvalues(kp, size);
  const mev = backend().eigenvalues(mOp, r);
  const ours = Array.from(mev.re, (re, i): Complex => ({ re, im: mev.im[i] }));
  const other = Array.from(alt.re, (re, i): Complex => ({ re, im: alt.im[i] }));
  const dev = deviations(ours, [other]);
  // eigenvalues(mOp) and generalEigen(mOp) return the same values in the same order (backend contract)
  return dev;
}

/** Pad an r-column complex matrix with zero columns to `cols`. */
function padColumns(a: ComplexMatrix, cols: number): ComplexMatrix {
  const re = new Float64Array(a.rows * cols);
  const im = new Float64Array(a.rows * cols);
  re.set(a.re);
  im.set(a.im);
  return { rows: a.rows, cols, re, im };
}

interface Fixed {
  /** Chosen functions in pivot order (length r). */
  order: number[];
  scale: Float64Array;
}

async function edmdRun(source: PairSource, options: EdmdOptions, fixed?: Fixed): Promise<{ result: SpectrumResult; fixed: Fixed }> {
  checkCommonOptions(options);
  const cutoff = options.cutoff ?? DEFAULT_EDMD_CUTOFF;
  if (!(cutoff > 0 && cutoff < 1)) throw new SpectrumInputError(`the least-squares cut-off must be in (0, 1), got ${cutoff}`);
  const { x, y, n, m } = pairMatrices(source);
  const dict = buildDictionary(options.dictionary, n, options.maxDictionarySize ?? 2000);
  const size = dict.size;
  const psiX = dict.evaluate(x, m);
  const psiY = dict.evaluate(y, m);
  // Column scaling by the norms of Ψ_X (a similarity of K).
  const scale = fixed?.scale ?? new Float64Array(size);
  if (!fixed) {
    for (let j = 0; j < size; j++) {
      let s = 0;
      for (let i = 0; i < m; i++) s += psiX[i + j * m] ** 2;
      scale[j] = s > 0 ? Math.sqrt(s) : 1;
    }
  }
  // The constant function's columns are identical in Ψ_X and Ψ_Y (checked, not assumed).
  let constantExact = true;
  for (let i = 0; i < m; i++) if (psiX[i] !== psiY[i]) constantExact = false;
  for (let j = 0; j < size; j++) {
    const d = scale[j];
    for (let i = 0; i < m; i++) {
      psiX[i + j * m] /= d;
      psiY[i + j * m] /= d;
    }
  }
  const modesWanted = wantModes(options) && !fixed;
  // Right-hand sides: Ψ_Y, and Xᵀ (m×n) for the modes.
  const bcols = size + (modesWanted ? n : 0);
  let rhs = psiY;
  if (modesWanted) {
    rhs = new Float64Array(m * bcols);
    rhs.set(psiY);
    for (let t = 0; t < n; t++) for (let i = 0; i < m; i++) rhs[i + (size + t) * m] = x[i * n + t];
  }
  const qr = pivotedQr(psiX, m, size, rhs, bcols, fixed ? { fixedOrder: fixed.order } : { cutoff, first: [0] });
  const r = qr.rank;
  if (r === 0) throw new SpectrumInputError('the dictionary matrix Ψ_X is zero; there is nothing to decompose', 0);
  const chosen = Array.from(qr.perm.subarray(0, r));
  const z = solveUpperInPlace(qr.r11, r, qr.qtb, bcols); // r×bcols: Z = R₁₁⁻¹QᵀΨ_Y, then B = R₁₁⁻¹QᵀXᵀ
  if (constantExact && chosen[0] === 0) {
    for (let i = 0; i < r; i++) z[i] = i === 0 ? 1 : 0;
  }
  const mOp = new Float64Array(r * r);
  for (let c = 0; c < r; c++) for (let i = 0; i < r; i++) mOp[i + c * r] = z[i + chosen[c] * r];
  const ev = backend().generalEigen(mOp, r);
  const re = new Float64Array(size);
  const im = new Float64Array(size);
  const condition = new Float64Array(size).fill(Number.POSITIVE_INFINITY);
  re.set(ev.valuesRe);
  im.set(ev.valuesIm);
  condition.set(ev.condition);
  const dropped = Array.from(qr.perm.subarray(r), (j) => dict.labels[j]);
  const undetermined = Array.from({ length: size }, (_, j) =>
    j < r ? null : { reason: 'dictionary-rank' as const, message: `the dictionary has numerical rank ${r} of ${size} on the data (relative cut-off ${cutoff}); this value is not determined by the data` },
  );
  if (r < size && !fixed) {
    // With a rank-deficient dictionary the least-squares solution is not unique: K + N C solves it as well for
    // any C when the columns of N span the null space of Ψ_X. An eigenvalue of M that another solution moves
    // depends on the solver, not on the data (it is determined only if a left eigenvector is orthogonal to that
    // null space). Test it with one such solution, C random and scaled to M.
    // Only the directions that are null to round-off (‖R₂₂ e_j‖ ≤ 10·max(m, N)·ε·|R₁₁|) give other exact solutions;
    // the ones dropped by the cut-off above that are near-null, and what they do is the measured sensitivity's job.
    const exact = Array.from(qr.residualNorms, (t) => t <= 10 * Math.max(m, size) * Number.EPSILON * qr.diagonal[0]);
    const moved = exact.some(Boolean) ? alternativeSolutionMoves(mOp, z, qr.r11, qr.r12, chosen, Array.from(qr.perm.subarray(r)), r, size, exact) : new Array<number>(r).fill(0);
    for (let j = 0; j < r; j++) {
      const lam = Math.hypot(ev.valuesRe[j], ev.valuesIm[j]);
      if (moved[j] > 1e-6 * (1 + lam)) {
        undetermined[j] = { reason: 'dictionary-rank', message: `the dictionary has numerical rank ${r} of ${size} on the data (relative cut-off ${cutoff}) and another least-squares solution moves this value by ${Number(moved[j].toPrecision(2))}; it depends on the solver, not on the data` };
      }
    }
  }
  const modeNorm = new Float64Array(size).fill(Number.NaN);
  const amplitude = new Float64Array(size).fill(Number.NaN);
  let phiX: ComplexMatrix | undefined;
  let modes: ComplexMatrix | undefined;
  let eigenfunctionsAt: ComplexMatrix | undefined;
  if (!fixed) {
    const sel = new Float64Array(m * r);
    for (let c = 0; c < r; c++) sel.set(psiX.subarray(chosen[c] * m, chosen[c] * m + m), c * m);
    phiX = padColumns(rcmatmul(sel, m, r, ev.right), size); // m×N
    if (modesWanted) {
      // Bᵀ (n×r) from the rows of B = R₁₁⁻¹QᵀXᵀ
      const bT = new Float64Array(n * r);
      for (let t = 0; t < n; t++) for (let i = 0; i < r; i++) bT[t + i * n] = z[i + (size + t) * r];
      const wConj: ComplexMatrix = { rows: r, cols: r, re: ev.left.re, im: Float64Array.from(ev.left.im, (v) => -v) };
      modes = padColumns(rcmatmul(bT, n, r, wConj), size); // column j = (y_jᴴ B)ᵀ
      for (let j = 0; j < size; j++) {
        modeNorm[j] = j < r ? columnNorm(modes, j) : 0;
        amplitude[j] = j < r ? modeNorm[j] * cabs({ re: phiX.re[j * m], im: phiX.im[j * m] }) : 0;
      }
    }
    if (options.points) {
      if (options.points.n !== n) throw new SpectrumInputError(`evaluation points have dimension ${options.points.n}, the data has ${n}`);
      const p = options.points.k;
      const psiP = dict.evaluate(options.points.data, p);
      const selP = new Float64Array(p * r);
      for (let c = 0; c < r; c++) for (let i = 0; i < p; i++) selP[i + c * p] = psiP[i + chosen[c] * p] / scale[chosen[c]];
      eigenfunctionsAt = padColumns(rcmatmul(selP, p, r, ev.right), size);
    }
  }
  const notes: string[] = [];
  if (r < size) {
    notes.push(
      `the dictionary has numerical rank ${r} of ${size} on the data (pivoted QR of the column-scaled Ψ_X, relative cut-off ${cutoff}; left out: ${dropped.slice(0, 6).join(', ')}${dropped.length > 6 ? ', …' : ''}): ${size - r} eigenvalue${size - r === 1 ? ' is' : 's are'} not determined by the data, reported as 0 and not graded`,
    );
  }
  const result = finalizeSpectrum(
    {
      method: 'edmd',
      n,
      m,
      rank: size,
      maxRank: r,
      raw: { re, im, condition, modeNorm, amplitude, modes, eigenfunctions: phiX, eigenfunctionsAt, undetermined },
      singularValues: Float64Array.from(qr.diagonal),
      truncation: { rule: 'tolerance', rank: r, threshold: cutoff },
      options: {
        dictionary: options.dictionary.kind === 'gaussian-radial' ? { kind: 'gaussian-radial', sigma: options.dictionary.sigma, centres: options.dictionary.centres.k } : options.dictionary,
        labels: dict.labels,
        cutoff,
      },
      notes,
    },
    fixed ? { ...options, top: undefined, modes: false } : options,
  );
  result.leastSquares = { solver: 'pivoted-qr', cutoff, dictionarySize: size, dictionaryRank: r, dropped };
  return { result, fixed: { order: chosen, scale } };
}

/** A radial dictionary whose centres are columns of X, with those columns taken from `source` (a perturbed copy); others as given. */
function centresFrom(source: PairSource, dict: EdmdOptions['dictionary']): EdmdOptions['dictionary'] {
  if (dict.kind !== 'gaussian-radial' || !dict.fromColumns) return dict;
  const { x, n, m } = pairMatrices(source);
  const cols = dict.fromColumns;
  const bad = cols.find((c) => !Number.isInteger(c) || c < 0 || c >= m);
  if (bad !== undefined) throw new SpectrumInputError(`radial centre column ${bad} is outside X (0-based columns 0 … ${m - 1})`);
  const data = new Float64Array(n * cols.length);
  cols.forEach((c, j) => data.set(x.subarray(c * n, c * n + n), j * n));
  return { ...dict, centres: { n, k: cols.length, data } };
}

/** EDMD of the pairs of `source` with the given dictionary: eigenvalues of K (least squares on Ψ_X), κ, eigenfunctions, modes. */
export async function edmd(source: PairSource, options: EdmdOptions): Promise<SpectrumResult> {
  const { result, fixed } = await edmdRun(source, options);
  // Perturbed copies reuse the chosen functions and the scaling: the same estimator on perturbed data.
  await measureSensitivity(result, source, options, async (s) => {
    const run = await edmdRun(s, { ...options, dictionary: centresFrom(s, options.dictionary), points: undefined, modes: false, sensitivity: false }, fixed);
    return run.result.eigenvalues.map((e): Complex => e.lambda);
  });
  return result;
}
