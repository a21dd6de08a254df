import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { readCsv, writeCsv } from '../../../grading/formats/csv';
import { readPairSource, toSnapshots, fromSnapshots } from '../../../grading/formats/dataset';
import { DatasetFormatError } from '../../../grading/formats/errors';
import { npyToComplexMatrix, npyToRealMatrix, readNpy, readNpyRealMatrix, writeNpy } from '../../../grading/formats/npy';
import { numpyAvailable, NUMPY_MISSING, ORACLE_DIR } from './helpers';

const enc = (s: string) => new TextEncoder().encode(s);

function located(fn: () => unknown): DatasetFormatError {
  try {
    fn();
  } catch (e) {
    if (e instanceof DatasetFormatError) return e;
    throw e;
  }
  throw new Error('expected a DatasetFormatError');
}

// Fact of the trade (common practice, no source): delimited text conventions (comma/semicolon/whitespace, header row, # comments).
describe('CSV and whitespace text datasets', () => {
  it('reads comma, semicolon and whitespace files with header and comments into a column-major matrix', () => {
    const expected = [1, 4, 2, 5, 3, 6]; // column-major of [[1,2,3],[4,5,6]]
    for (const text of ['a,b,c\n1,2,3\n4,5,6\n', '# data\n1;2;3\n\n4;5;6 # trailing\n', '  1  2\t3\r\n4 5 6\r\n']) {
      const m = readCsv(text, 'd.csv');
      expect([m.rows, m.cols]).toEqual([2, 3]);
      expect(Array.from(m.data)).toEqual(expected);
    }
  });
  it('ragged rows name line, column and what was expected', () => {
    const e = located(() => readCsv('1,2,3\n4,5\n', 'snap.csv'));
    expect(e.message).toBe('snap.csv:2:4: ragged rows: this row has 2 values, expected 3 as on line 1');
    expect([e.line, e.column]).toEqual([2, 4]);
  });
  it('non-numeric cells, NaN and Inf are refused with their location', () => {
    expect(located(() => readCsv('1,2\n3,abc\n', 'a.csv')).message).toMatch(/^a\.csv:2:3: non-numeric cell "abc" in column 2; expected a finite number/);
    expect(located(() => readCsv('1,NaN\n', 'a.csv')).message).toMatch(/^a\.csv:1:3: "NaN" in column 2: NaN and infinite values are not accepted/);
    expect(located(() => readCsv('1 2\n-inf 3\n', 'w.txt')).message).toMatch(/^w\.txt:2:1: "-inf"/);
    expect(located(() => readCsv('1,,2\n', 'e.csv')).message).toMatch(/^e\.csv:1:3: empty cell in column 2/);
    expect(located(() => readCsv('1e999\n', 'o.csv')).message).toMatch(/overflows to infinity/);
  });
  it('size limits are parameters', () => {
    expect(located(() => readCsv('1,2\n3,4\n', 'big.csv', { maxBytes: 4 })).message).toMatch(/more than the limit of 4/);
    expect(located(() => readCsv('1\n2\n3\n', 'rows.csv', { maxRows: 2 })).message).toMatch(/^rows\.csv:3:1: more than the limit of 2 rows/);
  });
  it('round-trips through writeCsv exactly (shortest round-trip decimals)', () => {
    const m = { rows: 2, cols: 2, data: Float64Array.from([0.1, -1e-300, 1 / 3, 12345.678]) };
    const back = readCsv(writeCsv(m), 'x.csv');
    expect(Array.from(back.data)).toEqual(Array.from(m.data));
  });
  it('layout: one snapshot per row is the transpose of one per column', () => {
    const m = readCsv('1,2,3\n4,5,6\n', 'r.csv');
    const byRow = toSnapshots(m, 'rows');
    expect([byRow.n, byRow.k]).toEqual([3, 2]);
    expect(Array.from(byRow.data)).toEqual([1, 2, 3, 4, 5, 6]);
    expect(Array.from(fromSnapshots(byRow, 'rows').data)).toEqual(Array.from(m.data));
  });
  it('pair sources: too few snapshots and disagreeing X/Y shapes are refused naming the file', () => {
    expect(located(() => readPairSource({ name: 'one.csv', bytes: enc('1\n2\n3\n') }, undefined)).message).toMatch(/^one\.csv: too few snapshots: found 1 columns/);
    const e = located(() => readPairSource({ name: 'x.csv', bytes: enc('1,2\n3,4\n') }, { name: 'y.csv', bytes: enc('1,2,3\n3,4,5\n') }));
    expect(e.message).toMatch(/^y\.csv: X and Y shapes disagree: x\.csv holds 2 snapshots of length 2, y\.csv holds 3 snapshots of length 2/);
    const ok = readPairSource({ name: 'x.csv', bytes: enc('1,2\n3,4\n') }, { name: 'y.csv', bytes: enc('5,6\n7,8\n') });
    expect(ok.kind).toBe('pairs');
  });
});

