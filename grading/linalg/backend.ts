/**
 * The dense-kernel interface of the engine. `grading/methods/*` calls only
 * these functions for the heavy steps, so another backend (a native BLAS, a
 * GPU) can be slotted in here without touching the methods.
 *
 * Storage convention: column-major Float64Array; a snapshot matrix D of shape
 * n×k stores snapshot j contiguously at data[j*n .. j*n+n).
 *
 * OWNERSHIP: the fast implementations (blocked kernels, worker pool, partial
 * eigensolver) live in gram.ts / pool.ts / symmetric-eigen.ts; this file only
 * routes to them.
 */
import { gramSymmetric, gramCross, matProduct } from './gram.js';
import { leadingSymmetricEigen, type SymmetricEigen } from './symmetric-eigen.js';

export type { SymmetricEigen };

export interface DenseBackend {
  readonly name: string;
  /** S = DᵀD for D of shape n×k (column-major); returns k×k, column-major, exactly symmetric. */
  gram(d: Float64Array, n: number, k: number): Promise<Float64Array>;
  /** C = AᵀB for A of shape n×ka and B of shape n×kb; returns ka×kb column-major. */
  cross(a: Float64Array, b: Float64Array, n: number, ka: number, kb: number): Promise<Float64Array>;
  /** C = A·B for A of shape p×q and B of shape q×s; returns p×s column-major. */
  product(a: Float64Array, p: number, q: number, b: Float64Array, s: number): Promise<Float64Array>;
  /**
   * Leading r eigenpairs (largest eigenvalues first) of the symmetric k×k matrix `a`
   * (column-major). Vectors are k×r column-major, orthonormal. With `valuesCount`
   * (r ≤ valuesCount ≤ k) the leading valuesCount eigenvalues are returned and
   * still only r vectors; the leading r pairs are the same as without it.
   */
  symmetricEigen(a: Float64Array, k: number, r: number, valuesCount?: number): SymmetricEigen;
}

export const jsBackend: DenseBackend = {
  name: 'js',
  gram: (d, n, k) => gramSymmetric(d, n, k),
  cross: (a, b, n, ka, kb) => gramCross(a, b, n, ka, kb),
  product: (a, p, q, b, s) => matProduct(a, p, q, b, s),
  symmetricEigen: (a, k, r, valuesCount) => leadingSymmetricEigen(a, k, r, valuesCount ?? r),
};

let current: DenseBackend = jsBackend;
export function backend(): DenseBackend {
  return current;
}
export function setBackend(b: DenseBackend): void {
  current = b;
}
