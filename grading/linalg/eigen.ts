/**
 * General (non-symmetric) eigendecomposition of a small real operator, with
 * complex eigenvectors unpacked from the real block form of real-eigen.ts,
 * left eigenvectors normalised so that Ŵᴴ V̂ = I, and eigenvalue condition
 * numbers κ_j = ‖w_j‖‖v_j‖/|w_jᴴ v_j| (Wilkinson's eigenvalue condition number;
 * fact of the trade: common practice, no source).
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { columnNorm, complexZeros, scaleColumn, type ComplexMatrix } from './complex.js';
import { realEigen } from './real-eigen.js';

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

/** The engine's check on a reduced operator: the right length and every entry finite (says where the first bad one is). */
function checkFinite(a: Float64Array, k: number): void {
  if (a.length < k * k) throw new RangeError(`the reduced operator has ${a.length} entries; a ${k}×${k} matrix needs ${k * k}`);
  for (let t = 0; t < k * k; t++) {
    if (!Number.isFinite(a[t])) {
      throw new RangeError(`the reduced operator has a non-finite entry (${a[t]} at row ${(t % k) + 1}, column ${Math.floor(t / k) + 1} of ${k}×${k})`);
    }
  }
}

interface Unpacked {
  re: Float64Array;
  im: Float64Array;
  /** Complex eigenvectors V, unit 2-norm columns. */
  vectors: ComplexMatrix;
  /** 2-norm of the block-form column pair (or column) behind each eigenvector: V = VR·diag(1/norms)·P. */
  norms: Float64Array;
  /** VR⁻ᵀ from real-eigen.ts when asked for (null if VR is singular). */
  leftBlock: Float64Array | null;
}

/** Eigenvalues and unit complex eigenvectors of a real k×k matrix, from the real block form of real-eigen.ts. */
function unpack(a: Float64Array, k: number, left: boolean): Unpacked {
  checkFinite(a, k);
  const res = realEigen(a, k, { left });
  const { re, im } = res;
  const block = res.vectors as Float64Array;
  const v = complexZeros(k, k);
  const norms = new Float64Array(k);
  let j = 0;
  while (j < k) {
    const o = j * k;
    if (im[j] > 0) {
      // Pair (j, j+1): v_j = (Re + i Im)/‖·‖, v_{j+1} its exact conjugate.
      const o2 = o + k;
      let ss = 0;
      for (let i = 0; i < k; i++) ss += block[o + i] * block[o + i] + block[o2 + i] * block[o2 + i];
      const nrm = Math.sqrt(ss) || 1;
      const sc = 1 / nrm;
      writePair(v, block, o, k, sc);
      norms[j] = norms[j + 1] = nrm;
      j += 2;
    } else {
      let ss = 0;
      for (let i = 0; i < k; i++) ss += block[o + i] * block[o + i];
      const nrm = Math.sqrt(ss) || 1;
      const sc = 1 / nrm;
      for (let i = 0; i < k; i++) v.re[o + i] = block[o + i] * sc;
      norms[j] = nrm;
      j += 1;
    }
  }
  return { re, im, vectors: v, norms, leftBlock: res.left };
}

/** Columns o/k and o/k + 1 of `dst` ← scale·(x + iy) and its conjugate, from the block-form columns x, y of `src` at o, o + k. */
function writePair(dst: ComplexMatrix, src: Float64Array, o: number, k: number, scale: number): void {
  const o2 = o + k;
  for (let i = 0; i < k; i++) {
    const xr = src[o + i] * scale;
    const xi = src[o2 + i] * scale;
    dst.re[o + i] = xr;
    dst.im[o + i] = xi;
    dst.re[o2 + i] = xr;
    dst.im[o2 + i] = -xi;
  }
}

/** Right eigenpairs of a real k×k matrix (column-major): complex pairs exact conjugates (positive imaginary part first), unit 2-norm eigenvectors. */
export function rightEigen(a: Float64Array, k: number): { re: Float64Array; im: Float64Array; vectors: ComplexMatrix } {
  const { re, im, vectors } = unpack(a, k, false);
  return { re, im, vectors };
}

/** Eigenvalues only of a real k×k matrix (column-major): bit for bit the values and order of rightEigen, for well under half the work. */
export function eigenvaluesOnly(a: Float64Array, k: number): { re: Float64Array; im: Float64Array } {
  checkFinite(a, k);
  const { re, im } = realEigen(a, k, { vectors: false });
  return { re, im };
}

/** Eigenvalues, right and left eigenvectors (Ŵᴴ V̂ = I) and condition numbers of a real k×k matrix (column-major). */
export function generalEigen(a: Float64Array, k: number): GeneralEigen {
  const { re, im, vectors, norms, leftBlock } = unpack(a, k, true);
  const condition = new Float64Array(k);
  let left = complexZeros(k, k);
  // V = VR·S·P with S = diag(1/norms) and P = [[1, 1], [i, −i]] on a pair, 1 on a real
  // value, so V⁻¹ = P⁻¹·S⁻¹·VR⁻¹ with P⁻¹ = ½[[1, −i], [1, i]]. With C = VR⁻ᵀ (columns
  // c_j = rows of VR⁻¹), W = (V⁻¹)ᴴ: w_j = norm·(c_j + i c_{j+1})/2 and w_{j+1} = conj(w_j)
  // for a pair, w_j = norm·c_j for a real value.
  if (leftBlock !== null) {
    let j = 0;
    while (j < k) {
      const o = j * k;
      if (im[j] > 0) {
        const h = norms[j] / 2;
        writePair(left, leftBlock, o, k, h);
        j += 2;
      } else {
        const h = norms[j];
        for (let i = 0; i < k; i++) left.re[o + i] = leftBlock[o + i] * h;
        j += 1;
      }
    }
    for (let c = 0; c < k; c++) condition[c] = columnNorm(left, c) * columnNorm(vectors, c);
  }
  if (leftBlock === null || condition.some((x) => !Number.isFinite(x))) {
    // Singular eigenvector basis: no left eigenvectors, infinite condition numbers.
    left = complexZeros(k, k);
    condition.fill(Number.POSITIVE_INFINITY);
  }
  return { valuesRe: re, valuesIm: im, right: vectors, left, condition };
}

/**
 * Right eigenpairs by ml-matrix's EigenvalueDecomposition (JAMA: tred2/tql2 for
 * an exactly symmetric matrix, orthes/hqr2 otherwise), unpacked the same way.
 * Kept as an independent cross-check for the tests.
 */
export function rightEigenMlMatrix(a: Float64Array, k: number): { re: Float64Array; im: Float64Array; vectors: ComplexMatrix } {
  checkFinite(a, k);
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
      // JAMA form: columns j, j+1 hold Re and Im of the eigenvector of d[j] + i e[j].
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