describe('NumPy .npy reader and writer', () => {
  it('refuses unsupported dtypes, bad magic, truncated data and extra bytes with the file name', () => {
    const good = writeNpy({ rows: 2, cols: 2, data: Float64Array.from([1, 2, 3, 4]) });
    const bad = good.slice();
    const at = new TextDecoder('latin1').decode(bad.subarray(0, 80)).indexOf("'<f8'");
    bad[at + 2] = 'i'.charCodeAt(0);
    expect(located(() => readNpy(bad, 'ints.npy')).message).toMatch(/^ints\.npy \(byte 10\): unsupported dtype "<i8"; expected float64/);
    expect(located(() => readNpy(enc('hello world!'), 'x.npy')).message).toMatch(/not a NumPy \.npy file/);
    expect(located(() => readNpy(good.subarray(0, good.length - 3), 'cut.npy')).message).toMatch(/the data is cut short/);
    const extra = new Uint8Array(good.length + 8);
    extra.set(good);
    expect(located(() => readNpy(extra, 'extra.npy')).message).toMatch(/8 unexpected bytes/);
    expect(located(() => readNpy(good, 'lim.npy', { maxValues: 3 })).message).toMatch(/more than the limit of 3/);
  });
  it('writes 64-byte aligned version 1.0 headers and reads its own files in both orders', () => {
    const m = { rows: 3, cols: 2, data: Float64Array.from([1, 2, 3, 4, 5, 6]) };
    for (const fortranOrder of [true, false]) {
      const b = writeNpy(m, { fortranOrder });
      const hl = b[8] | (b[9] << 8);
      expect((10 + hl) % 64).toBe(0);
      const a = readNpy(b, 'm.npy');
      expect(a.fortranOrder).toBe(fortranOrder);
      expect(Array.from(npyToRealMatrix(a, 'm.npy').data)).toEqual([1, 2, 3, 4, 5, 6]);
    }
  });
  it('the one-copy reader (readNpyRealMatrix) matches readNpy + npyToRealMatrix: both orders, float32, unaligned bytes, NaN and errors', () => {
    // Common practice, no source: the fused reader must be indistinguishable from the two-step one.
    const m = { rows: 3, cols: 2, data: Float64Array.from([1, 2, 3, 4, 5, 6]) };
    const cases: Uint8Array[] = [];
    for (const fortranOrder of [true, false]) {
      const b = writeNpy(m, { fortranOrder });
      cases.push(b);
      const shifted = new Uint8Array(b.length + 3); // data not 8-byte aligned in its buffer
      shifted.set(b, 3);
      cases.push(shifted.subarray(3));
    }
    const f4 = writeNpy(m);
    const hl = 10 + (f4[8] | (f4[9] << 8));
    const b4 = new Uint8Array(hl + 24);
    b4.set(f4.subarray(0, hl), 0);
    b4[new TextDecoder('latin1').decode(f4.subarray(0, hl)).indexOf("'<f8'") + 3] = 0x34; // '<f8' → '<f4'
    for (let t = 0; t < 6; t++) new DataView(b4.buffer).setFloat32(hl + 4 * t, m.data[t], true);
    cases.push(b4);
    for (const b of cases) {
      const one = readNpyRealMatrix(b, 'm.npy');
      expect(one.data.buffer).toBeInstanceOf(SharedArrayBuffer);
      expect([one.rows, one.cols, ...one.data]).toEqual([3, 2, 1, 2, 3, 4, 5, 6]);
      expect(Array.from(one.data)).toEqual(Array.from(npyToRealMatrix(readNpy(b, 'm.npy'), 'm.npy').data));
    }
    for (const fortranOrder of [true, false]) {
      const bad = writeNpy({ rows: 3, cols: 2, data: Float64Array.from([1, 2, 3, 4, Number.NaN, Number.POSITIVE_INFINITY]) }, { fortranOrder });
      const expected = located(() => npyToRealMatrix(readNpy(bad, 'nan.npy'), 'nan.npy')).message;
      expect(expected).toMatch(/element \(2, 2\) is NaN/);
      expect(located(() => readNpyRealMatrix(bad, 'nan.npy')).message).toBe(expected);
    }
    const c = writeNpy({ rows: 1, cols: 2, re: Float64Array.from([1, 2]), im: Float64Array.from([3, -4]) });
    expect(located(() => readNpyRealMatrix(c, 'c.npy')).message).toBe(located(() => npyToRealMatrix(readNpy(c, 'c.npy'), 'c.npy')).message);
    const good = cases[0];
    expect(located(() => readNpyRealMatrix(good.subarray(0, good.length - 3), 'cut.npy')).message).toMatch(/the data is cut short/);
    expect(located(() => readNpyRealMatrix(good, 'lim.npy', { maxValues: 3 })).message).toMatch(/more than the limit of 3/);
  });
  it('complex data is refused as snapshot data but read by the complex reader', () => {
    const b = writeNpy({ rows: 1, cols: 2, re: Float64Array.from([1, 2]), im: Float64Array.from([3, -4]) });
    expect(located(() => npyToRealMatrix(readNpy(b, 'c.npy'), 'c.npy')).message).toMatch(/unsupported dtype complex128/);
    const c = npyToComplexMatrix(readNpy(b, 'c.npy'));
    expect(Array.from(c.im)).toEqual([3, -4]);
  });
});

