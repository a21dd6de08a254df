/**
 * Thin singular value decomposition A = U Σ Vᵀ of a real rows×cols matrix
 * (column-major), via ml-matrix (Golub–Kahan). Singular values descending.
 */
import { SingularValueDecomposition } from 'ml-matrix';
import { fromMatrix, toMatrix } from './eigen.js';

export interface ThinSvd {
  /** rows×k, column-major. */
  u: Float64Array;
  /** Singular values, descending, length k = min(rows, cols). */
  s: Float64Array;
  /** cols×k, column-major. */
  v: Float64Array;
  k: number;
}

/** Thin SVD of a rows×cols column-major matrix. */
export function thinSvd(a: Float64Array, rows: number, cols: number): ThinSvd {
  const svd = new SingularValueDecomposition(toMatrix(a, rows, cols), { autoTranspose: true });
  const k = Math.min(rows, cols);
  const sAll = svd.diagonal;
  const uM = svd.leftSingularVectors;
  const vM = svd.rightSingularVectors;
  const order = Array.from({ length: sAll.length }, (_, i) => i).sort((x, y) => sAll[y] - sAll[x]).slice(0, k);
  const u = new Float64Array(rows * k);
  const v = new Float64Array(cols * k);
  const s = new Float64Array(k);
  const uF = fromMatrix(uM);
  const vF = fromMatrix(vM);
  order.forEach((src, dst) => {
    s[dst] = sAll[src];
    u.set(uF.subarray(src * rows, src * rows + rows), dst * rows);
    v.set(vF.subarray(src * cols, src * cols + cols), dst * cols);
  });
  return { u, s, v, k };
}

/** Singular values only, descending. */
export function singularValues(a: Float64Array, rows: number, cols: number): Float64Array {
  const svd = new SingularValueDecomposition(toMatrix(a, rows, cols), {
    autoTranspose: true,
    computeLeftSingularVectors: false,
    computeRightSingularVectors: false,
  });
  return Float64Array.from(svd.diagonal).sort().reverse();
}
