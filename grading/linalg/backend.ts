/**
 * The dense-kernel interface of the engine. `grading/methods/*` calls only
 * these functions for the dense linear algebra (products, symmetric and general
 * eigenproblems, SVD), so another backend (a native BLAS, a GPU) can be slotted
 * in here without touching the methods.
 *
 * Storage convention: column-major Float64Array; a snapshot matrix D of shape
 * n×k stores snapshot j contiguously at data[j*n .. j*n+n).
 *
 * OWNERSHIP: the fast implementations (blocked kernels, worker pool, partial
 * eigensolver) live in gram.ts / pool.ts / symmetric-eigen.ts; this file only
 * routes to them.
 */
import { gramSymmetric, gramCross, matProduct } from './gram.js';
import { eigenvaluesOnly, generalEigen, type GeneralEigen } from './eigen.js';
import { thinSvd, type ThinSvd } from './svd.js';
import { leadingSymmetricEigen, type SymmetricEigen } from './symmetric-eigen.js';
import { addonError, loadAddon, openblasBackend } from './openblas.js';
import { firstNonFinite } from './finite.js';
import { pivotedQr as pivotedQrJs, type PivotedQr, type PivotedQrOptions } from './qr.js';

export type { GeneralEigen, SymmetricEigen, ThinSvd, PivotedQr, PivotedQrOptions };

export interface DenseBackend {
  readonly name: string;
  /** Index of the first NaN or ±Inf among x[0..length), or -1 (the engine's input check: one pass over the data). */
  firstNonFinite(x: Float64Array, length: number): number;
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
  /**
   * Eigenvalues, unit right eigenvectors, left eigenvectors with Wᴴ V = I and condition
   * numbers of a real k×k matrix (column-major); conjugate pairs exact, positive imaginary part first.
   */
  generalEigen(a: Float64Array, k: number): GeneralEigen;
  /** Eigenvalues only of a real k×k matrix, the same values in the same order as generalEigen. */
  eigenvalues(a: Float64Array, k: number): { re: Float64Array; im: Float64Array };
  /** Thin SVD A = UΣVᵀ of a rows×cols matrix (column-major), singular values descending. */
  svd(a: Float64Array, rows: number, cols: number): ThinSvd;
  /**
   * Optional: minimum-norm least squares min ‖A X − B‖_F (A rows×cols, B rows×nrhs, column-major),
   * singular values ≤ rcond·σ₁ treated as zero (rcond < 0 or absent: machine precision).
   * Backends without it leave the engine's own solvers in charge.
   */
  leastSquares?(a: Float64Array, rows: number, cols: number, b: Float64Array, nrhs: number, rcond?: number): LeastSquares;
  /**
   * Householder QR with column pivoting of A (rows×cols) truncated at a relative cut-off, with Qᵀ applied to
   * B (rows×bcols) — the least-squares kernel of EDMD (qr.ts). Optional: a backend without it uses the JS one
   * (call it through `pivotedQr` below).
   */
  pivotedQr?(a: Float64Array, rows: number, cols: number, b: Float64Array, bcols: number, options?: PivotedQrOptions): PivotedQr;
}

export interface LeastSquares {
  /** cols×nrhs, column-major. */
  x: Float64Array;
  /** Numerical rank used. */
  rank: number;
  /** Singular values of A, descending, min(rows, cols). */
  singularValues: Float64Array;
}

export const jsBackend: DenseBackend = {
  name: 'typescript',
  firstNonFinite: (x, length) => firstNonFinite(x, length),
  gram: (d, n, k) => gramSymmetric(d, n, k),
  cross: (a, b, n, ka, kb) => gramCross(a, b, n, ka, kb),
  product: (a, p, q, b, s) => matProduct(a, p, q, b, s),
  symmetricEigen: (a, k, r, valuesCount) => leadingSymmetricEigen(a, k, r, valuesCount ?? r),
  generalEigen: (a, k) => generalEigen(a, k),
  eigenvalues: (a, k) => eigenvaluesOnly(a, k),
  svd: (a, rows, cols) => thinSvd(a, rows, cols),
  pivotedQr: (a, rows, cols, b, bcols, options) => pivotedQrJs(a, rows, cols, b, bcols, options),
};

/** The backends MODEWRIGHT_LINALG may name. */
export type LinalgBackendName = 'typescript' | 'openblas';

/**
 * The backend at start-up: MODEWRIGHT_LINALG=typescript|openblas forces one (openblas
 * throws when the addon cannot be loaded); unset, the OpenBLAS addon when it loads,
 * else the TypeScript kernels with one line on the console saying why.
 */
export function chooseBackend(wanted: string | undefined = process.env.MODEWRIGHT_LINALG): DenseBackend {
  const w = (wanted ?? '').trim().toLowerCase();
  if (w === 'typescript') return jsBackend;
  if (w !== '' && w !== 'openblas') throw new Error(`MODEWRIGHT_LINALG must be "typescript" or "openblas", got "${wanted}"`);
  const lib = loadAddon();
  if (lib) return openblasBackend(lib);
  if (w === 'openblas') throw new Error(`MODEWRIGHT_LINALG=openblas, but the OpenBLAS addon is not available: ${addonError()}`);
  if (!warned) {
    warned = true;
    console.warn(`[modewright] linear algebra: OpenBLAS backend unavailable (${addonError()}); using the TypeScript backend`);
  }
  return jsBackend;
}
let warned = false;

// Chosen on first use (not at import), so a bad MODEWRIGHT_LINALG is an ordinary error of the first engine call.
let current: DenseBackend | null = null;
export function backend(): DenseBackend {
  if (current === null) current = chooseBackend();
  return current;
}
export function setBackend(b: DenseBackend): void {
  current = b;
}

/** Pivoted QR through the current backend, or the JS kernel when the backend has none. */
export function pivotedQr(a: Float64Array, rows: number, cols: number, b: Float64Array, bcols: number, options?: PivotedQrOptions): PivotedQr {
  const be = backend();
  return be.pivotedQr ? be.pivotedQr(a, rows, cols, b, bcols, options) : pivotedQrJs(a, rows, cols, b, bcols, options);
}
