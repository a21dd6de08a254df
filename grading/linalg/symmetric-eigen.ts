import { EigenvalueDecomposition, Matrix } from 'ml-matrix';

export interface SymmetricEigen {
  /** Eigenvalues, descending, length r. */
  values: Float64Array;
  /** Eigenvectors, k×r column-major, orthonormal; column i belongs to values[i]. */
  vectors: Float64Array;
}

/**
 * Leading r eigenpairs of a symmetric k×k matrix (column-major).
 * Reference version: full decomposition by ml-matrix (tridiagonal QL), then
 * the r largest. A partial solver may replace it at equal accuracy.
 */
export function leadingSymmetricEigen(a: Float64Array, k: number, r: number): SymmetricEigen {
  if (r > k) throw new RangeError(`asked for ${r} eigenpairs of a ${k}×${k} matrix`);
  const m = new Matrix(k, k);
  for (let j = 0; j < k; j++) for (let i = 0; i < k; i++) m.set(i, j, a[i + j * k]);
  const evd = new EigenvalueDecomposition(m, { assumeSymmetric: true });
  const vals = evd.realEigenvalues; // ascending
  const vecs = evd.eigenvectorMatrix;
  const values = new Float64Array(r);
  const vectors = new Float64Array(k * r);
  for (let c = 0; c < r; c++) {
    const src = k - 1 - c;
    values[c] = vals[src];
    for (let i = 0; i < k; i++) vectors[i + c * k] = vecs.get(i, src);
  }
  return { values, vectors };
}
