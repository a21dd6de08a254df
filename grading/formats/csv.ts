/**
 * Delimited text datasets: comma, semicolon or whitespace separated numbers,
 * one matrix row per line, an optional header row, `#` comments and blank
 * lines ignored. Pure: takes the text (or bytes) and a file name for messages.
 */
import { DatasetFormatError, limitsOf, type ReadLimits, type RealMatrix } from './errors.js';

export type Delimiter = ',' | ';' | 'whitespace';

export interface CsvReadOptions extends ReadLimits {
  /** Default: detected from the first data line (comma, else semicolon, else whitespace). */
  delimiter?: Delimiter;
  /** 'auto' (default): the first line is a header when none of its cells is a number. */
  header?: 'auto' | boolean;
}

const NUMBER_RE = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const NONFINITE_RE = /^[+-]?(?:inf(?:inity)?|nan)$/i;

interface Cell {
  text: string;
  column: number;
}

function splitLine(line: string, delimiter: Delimiter): Cell[] {
  const cells: Cell[] = [];
  if (delimiter === 'whitespace') {
    const re = /[^\s]+/g;
    let m: RegExpExecArray | null;
    while ((m = re.exec(line)) !== null) cells.push({ text: m[0], column: m.index + 1 });
    return cells;
  }
  let start = 0;
  for (let i = 0; i <= line.length; i++) {
    if (i === line.length || line[i] === delimiter) {
      const raw = line.slice(start, i);
      const lead = raw.length - raw.trimStart().length;
      cells.push({ text: raw.trim(), column: start + lead + 1 });
      start = i + 1;
    }
  }
  return cells;
}

function describe(text: string): string {
  return text.length > 24 ? `"${text.slice(0, 24)}…"` : `"${text}"`;
}

/** Decode bytes as UTF-8 (with a located error for invalid bytes). */
export function decodeText(bytes: Uint8Array, fileName: string): string {
  try {
    const text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
    return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  } catch {
    throw new DatasetFormatError(fileName, 'expected UTF-8 text (a CSV or whitespace-separated file), found bytes that are not valid UTF-8');
  }
}

/** Read a delimited text matrix (rows×cols, column-major). */
export function readCsv(input: string | Uint8Array, fileName: string, options: CsvReadOptions = {}): RealMatrix {
  const lim = limitsOf(options);
  const size = typeof input === 'string' ? input.length : input.byteLength;
  if (size > lim.maxBytes) throw new DatasetFormatError(fileName, `the file has ${size} bytes, more than the limit of ${lim.maxBytes}`);
  const text = typeof input === 'string' ? input : decodeText(input, fileName);
  if (text.includes('\u0000')) throw new DatasetFormatError(fileName, 'expected a text file, found a NUL byte (is this a binary file such as .npy?)');
  const lines = text.split(/\r\n|\n|\r/);
  let delimiter: Delimiter | undefined = options.delimiter;
  const headerMode = options.header ?? 'auto';
  let cols = -1;
  let colsLine = 0;
  let headerSeen = false;
  const rowsData: number[] = [];
  let rows = 0;
  for (let li = 0; li < lines.length; li++) {
    const lineNo = li + 1;
    const hash = lines[li].indexOf('#');
    const line = hash >= 0 ? lines[li].slice(0, hash) : lines[li];
    if (line.trim() === '') continue;
    if (delimiter === undefined) delimiter = line.includes(',') ? ',' : line.includes(';') ? ';' : 'whitespace';
    const cells = splitLine(line, delimiter);
    if (!headerSeen && cols < 0) {
      headerSeen = true;
      const numeric = cells.filter((c) => NUMBER_RE.test(c.text) || NONFINITE_RE.test(c.text)).length;
      const isHeader = headerMode === true || (headerMode === 'auto' && numeric === 0);
      if (isHeader) {
        cols = cells.length;
        colsLine = lineNo;
        continue;
      }
    }
    if (cols < 0) {
      cols = cells.length;
      colsLine = lineNo;
    } else if (cells.length !== cols) {
      const col = cells.length > cols ? cells[cols].column : line.length + 1;
      throw new DatasetFormatError(fileName, `ragged rows: this row has ${cells.length} values, expected ${cols} as on line ${colsLine}`, { line: lineNo, column: col });
    }
    if (cols > lim.maxCols) throw new DatasetFormatError(fileName, `${cols} columns, more than the limit of ${lim.maxCols}`, { line: lineNo, column: 1 });
    for (let c = 0; c < cells.length; c++) {
      const cell = cells[c];
      if (cell.text === '') throw new DatasetFormatError(fileName, `empty cell in column ${c + 1}; expected a finite number`, { line: lineNo, column: cell.column });
      if (NONFINITE_RE.test(cell.text)) {
        throw new DatasetFormatError(fileName, `${describe(cell.text)} in column ${c + 1}: NaN and infinite values are not accepted; expected a finite number`, { line: lineNo, column: cell.column });
      }
      if (!NUMBER_RE.test(cell.text)) {
        throw new DatasetFormatError(fileName, `non-numeric cell ${describe(cell.text)} in column ${c + 1}; expected a finite number such as 0.25 or -1.5e-3`, { line: lineNo, column: cell.column });
      }
      const v = Number(cell.text);
      if (!Number.isFinite(v)) throw new DatasetFormatError(fileName, `${describe(cell.text)} in column ${c + 1} overflows to infinity; expected a finite number`, { line: lineNo, column: cell.column });
      rowsData.push(v);
    }
    rows++;
    if (rows > lim.maxRows) throw new DatasetFormatError(fileName, `more than the limit of ${lim.maxRows} rows`, { line: lineNo, column: 1 });
    if (rowsData.length > lim.maxValues) throw new DatasetFormatError(fileName, `more than the limit of ${lim.maxValues} values`, { line: lineNo, column: 1 });
  }
  if (rows === 0) throw new DatasetFormatError(fileName, 'no numeric rows found; expected lines of numbers separated by commas, semicolons or spaces', { line: lines.length, column: 1 });
  const data = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) data[i + j * rows] = rowsData[i * cols + j];
  return { rows, cols, data };
}

/**
 * Round-trip decimal representation of a finite number: the shortest string that reads back as the same
 * double (at most 17 significant digits, ECMA-262 Number::toString), so a CSV download carries the same bits
 * as the .npy one; −0 keeps its sign.
 */
function fmt(v: number): string {
  return Object.is(v, -0) ? '-0' : String(v);
}

/** Write a rows×cols column-major matrix as comma-separated text, one row per line. */
export function writeCsv(m: RealMatrix, options: { header?: string[]; delimiter?: ',' | ';' | ' ' } = {}): string {
  const d = options.delimiter ?? ',';
  const out: string[] = [];
  if (options.header) out.push(options.header.join(d));
  for (let i = 0; i < m.rows; i++) {
    const row: string[] = [];
    for (let j = 0; j < m.cols; j++) row.push(fmt(m.data[i + j * m.rows]));
    out.push(row.join(d));
  }
  return out.join('\n') + '\n';
}
