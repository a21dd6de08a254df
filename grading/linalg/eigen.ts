/**
 * General (non-symmetric) eigendecomposition of a small real operator, with
 * complex eigenvectors unpacked from ml-matrix's real block form, left
 * eigenvectors normalised so that Ŵᴴ V̂ = I, and eigenvalue condition numbers
 * κ_j = ‖w_j‖‖v_j‖/|w_jᴴ v_j| (Wilkinson's eigenvalue condition number;
 * fact of the trade: common practice, no source).
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { cadjoint, cinverse, columnNorm, complexZeros, scaleColumn, type ComplexMatrix } from './complex.js';

export interface GeneralEigen {
  /** Eigenvalues λ_j, length k (real and imaginary parts). Complex pairs are exact conjugates, positive imaginary part first. */
  valuesRe: Float64Array;
  valuesIm: Float64Array;
  /** Right eigenvectors V (k×k), unit 2-norm columns. */
  right: ComplexMatrix;
  /** Left eigenvectors W (k×k) with Wᴴ V = I (column j belongs to λ_j). */
  left: ComplexMatrix;
  /** κ_j = ‖w_j‖‖v_j‖/|w_jᴴ v_j|; Infinity where the eigenvector basis is singular. */
  condition: Float64Array;
}

/** Real column-major k×k Float64Array → ml-matrix Matrix. */
export function toMatrix(a: Float64Array, rows: number, cols: number): Matrix {
  const m = new Matrix(rows, cols);
  for (let j = 0; j < cols; j++) for (let i = 0; i < rows; i++) m.set(i, j, a[i + j * rows]);
  return m;
}

/** ml-matrix Matrix → column-major Float64Array. */
export function fromMatrix(m: Matrix): Float64Array {
  const rows = m.rows;
  const cols = m.columns;
  const out = new Float64Array(rows * cols);
  for (let j = 0; j < cols; j++) for (let i = 0; i < rows; i++) out[i + j * rows] = m.get(i, j);
  return out;
}

/** Right eigenpairs of a real k×k matrix (column-major) with complex vectors unpacked from the real Schur-type block form. */
export function rightEigen(a: Float64Array, k: number): { re: Float64Array; im: Float64Array; vectors: ComplexMatrix } {
  for (let t = 0; t < k * k; t++) if (!Number.isFinite(a[t])) throw new RangeError('the reduced operator has a non-finite entry');
  const evd = new EigenvalueDecomposition(toMatrix(a, k, k));
  const d = evd.realEigenvalues;
  const e = evd.imaginaryEigenvalues;
  const vm = evd.eigenvectorMatrix;
  const re = new Float64Array(k);
  const im = new Float64Array(k);
  const v = complexZeros(k, k);
  let j = 0;
  while (j < k) {
    if (e[j] !== 0 && j + 1 < k) {
      // ml-matrix (JAMA form): columns j, j+1 hold Re and Im of the eigenvector of d[j] + i e[j].
      const sgn = e[j] > 0 ? 1 : -1;
      const lr = 0.5 * (d[j] + d[j + 1]);
      const li = 0.5 * (Math.abs(e[j]) + Math.abs(e[j + 1]));
      re[j] = lr;
      im[j] = li;
      re[j + 1] = lr;
      im[j + 1] = -li;
      for (let i = 0; i < k; i++) {
        const xr = vm.get(i, j);
        const xi = sgn * vm.get(i, j + 1);
        v.re[i + j * k] = xr;
        v.im[i + j * k] = xi;
        v.re[i + (j + 1) * k] = xr;
        v.im[i + (j + 1) * k] = -xi;
      }
      j += 2;
    } else {
      re[j] = d[j];
      im[j] = 0;
      for (let i = 0; i < k; i++) v.re[i + j * k] = vm.get(i, j);
      j += 1;
    }
  }
  for (let c = 0; c < k; c++) {
    const nrm = columnNorm(v, c);
    if (nrm > 0) scaleColumn(v, c, { re: 1 / nrm, im: 0 });
  }
  return { re, im, vectors: v };
}

/** Eigenvalues, right and left eigenvectors (Ŵᴴ V̂ = I) and condition numbers of a real k×k matrix (column-major). */
export function generalEigen(a: Float64Array, k: number): GeneralEigen {
  const { re, im, vectors } = rightEigen(a, k);
  const condition = new Float64Array(k);
  let left: ComplexMatrix;
  try {
    // Wᴴ = V⁻¹  ⇒  W = (V⁻¹)ᴴ.
    left = cadjoint(cinverse(vectors));
    for (let c = 0; c < k; c++) condition[c] = columnNorm(left, c) * columnNorm(vectors, c);
    if (condition.some((x) => !Number.isFinite(x))) throw new RangeError('singular');
  } catch {
    left = complexZeros(k, k);
    condition.fill(Number.POSITIVE_INFINITY);
  }
  return { valuesRe: re, valuesIm: im, right: vectors, left, condition };
}
