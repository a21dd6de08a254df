/**
 * Gram products on snapshot matrices (column-major, one snapshot contiguous).
 *
 * Fast route: a WebAssembly SIMD (f64x2) micro-kernel (kernels-wasm.ts,
 * wasm-simd.ts), or the register-blocked 4×4 scalar kernels (kernels.ts) when
 * wasm SIMD is unavailable or MODEWRIGHT_WASM=0; both sum in the same fixed row
 * chunks in the same order and give bit-identical results.
 * Every product is summed as two row halves, P = P_lo + P_hi, whether or not a
 * helper thread computes one of them, so the result does not depend on the
 * number of cores. The result equals the straightforward formula up to
 * floating-point summation order (`gramSymmetricReference`, `gramCrossReference`).
 */
import { copyRows, mirrorUpper } from './kernels.js';
import { crossRows, gramRows, productRows, wasmWanted } from './kernels-wasm.js';
import { runOnHelper, threadsWanted } from './pool.js';
import { giveBack, takeArray } from './scratch.js';

/** Below this many multiply-adds a helper thread does not pay for the hand-over. */
const THREAD_MIN_WORK = 4_000_000;

/** S = DᵀD, D of shape n×k. Returns k×k column-major, exactly symmetric. */
export async function gramSymmetric(d: Float64Array, n: number, k: number): Promise<Float64Array> {
  checkShape(d, n, k, 'D');
  const h = splitRow(n);
  const work = (k * (k + 1) / 2) * n;
  if (!threadsWanted() || work < THREAD_MIN_WORK || h === n) return gramSymmetricSync(d, n, k);
  const wasm = wasmWanted();
  const hi = takeArray(k * k, true);
  const part = helperRows(d, n, k, h);
  const helper = runOnHelper({ op: 'gram', data: part.data, ld: part.ld, k, r0: part.r0, r1: part.r1, out: hi, wasm }, part.transfer);
  const s = takeArray(k * k);
  gramRows(d, n, k, 0, h, s, wasm);
  if (!(await helper)) {
    hi.fill(0);
    gramRows(d, n, k, h, n, hi, wasm);
  }
  for (let i = 0; i < s.length; i++) s[i] += hi[i];
  giveBack(hi, ...part.pooled);
  mirrorUpper(s, k);
  return s;
}

/** Copies of the helper's rows up to this size go through the pool; larger ones are moved to the helper. */
let pooledCopyBytes = 32 << 20;

/** Test hook: the largest copy that goes through the pool (default 32 MiB; 0 moves every copy). */
export function setPooledCopyLimit(bytes: number = 32 << 20): void {
  pooledCopyBytes = bytes;
}

interface HelperRows {
  data: Float64Array;
  ld: number;
  r0: number;
  r1: number;
  /** Pooled buffers to hand back once the helper is done. */
  pooled: Float64Array[];
  /** Buffers moved (not shared) to the helper. */
  transfer: ArrayBuffer[];
}

/**
 * What the helper thread reads: the rows [h, n) of A (n×k). Shared input is read in
 * place; otherwise those rows are copied, into a pooled shared buffer (scratch.ts) or,
 * when large, into an ordinary buffer that is moved to the helper. A fresh shared
 * buffer per call is never used: both threads would keep it until each collects it,
 * and shared memory does not prompt a collection the way ordinary buffers do (such
 * buffers piled up by tens of megabytes per run).
 */
function helperRows(a: Float64Array, n: number, k: number, h: number): HelperRows {
  if (a.buffer instanceof SharedArrayBuffer) return { data: a, ld: n, r0: h, r1: n, pooled: [], transfer: [] };
  return copiedRows(a, n, k, h);
}

function copiedRows(a: Float64Array, n: number, k: number, h: number): HelperRows {
  const large = (n - h) * k * 8 > pooledCopyBytes;
  const part = large ? new Float64Array((n - h) * k) : takeArray((n - h) * k, true);
  copyRows(a, n, k, h, n, part);
  return { data: part, ld: n - h, r0: 0, r1: n - h, pooled: large ? [] : [part], transfer: large ? [part.buffer as ArrayBuffer] : [] };
}

export function gramSymmetricSync(d: Float64Array, n: number, k: number): Float64Array {
  checkShape(d, n, k, 'D');
  const h = splitRow(n);
  const wasm = wasmWanted();
  const s = takeArray(k * k);
  gramRows(d, n, k, 0, h, s, wasm);
  if (h < n) {
    const hi = takeArray(k * k);
    gramRows(d, n, k, h, n, hi, wasm);
    for (let i = 0; i < s.length; i++) s[i] += hi[i];
    giveBack(hi);
  }
  mirrorUpper(s, k);
  return s;
}

