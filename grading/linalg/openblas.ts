/**
 * The dense-kernel interface (backend.ts) on the machine's OpenBLAS and LAPACK,
 * through the Node-API addon in native/ (plain C, built by `node scripts/run.mjs
 * native`, which `npm start` and `npm test` call). Matrices go in and out as
 * column-major Float64Array without copies; LAPACK routines that destroy their
 * input work on a copy made in C.
 *
 * Every call is synchronous and runs in the calling thread: the engine runs in a
 * worker thread of its own (never on the API server's event loop), and OpenBLAS's
 * threads, if any, belong to that call.
 *
 * Threads (no oversubscription): OpenBLAS's thread count is one number per process.
 * With W engine workers that may run at the same time in one process, it is set to
 * max(1, ⌊cores / W⌋); W comes from configureBlasThreads(W) (a worker pool calls it
 * with its size) or MODEWRIGHT_ENGINE_WORKERS (default 1); MODEWRIGHT_BLAS_THREADS
 * overrides the result. One engine alone uses every core through OpenBLAS; a pool of
 * as many workers as cores runs each call single-threaded in its worker. LAPACK
 * calls on matrices of order below 1500 (every reduced operator, Ĝ up to m = 1500)
 * run on one thread whatever the count: their per-column thread synchronisation
 * gains little on two cores and loses badly on shared ones (native/modewright_linalg.c).
 * The TypeScript backend's helper thread is not used by this backend.
 */
import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import type { DenseBackend, GeneralEigen, SymmetricEigen, ThinSvd } from './backend.js';
import { complexZeros, type ComplexMatrix } from './complex.js';
import { takeArray } from './scratch.js';

/** The addon's functions (native/modewright_linalg.c). Outputs are written into the arrays passed. */
export interface NativeLinalg {
  gram(d: Float64Array, n: number, k: number, out: Float64Array): void;
  cross(a: Float64Array, b: Float64Array, n: number, ka: number, kb: number, out: Float64Array): void;
  product(a: Float64Array, p: number, q: number, b: Float64Array, s: number, out: Float64Array): void;
  symmetricEigen(a: Float64Array, k: number, r: number, valuesCount: number, values: Float64Array, vectors: Float64Array): void;
  generalEigen(a: Float64Array, k: number, wr: Float64Array, wi: Float64Array, vl: Float64Array | null, vr: Float64Array | null): void;
  svd(a: Float64Array, rows: number, cols: number, s: Float64Array, u: Float64Array, vt: Float64Array): void;
  leastSquares(a: Float64Array, rows: number, cols: number, b: Float64Array, nrhs: number, rcond: number, x: Float64Array, s: Float64Array): number;
  firstNonFinite(x: Float64Array, length: number): number;
  setThreads(n: number): void;
  threads(): number;
  config(): string;
}

/** Where the build puts the addon, relative to this file. */
export const ADDON_PATH = '../../native/build/Release/modewright_linalg.node';

let addon: NativeLinalg | null | undefined;
let loadError: string | null = null;

/** The addon, loaded on first use; null (with loadError()) when it is not built or does not load. */
export function loadAddon(): NativeLinalg | null {
  if (addon !== undefined) return addon;
  try {
    const req = createRequire(import.meta.url);
    addon = req(ADDON_PATH) as NativeLinalg;
    configureBlasThreads();
  } catch (err) {
    const msg = err instanceof Error ? err.message : String(err);
    loadError = /Cannot find module/.test(msg)
      ? 'the addon is not built (node scripts/run.mjs native builds it)'
      : msg.split('\n')[0];
    addon = null;
  }
  return addon;
}

/** Why the addon is not available (null when it is, or before the first loadAddon()). */
export function addonError(): string | null {
  return loadError;
}

/**
 * The rule for OpenBLAS's thread count: max(1, ⌊cores / workers⌋), `workers` being how
 * many engine workers of this process may call it at once (default MODEWRIGHT_ENGINE_WORKERS
 * or 1); MODEWRIGHT_BLAS_THREADS overrides. Returns the count set (0 without the addon).
 */
export function configureBlasThreads(workers?: number): number {
  const lib = addon ?? null;
  if (!lib) return 0;
  const env = Number(process.env.MODEWRIGHT_BLAS_THREADS);
  let n: number;
  if (Number.isInteger(env) && env >= 1) n = env;
  else {
    const w = workers ?? Number(process.env.MODEWRIGHT_ENGINE_WORKERS ?? 1);
    n = Math.max(1, Math.floor(availableParallelism() / (Number.isFinite(w) && w >= 1 ? w : 1)));
  }
  lib.setThreads(n);
  return lib.threads();
}

/** Complex vectors (unit columns, as dgeev leaves them) from LAPACK's real block form. */
function unpackVectors(block: Float64Array, k: number, im: Float64Array): ComplexMatrix {
  const v = complexZeros(k, k);
  let j = 0;
  while (j < k) {
    const o = j * k;
    if (im[j] > 0 && j + 1 < k) {
      const o2 = o + k;
      for (let i = 0; i < k; i++) {
        const xr = block[o + i], xi = block[o2 + i];
        v.re[o + i] = xr;
        v.im[o + i] = xi;
        v.re[o2 + i] = xr;
        v.im[o2 + i] = -xi;
      }
      j += 2;
    } else {
      v.re.set(block.subarray(o, o + k), o);
      j += 1;
    }
  }
  return v;
}

