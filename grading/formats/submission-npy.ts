import { readNpy, type NpyArray } from './npy';
import { DatasetFormatError } from './errors';
import type { ComplexNumber } from './complex-literal';
import { LocatedError, singleVectorKinds } from './submission-types';
import type { PartKind } from '../../shared/score-report';

/**
 * NumPy .npy submissions: complex128 (a vector, or probes × k for modes) or
 * float64 (a real vector, or n × 2 real/imaginary columns; n × 2k for k
 * complex vectors). The bytes are decoded by the dataset reader in npy.ts.
 */

const NONFINITE = 'infinite or NaN values are not accepted; every value must be a finite number';

function message(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

/** Element (i, j) of a 2-D array stored in C or Fortran order. */
function flatIndex(i: number, j: number, rows: number, cols: number, fortran: boolean): number {
  return fortran ? i + j * rows : i * cols + j;
}

export function readNpyPart(bytes: Uint8Array, fileName: string, kind: PartKind, maxValues: number): ComplexNumber[][] {
  let arr: NpyArray;
  try {
    arr = readNpy(bytes, fileName, { maxValues: 2 * maxValues, maxBytes: bytes.length + 1 });
  } catch (e) {
    if (e instanceof DatasetFormatError) {
      throw new LocatedError(`expected a NumPy .npy file of float64 or complex128 values: ${e.detail}${e.offset !== undefined ? ` (byte ${e.offset})` : ''}`, 1, (e.offset ?? 0) + 1);
    }
    throw new LocatedError(`expected a NumPy .npy file of float64 or complex128 values: ${message(e)}`, 1, 1);
  }
  const isComplex = arr.isComplex;
  if (arr.kind !== 'complex128' && arr.kind !== 'float64') throw new LocatedError(`expected dtype complex128 or float64, found ${arr.dtype} (${arr.kind})`, 1, 1);
  const shape = arr.shape.length === 0 ? [1] : arr.shape;
  if (shape.length > 2) throw new LocatedError(`expected a 1-D or 2-D array, found shape (${shape.join(', ')})`, 1, 1);
  const rows = shape[0];
  const cols = shape.length === 2 ? shape[1] : 1;
  const fortran = arr.fortranOrder;
  const data = arr.data;
  const at = (k: number): ComplexNumber => {
    const v = isComplex ? { re: data[2 * k], im: data[2 * k + 1] } : { re: data[k], im: 0 };
    if (!Number.isFinite(v.re) || !Number.isFinite(v.im)) throw new LocatedError(`${NONFINITE} (element ${k} of the array)`, 1, 1);
    return v;
  };
  if (rows * cols > maxValues * 2) throw new LocatedError(`expected at most ${maxValues} values, found ${rows * cols}`, 1, 1);

  const vectors: ComplexNumber[][] = [];
  if (isComplex) {
    if (shape.length === 1) vectors.push(Array.from({ length: rows }, (_, i) => at(i)));
    else if (singleVectorKinds.has(kind) && rows !== 1 && cols !== 1) {
      throw new LocatedError(`expected a vector of complex values, found shape (${rows}, ${cols})`, 1, 1);
    } else if (singleVectorKinds.has(kind)) vectors.push(Array.from({ length: rows * cols }, (_, k) => at(k)));
    else for (let j = 0; j < cols; j++) vectors.push(Array.from({ length: rows }, (_, i) => at(flatIndex(i, j, rows, cols, fortran))));
  } else {
    if (shape.length === 1) vectors.push(Array.from({ length: rows }, (_, i) => at(i)));
    else if (cols === 2 || (!singleVectorKinds.has(kind) && cols % 2 === 0)) {
      for (let j = 0; j < cols; j += 2) {
        vectors.push(
          Array.from({ length: rows }, (_, i) => ({
            re: at(flatIndex(i, j, rows, cols, fortran)).re,
            im: at(flatIndex(i, j + 1, rows, cols, fortran)).re,
          })),
        );
      }
    } else if (cols === 1) vectors.push(Array.from({ length: rows }, (_, i) => at(i)));
    else {
      throw new LocatedError(`expected float64 of shape (n, 2) holding real and imaginary parts, found shape (${rows}, ${cols})`, 1, 1);
    }
  }
  if (vectors.length === 0 || vectors[0].length === 0) throw new LocatedError('expected at least one value, found an empty array', 1, 1);
  return vectors;
}