// Reference library: numpy.save / numpy.load / numpy.lib.format.write_array (tests/oracle/npy_oracle.py).
const HAVE_NUMPY = numpyAvailable();
if (!HAVE_NUMPY) console.warn(NUMPY_MISSING);
describe.skipIf(!HAVE_NUMPY)('Reference library (NumPy): .npy round trip with numpy.save / numpy.load', () => {
  it('reads what numpy.save writes: float64/float32/complex128, C and Fortran order, big-endian, versions 1.0, 2.0, 3.0', () => {
    const dir = mkdtempSync(join(tmpdir(), 'modewright-npy-'));
    try {
      const r = spawnSync('python3', [join(ORACLE_DIR, 'npy_oracle.py'), 'save', dir, '42'], { encoding: 'utf8' });
      expect(r.status, r.stderr).toBe(0);
      const manifest = JSON.parse(r.stdout) as { name: string; shape: number[]; values: [number, number][]; fortran: boolean }[];
      expect(manifest.length).toBeGreaterThanOrEqual(10);
      for (const entry of manifest) {
        const bytes = new Uint8Array(readFileSync(join(dir, entry.name)));
        const a = readNpy(bytes, entry.name);
        expect(a.shape).toEqual(entry.shape);
        // The one-copy reader gives what the two-step reader gives, or refuses with the same message.
        if (a.isComplex) {
          expect(located(() => readNpyRealMatrix(bytes, entry.name)).message).toBe(located(() => npyToRealMatrix(a, entry.name)).message);
        } else {
          const one = readNpyRealMatrix(bytes, entry.name);
          const two = npyToRealMatrix(a, entry.name);
          expect([one.rows, one.cols]).toEqual([two.rows, two.cols]);
          expect(Array.from(one.data)).toEqual(Array.from(two.data));
        }
        const c = npyToComplexMatrix(a);
        const cols = entry.shape.length === 2 ? entry.shape[1] : entry.shape[0];
        const rows = entry.shape.length === 2 ? entry.shape[0] : 1;
        expect([c.rows, c.cols]).toEqual([rows, cols]);
        // manifest values are in C order: element (i, j) at i*cols + j
        for (let i = 0; i < rows; i++) {
          for (let j = 0; j < cols; j++) {
            const [vr, vi] = entry.values[i * cols + j];
            expect(c.re[i + j * rows]).toBe(vr);
            expect(c.im[i + j * rows]).toBe(vi);
          }
        }
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
  it('numpy.load reads what writeNpy writes (float64 and complex128, both orders) with the same values', () => {
    const dir = mkdtempSync(join(tmpdir(), 'modewright-npy-'));
    try {
      const rows = 3;
      const cols = 4;
      const re = Float64Array.from({ length: 12 }, (_, t) => Math.sin(t + 1) * 10 ** (t - 6));
      const im = Float64Array.from({ length: 12 }, (_, t) => Math.cos(3 * t));
      for (const complex of [false, true]) {
        for (const fortranOrder of [true, false]) {
          const path = join(dir, `w-${complex}-${fortranOrder}.npy`);
          writeFileSync(path, writeNpy(complex ? { rows, cols, re, im } : { rows, cols, data: re }, { fortranOrder }));
          const r = spawnSync('python3', [join(ORACLE_DIR, 'npy_oracle.py'), 'load', path], { encoding: 'utf8' });
          expect(r.status, r.stderr).toBe(0);
          const out = JSON.parse(r.stdout) as { dtype: string; shape: number[]; fortran: boolean; values: [number, number][] };
          expect(out.dtype).toBe(complex ? 'complex128' : 'float64');
          expect(out.shape).toEqual([rows, cols]);
          expect(out.fortran).toBe(fortranOrder);
          for (let i = 0; i < rows; i++) {
            for (let j = 0; j < cols; j++) {
              expect(out.values[i * cols + j][0]).toBe(re[i + j * rows]);
              expect(out.values[i * cols + j][1]).toBe(complex ? im[i + j * rows] : 0);
            }
          }
        }
      }
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

// Property tests (fast-check): malformed inputs give located errors, never crashes.
describe('Property: random malformed files give located errors, never crashes', () => {
  const cell = fc.oneof(
    fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
    fc.constantFrom('', 'NaN', 'inf', '-Infinity', 'x', '1..2', '--3', '0x10', '1e', ' ', '"4"', 'é', '\u0000'),
    fc.string({ maxLength: 6 }),
  );
  const line = fc.tuple(fc.array(cell, { maxLength: 6 }), fc.constantFrom(',', ';', ' ', '\t')).map(([cs, d]) => cs.join(d));
  const file = fc.tuple(fc.array(line, { maxLength: 8 }), fc.constantFrom('\n', '\r\n')).map(([ls, nl]) => ls.join(nl));
  it('readCsv either returns a finite rectangular matrix or throws DatasetFormatError naming file:line:column', () => {
    fc.assert(
      fc.property(file, (text) => {
        try {
          const m = readCsv(text, 'prop.csv');
          expect(m.data.length).toBe(m.rows * m.cols);
          for (const v of m.data) expect(Number.isFinite(v)).toBe(true);
        } catch (e) {
          expect(e).toBeInstanceOf(DatasetFormatError);
          const err = e as DatasetFormatError;
          expect(err.file).toBe('prop.csv');
          if (!/NUL byte|no numeric rows|not valid UTF-8/.test(err.message)) {
            expect(err.message).toMatch(/^prop\.csv:\d+:\d+: /);
          }
          expect(err.message).not.toMatch(/\n/);
        }
      }),
      { numRuns: 400 },
    );
  });
  it('readNpy on corrupted or truncated valid files throws DatasetFormatError, never anything else', () => {
    const base = writeNpy({ rows: 2, cols: 3, re: Float64Array.from([1, 2, 3, 4, 5, 6]), im: new Float64Array(6) });
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.nat(base.length - 1), fc.integer({ min: 0, max: 255 })), { maxLength: 6 }),
        fc.nat(base.length),
        (edits, cut) => {
          const b = base.slice(0, Math.max(cut, 0));
          for (const [pos, val] of edits) if (pos < b.length) b[pos] = val;
          try {
            const a = readNpy(b, 'prop.npy');
            expect(a.data.length).toBeGreaterThanOrEqual(0);
          } catch (e) {
            expect(e).toBeInstanceOf(DatasetFormatError);
            expect((e as DatasetFormatError).message.startsWith('prop.npy')).toBe(true);
          }
        },
      ),
      { numRuns: 400 },
    );
  });
});