/** C = AᵀB, A of shape n×ka, B of shape n×kb. Returns ka×kb column-major. */
export async function gramCross(a: Float64Array, b: Float64Array, n: number, ka: number, kb: number): Promise<Float64Array> {
  checkShape(a, n, ka, 'A');
  checkShape(b, n, kb, 'B');
  const h = splitRow(n);
  if (!threadsWanted() || ka * kb * n < THREAD_MIN_WORK || h === n) return gramCrossSync(a, b, n, ka, kb);
  const wasm = wasmWanted();
  const hi = takeArray(ka * kb, true);
  const pa = helperRows(a, n, ka, h), pb = helperRows(b, n, kb, h);
  if (pa.ld !== pb.ld) {
    // One shared, one copied: the helper's kernel takes one row range for both, so copy the shared one's rows too.
    const copied = a.buffer instanceof SharedArrayBuffer ? pa : pb;
    const [src, kc] = copied === pa ? [a, ka] : [b, kb];
    Object.assign(copied, copiedRows(src, n, kc, h));
  }
  const helper = runOnHelper(
    { op: 'cross', a: pa.data, lda: pa.ld, ka, b: pb.data, ldb: pb.ld, kb, r0: pa.r0, r1: pa.r1, out: hi, wasm },
    [...pa.transfer, ...pb.transfer],
  );
  const c = new Float64Array(ka * kb);
  crossRows(a, n, ka, b, n, kb, 0, h, c, wasm);
  if (!(await helper)) {
    hi.fill(0);
    crossRows(a, n, ka, b, n, kb, h, n, hi, wasm);
  }
  for (let i = 0; i < c.length; i++) c[i] += hi[i];
  giveBack(hi, ...pa.pooled, ...pb.pooled);
  return c;
}

export function gramCrossSync(a: Float64Array, b: Float64Array, n: number, ka: number, kb: number): Float64Array {
  checkShape(a, n, ka, 'A');
  checkShape(b, n, kb, 'B');
  const h = splitRow(n);
  const wasm = wasmWanted();
  const c = new Float64Array(ka * kb);
  crossRows(a, n, ka, b, n, kb, 0, h, c, wasm);
  if (h < n) {
    const hi = new Float64Array(ka * kb);
    crossRows(a, n, ka, b, n, kb, h, n, hi, wasm);
    for (let i = 0; i < c.length; i++) c[i] += hi[i];
  }
  return c;
}

/**
 * C = A·B, A of shape p×q, B of shape q×s (column-major). Rows of C are split
 * between the main thread and the helper (each row's sums are the same
 * whichever thread computes them, so the result does not depend on threads).
 */
export async function matProduct(a: Float64Array, p: number, q: number, b: Float64Array, s: number): Promise<Float64Array> {
  checkShape(a, p, q, 'A');
  checkShape(b, q, s, 'B');
  const h = p >> 1;
  if (!threadsWanted() || p * q * s < THREAD_MIN_WORK || h === 0) return matProductSync(a, p, q, b, s);
  const wasm = wasmWanted();
  const c = new Float64Array(p * s);
  const part = helperRows(a, p, q, h);
  const sub = takeArray((p - h) * s, true);
  const helper = runOnHelper({ op: 'product', a: part.data, lda: part.ld, q, b, s, r0: part.r0, r1: part.r1, out: sub, ldc: p - h, oc: 0, wasm }, part.transfer)
    .then((ok) => ok && copyBack(sub, p - h, s, c, p, h));
  productRows(a, p, q, b, s, 0, h, c, p, wasm);
  if (!(await helper)) productRows(a, p, q, b, s, h, p, c, p, wasm);
  giveBack(sub, ...part.pooled);
  return c;
}

/** Rows the helper wrote into its block (rows × s) go to their place in C, from row r0. */
function copyBack(sub: Float64Array, rows: number, s: number, c: Float64Array, ldc: number, r0: number): boolean {
  for (let j = 0; j < s; j++) c.set(sub.subarray(j * rows, j * rows + rows), j * ldc + r0);
  return true;
}

export function matProductSync(a: Float64Array, p: number, q: number, b: Float64Array, s: number): Float64Array {
  checkShape(a, p, q, 'A');
  checkShape(b, q, s, 'B');
  const c = new Float64Array(p * s);
  productRows(a, p, q, b, s, 0, p, c, p, wasmWanted());
  return c;
}

/** Straightforward S = DᵀD (one dot product per entry, in row order); the fast routes are tested against it. */
export function gramSymmetricReference(d: Float64Array, n: number, k: number): Float64Array {
  checkShape(d, n, k, 'D');
  const s = new Float64Array(k * k);
  for (let j = 0; j < k; j++) {
    for (let i = 0; i <= j; i++) {
      let acc = 0;
      for (let t = 0; t < n; t++) acc += d[i * n + t] * d[j * n + t];
      s[i + j * k] = acc;
      s[j + i * k] = acc;
    }
  }
  return s;
}

/** Straightforward C = AᵀB. */
export function gramCrossReference(a: Float64Array, b: Float64Array, n: number, ka: number, kb: number): Float64Array {
  checkShape(a, n, ka, 'A');
  checkShape(b, n, kb, 'B');
  const c = new Float64Array(ka * kb);
  for (let j = 0; j < kb; j++) {
    for (let i = 0; i < ka; i++) {
      let acc = 0;
      for (let t = 0; t < n; t++) acc += a[i * n + t] * b[j * n + t];
      c[i + j * ka] = acc;
    }
  }
  return c;
}

/** Row where the lower half ends (fixed by n alone, so the summation order never depends on the thread count). */
function splitRow(n: number): number {
  return n >> 1;
}

function checkShape(x: Float64Array, n: number, k: number, name: string): void {
  if (!Number.isInteger(n) || !Number.isInteger(k) || n < 0 || k < 0) {
    throw new RangeError(`${name}: shape ${n}×${k} is not a pair of non-negative integers`);
  }
  if (x.length < n * k) throw new RangeError(`${name} has ${x.length} entries, expected at least ${n}×${k} = ${n * k}`);
}
