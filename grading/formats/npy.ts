/**
 * NumPy .npy arrays (format versions 1.0, 2.0 and 3.0): float64, float32,
 * complex128 and complex64, little- or big-endian, C or Fortran order.
 * Format as documented with numpy.lib.format; pure: takes bytes and a file name.
 */
import { sharedFloat64 } from '../linalg/pool.js';
import { DatasetFormatError, limitsOf, type ReadLimits, type RealMatrix } from './errors.js';

export type NpyKind = 'float64' | 'float32' | 'complex128' | 'complex64';

export interface NpyArray {
  /** The descr string of the header, e.g. '<f8', '<c16'. */
  dtype: string;
  kind: NpyKind;
  isComplex: boolean;
  shape: number[];
  fortranOrder: boolean;
  /** Values in file order, as float64; complex values interleaved (re, im). */
  data: Float64Array;
  version: string;
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

const KINDS: Record<string, { kind: NpyKind; size: number }> = {
  f8: { kind: 'float64', size: 8 },
  f4: { kind: 'float32', size: 4 },
  c16: { kind: 'complex128', size: 16 },
  c8: { kind: 'complex64', size: 8 },
};

function parseHeader(header: string, fileName: string, at: number): { descr: string; fortran: boolean; shape: number[] } {
  const descr = /['"]descr['"]\s*:\s*['"]([^'"]*)['"]/.exec(header);
  const fortran = /['"]fortran_order['"]\s*:\s*(True|False)/.exec(header);
  const shape = /['"]shape['"]\s*:\s*\(([^)]*)\)/.exec(header);
  if (!descr) throw new DatasetFormatError(fileName, 'the .npy header has no readable "descr" entry (a structured or object dtype is not supported)', { offset: at });
  if (!fortran) throw new DatasetFormatError(fileName, 'the .npy header has no "fortran_order" entry', { offset: at });
  if (!shape) throw new DatasetFormatError(fileName, 'the .npy header has no "shape" entry', { offset: at });
  const dims = shape[1]
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '')
    .map((s) => {
      if (!/^\d+L?$/.test(s)) throw new DatasetFormatError(fileName, `the .npy shape has a dimension "${s}" that is not a non-negative integer`, { offset: at });
      return Number(s.replace('L', ''));
    });
  return { descr: descr[1], fortran: fortran[1] === 'True', shape: dims };
}

interface NpyLayout {
  descr: string;
  kind: NpyKind;
  isComplex: boolean;
  /** Bytes per real scalar (8 or 4); a complex value is two scalars. */
  scalarSize: number;
  little: boolean;
  shape: number[];
  fortran: boolean;
  count: number;
  dataStart: number;
  version: string;
  view: DataView;
}

/** Header and size checks of a .npy file; locates the data without reading it. */
function parseNpy(bytes: Uint8Array, fileName: string, limits?: ReadLimits): NpyLayout {
  const lim = limitsOf(limits);
  if (bytes.byteLength > lim.maxBytes) throw new DatasetFormatError(fileName, `the file has ${bytes.byteLength} bytes, more than the limit of ${lim.maxBytes}`);
  if (bytes.byteLength < 10 || MAGIC.some((b, i) => bytes[i] !== b)) {
    throw new DatasetFormatError(fileName, 'not a NumPy .npy file: it does not start with the bytes \\x93NUMPY', { offset: 0 });
  }
  const major = bytes[6];
  const minor = bytes[7];
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let headerLen: number;
  let headerStart: number;
  if (major === 1) {
    headerLen = view.getUint16(8, true);
    headerStart = 10;
  } else if (major === 2 || major === 3) {
    if (bytes.byteLength < 12) throw new DatasetFormatError(fileName, 'the .npy file ends inside its header', { offset: bytes.byteLength });
    headerLen = view.getUint32(8, true);
    headerStart = 12;
  } else {
    throw new DatasetFormatError(fileName, `unsupported .npy format version ${major}.${minor}; expected 1.0, 2.0 or 3.0`, { offset: 6 });
  }
  const dataStart = headerStart + headerLen;
  if (dataStart > bytes.byteLength) throw new DatasetFormatError(fileName, `the .npy header claims ${headerLen} bytes but the file ends at byte ${bytes.byteLength}`, { offset: 8 });
  let header: string;
  try {
    header = new TextDecoder(major === 3 ? 'utf-8' : 'latin1', { fatal: true }).decode(bytes.subarray(headerStart, dataStart));
  } catch {
    throw new DatasetFormatError(fileName, 'the .npy header is not valid text', { offset: headerStart });
  }
  const h = parseHeader(header, fileName, headerStart);
  const m = /^([<>|=]?)([fc]\d+)$/.exec(h.descr);
  const info = m ? KINDS[m[2]] : undefined;
  if (!m || !info) {
    throw new DatasetFormatError(fileName, `unsupported dtype "${h.descr}"; expected float64 ('<f8'), float32 ('<f4'), complex128 ('<c16') or complex64 ('<c8')`, { offset: headerStart });
  }
  const little = m[1] !== '>';
  let count = 1;
  for (const d of h.shape) count *= d;
  if (h.shape.length > 2) throw new DatasetFormatError(fileName, `array of shape (${h.shape.join(', ')}); expected a 1-D or 2-D array`, { offset: headerStart });
  if (count > lim.maxValues) throw new DatasetFormatError(fileName, `${count} values, more than the limit of ${lim.maxValues}`, { offset: headerStart });
  const expected = count * info.size;
  const available = bytes.byteLength - dataStart;
  if (available < expected) {
    throw new DatasetFormatError(fileName, `the data is cut short: shape (${h.shape.join(', ')}) of ${h.descr} needs ${expected} bytes, the file has ${available}`, { offset: bytes.byteLength });
  }
  if (available > expected) {
    throw new DatasetFormatError(fileName, `${available - expected} unexpected bytes after the data of shape (${h.shape.join(', ')})`, { offset: dataStart + expected });
  }
  const isComplex = info.kind.startsWith('complex');
  const scalarSize = isComplex ? info.size / 2 : info.size;
  return { descr: h.descr, kind: info.kind, isComplex, scalarSize, little, shape: h.shape, fortran: h.fortran, count, dataStart, version: `${major}.${minor}`, view };
}

/** Read a .npy file. */
export function readNpy(bytes: Uint8Array, fileName: string, limits?: ReadLimits): NpyArray {
  const p = parseNpy(bytes, fileName, limits);
  const nScalars = p.isComplex ? 2 * p.count : p.count;
  const data = new Float64Array(nScalars);
  for (let t = 0; t < nScalars; t++) {
    const off = p.dataStart + t * p.scalarSize;
    data[t] = p.scalarSize === 8 ? p.view.getFloat64(off, p.little) : p.view.getFloat32(off, p.little);
  }
  return { dtype: p.descr, kind: p.kind, isComplex: p.isComplex, shape: p.shape, fortranOrder: p.fortran, data, version: p.version };
}

const HOST_LITTLE_ENDIAN = new Uint8Array(Float64Array.of(1).buffer)[7] === 0x3f;

/**
 * A real .npy file straight into a column-major matrix: the same checks and messages as
 * npyToRealMatrix(readNpy(…)), but the values are held once (in shared memory, so the
 * engine's helper thread uses them without a copy). Little-endian float64 whose file order
 * is column-major (Fortran order, or one row or column) is a plain byte copy.
 */
export function readNpyRealMatrix(bytes: Uint8Array, fileName: string, limits?: ReadLimits): RealMatrix {
  const p = parseNpy(bytes, fileName, limits);
  if (p.isComplex) throw new DatasetFormatError(fileName, `unsupported dtype ${p.kind} ("${p.descr}") for snapshot data; expected real float64 or float32`);
  const { rows, cols } = shapeAsMatrix(p.shape);
  const data = sharedFloat64(rows * cols);
  const notFinite = (i: number, j: number, v: number) =>
    new DatasetFormatError(fileName, `element (${i + 1}, ${j + 1}) is ${Number.isNaN(v) ? 'NaN' : 'infinite'}; expected a finite number`);
  if (p.scalarSize === 8 && p.little && HOST_LITTLE_ENDIAN && (p.fortran || rows <= 1 || cols <= 1)) {
    new Uint8Array(data.buffer).set(bytes.subarray(p.dataStart, p.dataStart + 8 * p.count));
    for (let t = 0; t < data.length; t++) {
      const v = data[t];
      if (!Number.isFinite(v)) throw notFinite(t % rows, Math.floor(t / rows), v);
    }
    return { rows, cols, data };
  }
  const { view, dataStart, scalarSize, little, fortran } = p;
  for (let j = 0; j < cols; j++) {
    for (let i = 0; i < rows; i++) {
      const off = dataStart + fileIndex(i, j, rows, cols, fortran) * scalarSize;
      const v = scalarSize === 8 ? view.getFloat64(off, little) : view.getFloat32(off, little);
      if (!Number.isFinite(v)) throw notFinite(i, j, v);
      data[i + j * rows] = v;
    }
  }
  return { rows, cols, data };
}

/** Index of element (i, j) of a 2-D array in file order. */
function fileIndex(i: number, j: number, rows: number, cols: number, fortran: boolean): number {
  return fortran ? i + j * rows : i * cols + j;
}

/** Shape of a .npy array as a matrix: 0-D → 1×1, 1-D (k) → 1×k (a scalar series), 2-D as is. */
export function npyMatrixShape(a: NpyArray): { rows: number; cols: number } {
  return shapeAsMatrix(a.shape);
}

function shapeAsMatrix(shape: number[]): { rows: number; cols: number } {
  if (shape.length === 0) return { rows: 1, cols: 1 };
  if (shape.length === 1) return { rows: 1, cols: shape[0] };
  return { rows: shape[0], cols: shape[1] };
}

/** A real .npy array as a column-major matrix; rejects complex and non-finite values with a located message. */
export function npyToRealMatrix(a: NpyArray, fileName: string): RealMatrix {
  if (a.isComplex) throw new DatasetFormatError(fileName, `unsupported dtype ${a.kind} ("${a.dtype}") for snapshot data; expected real float64 or float32`);
  const { rows, cols } = npyMatrixShape(a);
  const data = new Float64Array(rows * cols);
  for (let j = 0; j < cols; j++) {
    for (let i = 0; i < rows; i++) {
      const v = a.data[fileIndex(i, j, rows, cols, a.fortranOrder)];
      if (!Number.isFinite(v)) {
        throw new DatasetFormatError(fileName, `element (${i + 1}, ${j + 1}) is ${Number.isNaN(v) ? 'NaN' : 'infinite'}; expected a finite number`);
      }
      data[i + j * rows] = v;
    }
  }
  return { rows, cols, data };
}

/** A .npy array as a complex column-major matrix (split storage); real arrays get zero imaginary parts. */
export function npyToComplexMatrix(a: NpyArray): { rows: number; cols: number; re: Float64Array; im: Float64Array } {
  const { rows, cols } = npyMatrixShape(a);
  const re = new Float64Array(rows * cols);
  const im = new Float64Array(rows * cols);
  for (let j = 0; j < cols; j++) {
    for (let i = 0; i < rows; i++) {
      const k = fileIndex(i, j, rows, cols, a.fortranOrder);
      if (a.isComplex) {
        re[i + j * rows] = a.data[2 * k];
        im[i + j * rows] = a.data[2 * k + 1];
      } else re[i + j * rows] = a.data[k];
    }
  }
  return { rows, cols, re, im };
}

export interface NpyWriteOptions {
  /** Write in Fortran order (default true: the column-major data is written as is). */
  fortranOrder?: boolean;
  /** Write a 1-D array of this length instead of a 2-D one (rows·cols must match). */
  vector?: boolean;
}

function encodeHeader(descr: string, fortran: boolean, shape: number[]): Uint8Array {
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  let dict = `{'descr': '${descr}', 'fortran_order': ${fortran ? 'True' : 'False'}, 'shape': ${shapeText}, }`;
  const total = 10 + dict.length + 1;
  const pad = (64 - (total % 64)) % 64;
  dict = dict + ' '.repeat(pad) + '\n';
  const out = new Uint8Array(10 + dict.length);
  out.set(MAGIC, 0);
  out[6] = 1;
  out[7] = 0;
  new DataView(out.buffer).setUint16(8, dict.length, true);
  for (let i = 0; i < dict.length; i++) out[10 + i] = dict.charCodeAt(i);
  return out;
}

/** Write a rows×cols column-major real (im absent) or complex matrix as .npy version 1.0 ('<f8' or '<c16'). */
export function writeNpy(m: { rows: number; cols: number; data?: Float64Array; re?: Float64Array; im?: Float64Array }, options: NpyWriteOptions = {}): Uint8Array {
  const fortran = options.fortranOrder ?? true;
  const re = m.re ?? m.data;
  if (!re) throw new RangeError('writeNpy: no data');
  const complex = m.im !== undefined;
  const shape = options.vector ? [m.rows * m.cols] : [m.rows, m.cols];
  const header = encodeHeader(complex ? '<c16' : '<f8', fortran, shape);
  const count = m.rows * m.cols;
  const body = new Uint8Array(count * (complex ? 16 : 8));
  const view = new DataView(body.buffer);
  let t = 0;
  const put = (i: number, j: number) => {
    const k = i + j * m.rows;
    view.setFloat64(t, re[k], true);
    t += 8;
    if (complex) {
      view.setFloat64(t, (m.im as Float64Array)[k], true);
      t += 8;
    }
  };
  if (fortran || options.vector) {
    for (let j = 0; j < m.cols; j++) for (let i = 0; i < m.rows; i++) put(i, j);
  } else {
    for (let i = 0; i < m.rows; i++) for (let j = 0; j < m.cols; j++) put(i, j);
  }
  const out = new Uint8Array(header.length + body.length);
  out.set(header, 0);
  out.set(body, header.length);
  return out;
}
