/**
 * Worker side of the dense-kernel pool (run by piscina). One task computes the
 * partial inner products of a row range into a shared output buffer; the
 * arithmetic is the same function the main thread runs, so results do not
 * depend on where a part was computed. `wasm` (decided on the main thread, so
 * MODEWRIGHT_WASM is read in one place) selects the WebAssembly SIMD kernel;
 * it gives the same bits as the scalar one, which it falls back to.
 */
import { crossRows, gramRows, productRows } from './kernels-wasm.js';

export interface GramTask {
  op: 'gram';
  data: Float64Array;
  ld: number;
  k: number;
  r0: number;
  r1: number;
  out: Float64Array;
  /** Use the wasm SIMD kernel if it runs here (same results either way). */
  wasm?: boolean;
}

export interface CrossTask {
  op: 'cross';
  a: Float64Array;
  lda: number;
  ka: number;
  b: Float64Array;
  ldb: number;
  kb: number;
  r0: number;
  r1: number;
  out: Float64Array;
  wasm?: boolean;
}

/** Rows [r0, r1) of C = A·B (A with leading dimension lda and q columns, B q×s) into out (leading dimension ldc). */
export interface ProductTask {
  op: 'product';
  a: Float64Array;
  lda: number;
  q: number;
  b: Float64Array;
  s: number;
  r0: number;
  r1: number;
  out: Float64Array;
  ldc: number;
  /** Row of out that row r0 goes to. */
  oc: number;
  wasm?: boolean;
}

export type KernelTask = GramTask | CrossTask | ProductTask;

/** Returns 1 when the part ran in the wasm kernel, 0 when in the scalar one. */
export default function runKernelTask(task: KernelTask): number {
  const wasm = task.wasm === true;
  const used = task.op === 'gram'
    ? gramRows(task.data, task.ld, task.k, task.r0, task.r1, task.out, wasm)
    : task.op === 'cross'
      ? crossRows(task.a, task.lda, task.ka, task.b, task.ldb, task.kb, task.r0, task.r1, task.out, wasm)
      : productRows(task.a, task.lda, task.q, task.b, task.s, task.r0, task.r1, task.out, task.ldc, wasm, task.oc);
  return used ? 1 : 0;
}
