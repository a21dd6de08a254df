/**
 * Worker side of the dense-kernel pool (run by piscina). One task computes the
 * partial inner products of a row range into a shared output buffer; the
 * arithmetic is the same function the main thread runs, so results do not
 * depend on where a part was computed.
 */
import { crossRowsInto, gramRowsInto } from './kernels.js';

export interface GramTask {
  op: 'gram';
  data: Float64Array;
  ld: number;
  k: number;
  r0: number;
  r1: number;
  out: Float64Array;
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
}

export type KernelTask = GramTask | CrossTask;

export default function runKernelTask(task: KernelTask): number {
  if (task.op === 'gram') {
    gramRowsInto(task.data, task.ld, task.k, task.r0, task.r1, task.out);
  } else {
    crossRowsInto(task.a, task.lda, task.ka, task.b, task.ldb, task.kb, task.r0, task.r1, task.out);
  }
  return task.out.length;
}