/**
 * GeneralEigen from dgeev's values, unit right vectors V and unit left vectors U
 * (u_jᴴA = λ_j u_jᴴ): w_j = u_j / conj(u_jᴴ v_j), so that Wᴴ V = I, and
 * κ_j = ‖w_j‖‖v_j‖ = 1/|u_jᴴ v_j|. A defective matrix (some u_jᴴ v_j = 0) gets no
 * left vectors and infinite condition numbers, as the TypeScript backend does.
 */
function generalFromLapack(lib: NativeLinalg, a: Float64Array, k: number): GeneralEigen {
  const re = new Float64Array(k), im = new Float64Array(k);
  const vl = new Float64Array(k * k), vr = new Float64Array(k * k);
  lib.generalEigen(a, k, re, im, vl, vr);
  // LAPACK returns a pair as λ, conj(λ) with the positive imaginary part first; make the pair exact.
  for (let j = 0; j + 1 < k; j++) {
    if (im[j] > 0) {
      re[j + 1] = re[j];
      im[j + 1] = -im[j];
      j++;
    }
  }
  const right = unpackVectors(vr, k, im);
  const u = unpackVectors(vl, k, im);
  let left = complexZeros(k, k);
  const condition = new Float64Array(k);
  let defective = false;
  for (let j = 0; j < k; j++) {
    const o = j * k;
    // c = u_jᴴ v_j
    let cr = 0, ci = 0;
    for (let i = 0; i < k; i++) {
      const ur = u.re[o + i], ui = u.im[o + i], vr_ = right.re[o + i], vi = right.im[o + i];
      cr += ur * vr_ + ui * vi;
      ci += ur * vi - ui * vr_;
    }
    const c2 = cr * cr + ci * ci;
    if (!(c2 > 0) || !Number.isFinite(c2)) {
      defective = true;
      break;
    }
    // w_j = u_j / conj(c) = u_j · c / |c|²
    const sr = cr / c2, si = ci / c2;
    let wn = 0, vn = 0;
    for (let i = 0; i < k; i++) {
      const ur = u.re[o + i], ui = u.im[o + i];
      const wr = ur * sr - ui * si, wi = ur * si + ui * sr;
      left.re[o + i] = wr;
      left.im[o + i] = wi;
      wn += wr * wr + wi * wi;
      vn += right.re[o + i] ** 2 + right.im[o + i] ** 2;
    }
    condition[j] = Math.sqrt(wn) * Math.sqrt(vn);
  }
  if (defective || condition.some((x) => !Number.isFinite(x))) {
    left = complexZeros(k, k);
    condition.fill(Number.POSITIVE_INFINITY);
  }
  return { valuesRe: re, valuesIm: im, right, left, condition };
}

/** The OpenBLAS backend on a loaded addon. */
export function openblasBackend(lib: NativeLinalg): DenseBackend & {
  leastSquares(a: Float64Array, rows: number, cols: number, b: Float64Array, nrhs: number, rcond?: number): { x: Float64Array; rank: number; singularValues: Float64Array };
} {
  return {
    name: 'openblas',
    firstNonFinite: (x, length) => lib.firstNonFinite(x, length),
    gram: async (d, n, k) => {
      // From the working-array pool: kernel EDMD gives this array back when done, so a run of
      // many references (the same size) keeps reusing warm memory.
      const out = takeArray(k * k);
      lib.gram(d, n, k, out);
      return out;
    },
    cross: async (a, b, n, ka, kb) => {
      const out = new Float64Array(ka * kb);
      lib.cross(a, b, n, ka, kb, out);
      return out;
    },
    product: async (a, p, q, b, s) => {
      const out = new Float64Array(p * s);
      lib.product(a, p, q, b, s, out);
      return out;
    },
    symmetricEigen: (a, k, r, valuesCount): SymmetricEigen => {
      const vc = valuesCount ?? r;
      const values = new Float64Array(vc);
      const vectors = new Float64Array(k * r);
      lib.symmetricEigen(a, k, r, vc, values, vectors);
      return { values, vectors };
    },
    generalEigen: (a, k) => generalFromLapack(lib, a, k),
    eigenvalues: (a, k) => {
      const re = new Float64Array(k), im = new Float64Array(k);
      lib.generalEigen(a, k, re, im, null, null);
      for (let j = 0; j + 1 < k; j++) {
        if (im[j] > 0) {
          re[j + 1] = re[j];
          im[j + 1] = -im[j];
          j++;
        }
      }
      return { re, im };
    },
    svd: (a, rows, cols): ThinSvd => {
      const k = Math.min(rows, cols);
      const s = new Float64Array(k), u = new Float64Array(rows * k), vt = new Float64Array(k * cols);
      lib.svd(a, rows, cols, s, u, vt);
      const v = new Float64Array(cols * k);
      for (let j = 0; j < cols; j++) for (let i = 0; i < k; i++) v[j + i * cols] = vt[i + j * k];
      return { u, s, v, k };
    },
    /** Minimum-norm least squares min ‖AX − B‖ by dgelsd; rcond: relative singular-value cut-off (default machine precision). */
    leastSquares: (a, rows, cols, b, nrhs, rcond = -1) => {
      const x = new Float64Array(cols * nrhs);
      const singularValues = new Float64Array(Math.min(rows, cols));
      const rank = lib.leastSquares(a, rows, cols, b, nrhs, rcond, x, singularValues);
      return { x, rank, singularValues };
    },
  };
}
