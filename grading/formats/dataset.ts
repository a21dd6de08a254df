/**
 * Snapshot datasets from files: CSV/whitespace text or .npy, one snapshot per
 * column (default) or per row; a single trajectory or explicit X and Y files.
 * Pure: the caller hands bytes and file names (only grading/cli.ts reads files).
 */
import type { PairSource, Snapshots } from '../methods/types.js';
import { readCsv, type CsvReadOptions } from './csv.js';
import { DatasetFormatError, type ReadLimits, type RealMatrix } from './errors.js';
import { readNpyRealMatrix } from './npy.js';

export type Layout = 'columns' | 'rows';

export interface DataFile {
  name: string;
  bytes: Uint8Array;
}

export interface DatasetReadOptions extends ReadLimits {
  /** One snapshot per column (default) or per row. */
  layout?: Layout;
  csv?: Omit<CsvReadOptions, keyof ReadLimits>;
}

/** .npy when the bytes start with the NumPy magic, otherwise delimited text. */
export function readMatrix(file: DataFile, limits?: ReadLimits, csv?: CsvReadOptions): RealMatrix {
  const b = file.bytes;
  if (b.byteLength >= 6 && b[0] === 0x93 && b[1] === 0x4e && b[2] === 0x55 && b[3] === 0x4d && b[4] === 0x50 && b[5] === 0x59) {
    return readNpyRealMatrix(b, file.name, limits);
  }
  if (/\.npy$/i.test(file.name)) throw new DatasetFormatError(file.name, 'the name ends in .npy but the file does not start with the NumPy magic bytes \\x93NUMPY', { offset: 0 });
  return readCsv(b, file.name, { ...(csv ?? {}), ...(limits ?? {}) });
}

/** Matrix → snapshots (n×k column-major) under the layout. */
export function toSnapshots(m: RealMatrix, layout: Layout = 'columns'): Snapshots {
  if (layout === 'columns') return { data: m.data, n: m.rows, k: m.cols };
  const data = new Float64Array(m.rows * m.cols);
  // snapshot i is row i: element (t, i) of the n×k result = m(i, t)
  for (let i = 0; i < m.rows; i++) for (let t = 0; t < m.cols; t++) data[t + i * m.cols] = m.data[i + t * m.rows];
  return { data, n: m.cols, k: m.rows };
}

/** Snapshots → matrix under the layout (inverse of toSnapshots). */
export function fromSnapshots(s: Snapshots, layout: Layout = 'columns'): RealMatrix {
  if (layout === 'columns') return { rows: s.n, cols: s.k, data: s.data };
  const data = new Float64Array(s.n * s.k);
  for (let i = 0; i < s.k; i++) for (let t = 0; t < s.n; t++) data[i + t * s.k] = s.data[t + i * s.n];
  return { rows: s.k, cols: s.n, data };
}

function layoutWord(layout: Layout): string {
  return layout === 'columns' ? 'columns (one snapshot per column)' : 'rows (one snapshot per row)';
}

/** A single trajectory (pairs are consecutive snapshots), or explicit X and Y when `y` is given. */
export function readPairSource(x: DataFile, y: DataFile | undefined, options: DatasetReadOptions = {}): PairSource {
  const layout = options.layout ?? 'columns';
  const sx = toSnapshots(readMatrix(x, options, options.csv), layout);
  if (!y) {
    if (sx.k < 2) {
      throw new DatasetFormatError(x.name, `too few snapshots: found ${sx.k} ${layoutWord(layout)} of length ${sx.n}; a trajectory needs at least 2 (use --layout ${layout === 'columns' ? 'rows' : 'columns'} if the file is the other way round)`);
    }
    return { kind: 'trajectory', snapshots: sx };
  }
  const sy = toSnapshots(readMatrix(y, options, options.csv), layout);
  if (sx.n !== sy.n || sx.k !== sy.k) {
    throw new DatasetFormatError(y.name, `X and Y shapes disagree: ${x.name} holds ${sx.k} snapshots of length ${sx.n}, ${y.name} holds ${sy.k} snapshots of length ${sy.n}; expected the same shape`);
  }
  if (sx.k < 1) throw new DatasetFormatError(x.name, 'too few snapshots: X holds no snapshot');
  return { kind: 'pairs', x: sx, y: sy };
}
