import { parseComplexLiteral, parseRealLiteral, type ComplexNumber } from './complex-literal';
import { LocatedError, singleVectorKinds, type PartReadOutput } from './submission-types';
import type { PartKind } from '../../shared/score-report';

/**
 * Text submissions: CSV/TSV/whitespace tables (one column of complex values,
 * or real and imaginary columns, named or not), console printouts of
 * MATLAB/Octave/Julia/NumPy, and one-line lists such as Python's
 * `[(0.9+0.1j), (0.9-0.1j)]` or Julia's `ComplexF64[0.9 + 0.1im, …]`.
 */

interface Cell {
  text: string;
  /** 1-based column of the cell's first character in its line. */
  column: number;
}

interface Line {
  number: number;
  text: string;
}

const IMAG_END_RE = /(?:\*?(?:im|i|j))\)?$/i;
const RE_HEADER = /^(?:re|real|real[ _]?part|re\(.*\)|real\(.*\))[ _-]?(\d*)$/i;
const IM_HEADER = /^(?:im|imag|imaginary|imag[ _]?part|im\(.*\)|imag\(.*\))[ _-]?(\d*)$/i;

function stripComment(text: string): string {
  // '#' (Python, Julia, shell) and '%' (MATLAB, Octave) start a comment.
  const i = text.search(/[#%]/);
  return i >= 0 ? text.slice(0, i) : text;
}

/** Split on whitespace, keeping "0.9 + 0.1i" and "0.9 - 0.1im" together. */
function splitWhitespace(text: string): Cell[] {
  const raw: Cell[] = [];
  const re = /\S+/g;
  let m: RegExpExecArray | null;
  while ((m = re.exec(text))) raw.push({ text: m[0], column: m.index + 1 });
  const out: Cell[] = [];
  for (let i = 0; i < raw.length; i++) {
    const a = raw[i];
    const op = raw[i + 1];
    const b = raw[i + 2];
    if (op && b && (op.text === '+' || op.text === '-') && IMAG_END_RE.test(b.text) && !IMAG_END_RE.test(a.text)) {
      out.push({ text: text.slice(a.column - 1, b.column - 1 + b.text.length), column: a.column });
      i += 2;
    } else if (op && /^[+-]{1,2}(?:\d|\.\d|inf|nan)/i.test(op.text) && IMAG_END_RE.test(op.text) && !IMAG_END_RE.test(a.text) && parseComplexLiteral(a.text).ok) {
      // NumPy pads the real part: "[0.95+0.2j 0.8 +0.j ]".
      out.push({ text: text.slice(a.column - 1, op.column - 1 + op.text.length), column: a.column });
      i += 1;
    } else out.push(a);
  }
  return out;
}

function splitDelimited(text: string, delimiter: string): Cell[] {
  const cells: Cell[] = [];
  let start = 0;
  for (let i = 0; i <= text.length; i++) {
    if (i === text.length || text[i] === delimiter) {
      const raw = text.slice(start, i);
      const lead = raw.length - raw.trimStart().length;
      cells.push({ text: raw.trim(), column: start + lead + 1 });
      start = i + 1;
    }
  }
  // A trailing delimiter (MATLAB dlmwrite, some spreadsheet exports) leaves an empty last cell.
  if (cells.length > 1 && cells[cells.length - 1].text === '') cells.pop();
  return cells;
}

function unquote(s: string): string {
  return s.replace(/^"(.*)"$/, '$1').replace(/^'(.*)'$/, '$1').trim();
}

function literal(cell: Cell, line: number, real: boolean, scale: number): { value: ComplexNumber; isComplex: boolean } {
  const r = real ? parseRealLiteral(cell.text) : parseComplexLiteral(cell.text);
  if (!r.ok) throw new LocatedError(r.message, line, cell.column + r.offset);
  return { value: { re: r.value.re * scale, im: r.value.im * scale }, isComplex: r.isComplex };
}

/** Lines that consoles print around the numbers. */
function isDecoration(t: string): boolean {
  return (
    /^\d+(?:-element|×\d+)\s.*:$/.test(t) || // Julia: "3-element Vector{ComplexF64}:"
    /^[A-Za-z_]\w*\s*=\s*$/.test(t) // MATLAB/Octave: "ans =" / "lambda ="
  );
}

const MATLAB_SCALE_RE = /^(?:Columns?\s+\d+.*|([+-]?\d+(?:\.\d*)?[eE][+-]?\d+)\s*\*)$/;

export function readTextPart(text: string, kind: PartKind, maxValues: number): PartReadOutput {
  const warnings: PartReadOutput['warnings'] = [];
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  const lines: Line[] = text.split(/\r\n|\r|\n/).map((t, i) => ({ number: i + 1, text: t }));

  const significant = lines.filter((l) => stripComment(l.text).trim() !== '' && !isDecoration(stripComment(l.text).trim()));
  if (significant.length === 0) throw new LocatedError('expected at least one value, found an empty file', 1, 1);

  if (stripComment(significant[0].text).includes('[')) return readList(significant, kind, maxValues, warnings);
  return readTable(significant, kind, maxValues, warnings);
}

/** `[a, b, c]`, `ComplexF64[a, b]`, `array([a, b])`, `[a b c]` (NumPy print, may wrap), `[a;b]` (MATLAB mat2str). */
function readList(lines: Line[], kind: PartKind, maxValues: number, warnings: PartReadOutput['warnings']): PartReadOutput {
  const first = lines[0];
  const open = first.text.indexOf('[');
  const prefix = first.text.slice(0, open).trim();
  if (prefix && !/^(?:(?:np\.|numpy\.)?array\(|[A-Za-z][\w{}, ]*|Any)$/.test(prefix)) {
    throw new LocatedError(`expected a list starting with "[", found "${prefix.slice(0, 12)}" before it`, first.number, 1);
  }
  const cells: { cell: Cell; line: number }[] = [];
  let closed: { line: number; column: number; rest: string } | null = null;
  const hasSeparators = /[,;]/.test(lines.map((x) => stripComment(x.text)).join(' '));
  for (let li = 0; li < lines.length; li++) {
    const l = lines[li];
    if (closed) {
      warnings.push({ line: l.number, column: 1, message: `ignored text after the closing "]": "${l.text.trim().slice(0, 30)}"` });
      break;
    }
    let body = stripComment(l.text);
    let offset = 0;
    if (li === 0) {
      offset = open + 1;
      body = body.slice(open + 1);
    }
    if (body.includes('[')) throw new LocatedError('expected one flat list of values, found a nested "["', l.number, offset + body.indexOf('[') + 1);
    const close = body.indexOf(']');
    if (close >= 0) {
      const rest = body.slice(close + 1).trim();
      closed = { line: l.number, column: offset + close + 1, rest };
      const restClean = rest.replace(/^\)?\s*$/, '').replace(/^,\s*dtype=\w+\)$/, '');
      if (restClean) warnings.push({ line: l.number, column: offset + close + 2, message: `ignored text after the closing "]": "${rest.slice(0, 30)}"` });
      body = body.slice(0, close);
    }
    const parts = hasSeparators ? splitSeparated(body) : splitWhitespace(body);
    for (const c of parts) {
      if (c.text === '') continue;
      cells.push({ cell: { text: c.text, column: c.column + offset }, line: l.number });
    }
  }
  if (!closed) {
    const last = lines[lines.length - 1];
    throw new LocatedError('expected a closing "]" at the end of the list', last.number, last.text.length + 1);
  }
  if (cells.length > maxValues) throw new LocatedError(`expected at most ${maxValues} values, found ${cells.length}`, cells[maxValues].line, cells[maxValues].cell.column);
  const vector = cells.map(({ cell, line }) => literal(cell, line, false, 1).value);
  if (vector.length === 0) throw new LocatedError('expected at least one value in the list, found "[]"', first.number, open + 1);
  duplicateWarnings(vector.map((v, i) => ({ value: [v], line: cells[i].line })), warnings);
  void kind;
  return { vectors: [vector], warnings };
}

function splitSeparated(body: string): Cell[] {
  const out: Cell[] = [];
  let start = 0;
  for (let i = 0; i <= body.length; i++) {
    if (i === body.length || body[i] === ',' || body[i] === ';') {
      const raw = body.slice(start, i);
      const lead = raw.length - raw.trimStart().length;
      out.push({ text: raw.trim(), column: start + lead + 1 });
      start = i + 1;
    }
  }
  return out;
}

type Layout =
  | { type: 'pairs'; pairs: { re: number; im: number }[] } // column indices
  | { type: 'complex'; columns: number[] };

function chooseDelimiter(t: string): string | null {
  if (t.includes('\t')) return '\t';
  if (t.includes(',')) return ',';
  if (t.includes(';')) return ';';
  return null;
}

function headerLayout(cells: Cell[], line: number, kind: PartKind): Layout | null {
  const names = cells.map((c) => unquote(c.text));
  const looksNumeric = names.every((n) => n === '' || parseComplexLiteral(n).ok);
  if (looksNumeric) return null;
  const res = new Map<string, number>();
  const ims = new Map<string, number>();
  names.forEach((n, i) => {
    const r = RE_HEADER.exec(n);
    const m = IM_HEADER.exec(n);
    if (r) res.set(r[1], i);
    else if (m) ims.set(m[1], i);
  });
  if (res.size > 0 || ims.size > 0) {
    const pairs: { re: number; im: number }[] = [];
    for (const [suffix, reCol] of res) {
      const imCol = ims.get(suffix);
      if (imCol === undefined) throw new LocatedError(`expected an imaginary-part column to go with "${names[reCol]}" (for example "im${suffix}")`, line, cells[reCol].column);
      pairs.push({ re: reCol, im: imCol });
    }
    for (const [suffix, imCol] of ims) {
      if (!res.has(suffix)) throw new LocatedError(`expected a real-part column to go with "${names[imCol]}" (for example "re${suffix}")`, line, cells[imCol].column);
    }
    return { type: 'pairs', pairs };
  }
  // Named columns that are not re/im: each holds complex values (an unnamed first column is an index, as pandas writes it).
  const columns = names.map((n, i) => (n === '' && i === 0 && names.length > 1 ? -1 : i)).filter((i) => i >= 0);
  if (singleVectorKinds.has(kind) && columns.length !== 1) {
    throw new LocatedError(
      `expected columns named re and im (or real and imag), or a single column of complex values; found the columns ${names.map((n) => `"${n}"`).join(', ')}`,
      line,
      cells[0].column,
    );
  }
  return { type: 'complex', columns };
}

function guessLayout(cells: Cell[], line: number, kind: PartKind): Layout {
  const parsed = cells.map((c) => parseComplexLiteral(c.text));
  const anyComplex = parsed.some((p) => p.ok && p.isComplex);
  if (anyComplex) {
    if (singleVectorKinds.has(kind) && cells.length !== 1) {
      throw new LocatedError(`expected one column of complex values, found ${cells.length} columns`, line, cells[1].column);
    }
    return { type: 'complex', columns: cells.map((_, i) => i) };
  }
  if (cells.length === 1) return { type: 'complex', columns: [0] };
  if (cells.length % 2 === 0 && (!singleVectorKinds.has(kind) || cells.length === 2)) {
    const pairs = [];
    for (let i = 0; i < cells.length; i += 2) pairs.push({ re: i, im: i + 1 });
    return { type: 'pairs', pairs };
  }
  throw new LocatedError(
    singleVectorKinds.has(kind)
      ? `expected one column of values or two columns (real part, imaginary part), found ${cells.length} columns`
      : `expected columns in (real part, imaginary part) pairs or columns of complex values, found ${cells.length} real columns`,
    line,
    cells[Math.min(2, cells.length - 1)].column,
  );
}

function readTable(lines: Line[], kind: PartKind, maxValues: number, warnings: PartReadOutput['warnings']): PartReadOutput {
  const delimiter = chooseDelimiter(stripComment(lines[0].text));
  const split = (t: string) => (delimiter ? splitDelimited(t, delimiter) : splitWhitespace(t));
  let layout: Layout | null = null;
  let width = 0;
  let widthLine = 0;
  let scale = 1;
  const rows: { value: ComplexNumber[]; line: number }[] = [];

  for (let li = 0; li < lines.length; li++) {
    const l = lines[li];
    const body = stripComment(l.text);
    const trimmed = body.trim();
    const scaleMatch = MATLAB_SCALE_RE.exec(trimmed);
    if (scaleMatch) {
      if (scaleMatch[1] === undefined) throw new LocatedError('expected one column per value; this printout is split into "Columns …" blocks: print a column vector instead', l.number, 1);
      scale = Number(scaleMatch[1]);
      warnings.push({ line: l.number, column: 1, message: `applied the common scale factor ${scaleMatch[1]} printed by MATLAB/Octave to the values below it` });
      continue;
    }
    const cells = split(body);
    if (!layout) {
      const header = headerLayout(cells, l.number, kind);
      if (header) {
        layout = header;
        width = cells.length;
        widthLine = l.number;
        continue;
      }
      layout = guessLayout(cells, l.number, kind);
      width = cells.length;
      widthLine = l.number;
    }
    try {
      if (cells.length !== width) {
        throw new LocatedError(
          `expected ${width} column${width === 1 ? '' : 's'} as on line ${widthLine}, found ${cells.length}`,
          l.number,
          cells[Math.min(width, cells.length - 1)]?.column ?? 1,
        );
      }
      const row: ComplexNumber[] = [];
      if (layout.type === 'pairs') {
        for (const p of layout.pairs) {
          const re = literal(cells[p.re], l.number, true, scale).value.re;
          const im = literal(cells[p.im], l.number, true, scale).value.re;
          row.push({ re, im });
        }
      } else {
        for (const c of layout.columns) row.push(literal(cells[c], l.number, false, scale).value);
      }
      rows.push({ value: row, line: l.number });
      if (rows.length > maxValues) throw new LocatedError(`expected at most ${maxValues} rows, found more`, l.number, 1);
    } catch (e) {
      // Text after the data (a prompt, a timing line) is ignored with a warning, if nothing below it parses either.
      if (e instanceof LocatedError && rows.length > 0 && !/at most|infinite or NaN/.test(e.message) && lines.slice(li).every((x) => !rowParses(split(stripComment(x.text)), width) && !/^\s*[-+.(\d"']/.test(x.text))) {
        warnings.push({ line: l.number, column: 1, message: `ignored ${lines.length - li} line${lines.length - li === 1 ? '' : 's'} of trailing text starting "${trimmed.slice(0, 30)}"` });
        break;
      }
      throw e;
    }
  }
  if (rows.length === 0) throw new LocatedError('expected at least one row of values after the header', lines[lines.length - 1].number + 1, 1);
  // MATLAB/Octave "format short" keeps four decimals: correct answers may then land outside a tight tolerance.
  const short = /^[+-]?\d+\.\d{4}(?:\s*[+-]\s*(?:\d+\.\d{4}|0)i)?$/;
  const dataLines = lines.filter((l) => rows.some((r) => r.line === l.number));
  if (dataLines.every((l) => split(stripComment(l.text)).every((c) => short.test(c.text)))) {
    warnings.push({ message: 'every value is printed with only four decimals (MATLAB/Octave "format short"); print with "format long" or writematrix to keep full precision' });
  }
  duplicateWarnings(rows, warnings);
  if (rows.length === 1 && layout?.type === 'pairs' && width === 2 && !singleLineHasHeader(lines)) {
    warnings.push({ line: rows[0].line, column: 1, message: 'read the two numbers on this line as one complex value (real part, imaginary part); put one value per line if they are two real values' });
  }
  const ncols = rows[0].value.length;
  const vectors: ComplexNumber[][] = [];
  for (let c = 0; c < ncols; c++) vectors.push(rows.map((r) => r.value[c]));
  return { vectors, warnings };
}

function singleLineHasHeader(lines: Line[]): boolean {
  return lines.length > 1;
}

function rowParses(cells: Cell[], width: number): boolean {
  return cells.length === width && cells.every((c) => parseComplexLiteral(c.text).ok);
}

function duplicateWarnings(rows: { value: ComplexNumber[]; line: number }[], warnings: PartReadOutput['warnings']): void {
  const seen = new Map<string, number>();
  let count = 0;
  for (const r of rows) {
    const key = r.value.map((v) => `${v.re},${v.im}`).join(';');
    const earlier = seen.get(key);
    if (earlier !== undefined) {
      count++;
      if (count <= 10) warnings.push({ line: r.line, column: 1, message: `this row repeats line ${earlier} exactly` });
    } else seen.set(key, r.line);
  }
  if (count > 10) warnings.push({ message: `${count - 10} further rows repeat earlier rows exactly` });
}
