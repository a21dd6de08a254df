/**
 * A located problem in a dataset file: file name, 1-based line and column
 * (text formats) or byte offset (binary formats), and what was expected.
 */
export class DatasetFormatError extends Error {
  readonly file: string;
  readonly line?: number;
  readonly column?: number;
  readonly offset?: number;
  /** The bare description without the location prefix. */
  readonly detail: string;
  constructor(file: string, detail: string, where: { line?: number; column?: number; offset?: number } = {}) {
    const loc = where.line !== undefined ? `${file}:${where.line}${where.column !== undefined ? `:${where.column}` : ''}` : where.offset !== undefined ? `${file} (byte ${where.offset})` : file;
    super(`${loc}: ${detail}`);
    this.name = 'DatasetFormatError';
    this.file = file;
    this.line = where.line;
    this.column = where.column;
    this.offset = where.offset;
    this.detail = detail;
  }
}

/** Size limits of the readers; every one is a parameter. */
export interface ReadLimits {
  /** Largest accepted input in bytes (default 256 MiB). */
  maxBytes?: number;
  /** Largest accepted number of values (default 32 million). */
  maxValues?: number;
  /** Largest accepted number of rows / columns (default 10 million each). */
  maxRows?: number;
  maxCols?: number;
}

export const defaultLimits: Required<ReadLimits> = {
  maxBytes: 256 * 1024 * 1024,
  maxValues: 32 * 1024 * 1024,
  maxRows: 10_000_000,
  maxCols: 10_000_000,
};

export function limitsOf(l: ReadLimits | undefined): Required<ReadLimits> {
  return { ...defaultLimits, ...(l ?? {}) };
}

/** A real matrix read from a file: rows×cols, column-major. */
export interface RealMatrix {
  rows: number;
  cols: number;
  data: Float64Array;
}
