import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseComplexLiteral } from '../../../grading/formats/complex-literal';
import { formatSubmissionError, readSubmission, readSubmissionText, type ComplexNumber, type ReadResult } from '../../../grading/formats/submission';
import { fixtureBytes, fixtureValues } from './helpers';

function values(r: ReadResult, part = 'eigenvalues'): ComplexNumber[] {
  if (!r.ok) throw new Error(formatSubmissionError(r.error));
  return r.submission.parts[part].vectors[0];
}

function expectClose(got: ComplexNumber[], want: ComplexNumber[], tol = 1e-15): void {
  expect(got.length).toBe(want.length);
  got.forEach((g, k) => {
    expect(Math.abs(g.re - want[k].re)).toBeLessThanOrEqual(tol);
    expect(Math.abs(g.im - want[k].im)).toBeLessThanOrEqual(tol);
  });
}

function readFixture(name: string): ReadResult {
  return readSubmission([{ name, bytes: fixtureBytes(name) }]);
}

// Layouts recalled from memory of each tool (tests/fixtures/submissions/README.md names tool and version).
const wellFormed = [
  'numpy-savetxt-complex.txt',
  'numpy-savetxt-re-im.csv',
  'python-repr-list.txt',
  'numpy2-list-repr.txt',
  'numpy-print-array.txt',
  'matlab-disp.txt',
  'matlab-command-window.txt',
  'matlab-writematrix.csv',
  'octave-disp.txt',
  'julia-println.txt',
  'julia-display.txt',
  'julia-writedlm.txt',
  'julia-writedlm-re-im.tsv',
  'pandas-to-csv.csv',
  'two-unnamed-columns.txt',
  'json-pairs.json',
  'json-objects.json',
  'json-named-parts.json',
  'json-strings.json',
];

describe('submission readers on fixtures written the way each tool prints (from memory)', () => {
  for (const name of wellFormed) {
    it(`reads ${name}`, () => {
      const r = readFixture(name);
      // %.18e and short formats print decimal digits of the same doubles; 1e-15 covers the last-digit rounding.
      expectClose(values(r), fixtureValues, 1e-15);
      if (!r.ok) return;
      const messages = r.submission.warnings.map((w) => w.message);
      if (/^(matlab-disp|octave-disp|matlab-command-window)/.test(name)) expect(messages).toContainEqual(expect.stringMatching(/only four decimals/));
      else expect(messages).toEqual([]);
    });
  }

  it('ignores a pasted prompt after MATLAB output with a warning', () => {
    const r = readFixture('matlab-command-window.txt');
    expect(r.ok && r.submission.warnings.map((w) => w.message).join(' ')).toMatch(/trailing/);
  });

  it('warns about a duplicate row and trailing text instead of failing', () => {
    const r = readFixture('trailing-and-duplicates.txt');
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.submission.parts.eigenvalues.vectors[0]).toHaveLength(7);
    const msgs = r.submission.warnings.map((w) => `${w.line}: ${w.message}`);
    expect(msgs.some((m) => /^2: .*repeats line 1/.test(m))).toBe(true);
    expect(msgs.some((m) => /^8: .*trailing text/.test(m))).toBe(true);
  });
});

describe('rejections name the part, line and column and say what was expected', () => {
  const cases: [string, number, number, RegExp][] = [
    ['malformed-letter.csv', 4, 5, /expected a number/],
    ['malformed-nan.txt', 2, 2, /infinite or NaN/],
    ['malformed-julia-inf.txt', 2, 7, /infinite or NaN/],
    ['malformed-json.json', 2, 8, /expected a JSON value/],
    ['malformed-json-nan.json', 1, 16, /infinite or NaN/],
  ];
  for (const [name, line, column, msg] of cases) {
    it(`rejects ${name} at line ${line}, column ${column}`, () => {
      const r = readFixture(name);
      expect(r.ok).toBe(false);
      if (r.ok) return;
      expect(r.error).toMatchObject({ file: name, part: 'eigenvalues', line, column });
      expect(r.error.message).toMatch(msg);
      expect(formatSubmissionError(r.error)).toMatch(new RegExp(`^${name.replace('.', '\\.')}, part "eigenvalues", line ${line}, column ${column}: `));
    });
  }

  it('rejects inf in every spelling tools print', () => {
    for (const t of ['inf', '-Inf', '(inf+0j)', '0.9 + Infi', 'NaN + NaNi', 'Infinity', '1e999']) {
      const r = readSubmissionText(`0.5\n${t}\n`);
      expect(r.ok, t).toBe(false);
      if (!r.ok) expect(r.error.message).toMatch(/infinite or NaN/);
    }
  });

  it('rejects a ragged table, naming the columns it expected', () => {
    const r = readSubmissionText('re,im\n0.9,0.1\n0.8\n', 'ev.csv');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatchObject({ line: 3, message: expect.stringMatching(/expected 2 columns as on line 1, found 1/) });
  });

  it('rejects too many columns for an eigenvalue list', () => {
    const r = readSubmissionText('0.9 0.1 0.3\n0.8 0 0.2\n');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toMatch(/one column of values or two columns/);
  });

  it('reports the JSON problem for a nested list that is not valid JSON, whatever the file name', () => {
    const r = readSubmissionText('[[0.9, 0.1],\n [0.8 0.0]]', 'ev.txt');
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatchObject({ line: 2, column: 7, message: expect.stringMatching(/expected "," or "]", found "0.0/) });
  });

  it('rejects an empty file and binary data', () => {
    expect(readSubmissionText('\n\n').ok).toBe(false);
    const r = readSubmission([{ name: 'ev.dat', bytes: new Uint8Array([0xff, 0xfe, 0x00, 0x81]) }]);
    expect(r.ok || r.error.message).toMatch(/UTF-8/);
  });
});

describe('complex literals (Fact of the trade: common practice, no source; printed forms from memory)', () => {
  const cases: [string, number, number][] = [
    ['(0.9+0.1j)', 0.9, 0.1],
    ['0.9-0.1j', 0.9, -0.1],
    ['0.1j', 0, 0.1],
    ['(-0-1j)', -0, -1],
    ['0.9000 + 0.1000i', 0.9, 0.1],
    ['0.9 + 0.1im', 0.9, 0.1],
    ['-1.5e-3 - 2.5E+2im', -1.5e-3, -250],
    ['1e-3', 1e-3, 0],
    ['.5', 0.5, 0],
    ['(5.0e-01+-1.0e-01j)', 0.5, -0.1],
    ['np.complex128(0.5+0.25j)', 0.5, 0.25],
    ['"0.5+0.25j"', 0.5, 0.25],
    ['0.+1.j', 0, 1],
    ['-j', 0, -1],
  ];
  for (const [text, re, im] of cases) {
    it(`parses ${text}`, () => {
      const r = parseComplexLiteral(text);
      expect(r.ok && r.value).toEqual({ re, im });
    });
  }
  for (const bad of ['0.9+0.1', '0.9 0.1i', 'abc', '0.9+0.1k', '(0.9+0.1j', '1.2.3', '']) {
    it(`rejects "${bad}" with an offset`, () => {
      const r = parseComplexLiteral(bad);
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.message).toMatch(/^expected/);
    });
  }

  it('applies the common scale factor MATLAB prints above a column, with a warning', () => {
    const r = readSubmissionText('lambda =\n\n   1.0e-03 *\n\n   0.9500 + 0.2000i\n   0.3000 + 0.0000i\n');
    expectClose(values(r), [{ re: 0.95e-3, im: 0.2e-3 }, { re: 0.3e-3, im: 0 }], 1e-18);
    expect(r.ok && r.submission.warnings[0].message).toMatch(/scale factor 1\.0e-03/);
  });

  it('reads NumPy savetxt with a header comment line and Python comments', () => {
    const r = readSubmissionText('# eigenvalues of the reduced operator\n (1.0e+00+0.0e+00j)\n (5.0e-01+-2.5e-01j)  # second\n');
    expectClose(values(r), [{ re: 1, im: 0 }, { re: 0.5, im: -0.25 }]);
  });

  it('reads wrapped NumPy print output across lines', () => {
    const r = readSubmissionText('[0.95+0.2j 0.95-0.2j\n 0.8 +0.j ]\n');
    expectClose(values(r), [{ re: 0.95, im: 0.2 }, { re: 0.95, im: -0.2 }, { re: 0.8, im: 0 }]);
  });

  it('reads MATLAB mat2str output', () => {
    const r = readSubmissionText('[0.95+0.2i;0.95-0.2i;0.8]');
    expectClose(values(r), [{ re: 0.95, im: 0.2 }, { re: 0.95, im: -0.2 }, { re: 0.8, im: 0 }]);
  });

  it('reads a top-level JSON object with named real and imaginary parts', () => {
    expectClose(values(readSubmissionText('{"re": [0.9, 0.8], "im": [0.1, 0]}', 'ev.json')), [{ re: 0.9, im: 0.1 }, { re: 0.8, im: 0 }]);
    expectClose(values(readSubmissionText('{"Real": [0.9], "Imag": [-0.1]}', 'ev.json')), [{ re: 0.9, im: -0.1 }]);
  });

  it('warns when a lone line of two numbers is read as one complex value', () => {
    const r = readSubmissionText('0.9 0.8\n');
    expectClose(values(r), [{ re: 0.9, im: 0.8 }]);
    expect(r.ok && r.submission.warnings[0].message).toMatch(/one complex value/);
  });

  it('reads header names in any case: RE/IM, real/imag, Re(lambda)', () => {
    for (const h of ['RE,IM', 'real,imag', 'Real,Imaginary', 'Re(lambda),Im(lambda)', '"re","im"', 'im,re']) {
      const r = readSubmissionText(`${h}\n0.9,0.1\n`, 'ev.csv');
      const want = h.startsWith('im') ? { re: 0.1, im: 0.9 } : { re: 0.9, im: 0.1 };
      expectClose(values(r), [want]);
    }
  });
});

// NPY format 1.0 (recalled from memory): magic \x93NUMPY, version 1 0, uint16 LE header length,
// a Python dict literal padded with spaces to a multiple of 64 bytes and ended by \n, then raw data.
function buildNpy(descr: string, shape: number[], fortran: boolean, data: number[]): Uint8Array {
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  let header = `{'descr': '${descr}', 'fortran_order': ${fortran ? 'True' : 'False'}, 'shape': ${shapeText}, }`;
  const total = 10 + header.length + 1;
  header += ' '.repeat((64 - (total % 64)) % 64) + '\n';
  const out = new Uint8Array(10 + header.length + data.length * 8);
  out.set([0x93, ...Array.from('NUMPY', (c) => c.charCodeAt(0)), 1, 0], 0);
  new DataView(out.buffer).setUint16(8, header.length, true);
  out.set(Array.from(header, (c) => c.charCodeAt(0)), 10);
  const dv = new DataView(out.buffer, 10 + header.length);
  data.forEach((x, k) => dv.setFloat64(8 * k, x, true));
  return out;
}

describe('NumPy .npy submissions', () => {
  const interleaved = fixtureValues.flatMap((v) => [v.re, v.im]);
  it('reads complex128 built by hand', () => {
    const r = readSubmission([{ name: 'ev.npy', bytes: buildNpy('<c16', [6], false, interleaved) }]);
    expectClose(values(r), fixtureValues);
  });
  it('reads float64 n×2 (real, imaginary columns) in C and Fortran order', () => {
    const c = readSubmission([{ name: 'ev.npy', bytes: buildNpy('<f8', [6, 2], false, interleaved) }]);
    expectClose(values(c), fixtureValues);
    const f = readSubmission([{ name: 'ev.npy', bytes: buildNpy('<f8', [6, 2], true, [...fixtureValues.map((v) => v.re), ...fixtureValues.map((v) => v.im)]) }]);
    expectClose(values(f), fixtureValues);
  });
  it('rejects an npy file holding NaN, and a 3-column float array', () => {
    const nan = readSubmission([{ name: 'ev.npy', bytes: buildNpy('<c16', [2], false, [1, 0, Number.NaN, 0]) }]);
    expect(nan.ok || nan.error.message).toMatch(/infinite or NaN/);
    const wide = readSubmission([{ name: 'ev.npy', bytes: buildNpy('<f8', [2, 3], false, [1, 2, 3, 4, 5, 6]) }]);
    expect(wide.ok || wide.error.message).toMatch(/shape \(n, 2\)/);
  });

  const dir = mkdtempSync(join(tmpdir(), 'modewright-npy-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  it('Reference library: NumPy np.save writes complex128 and float64 (n, 2) files that read back to the same values', () => {
    const script = [
      'import numpy as np, sys',
      'ev = np.array([0.95+0.2j, 0.3, 0.5-0.1j, 0.8, 0.95-0.2j, 0.5+0.1j])',
      "np.save(sys.argv[1] + '/c.npy', ev)",
      "np.save(sys.argv[1] + '/f.npy', np.c_[ev.real, ev.imag])",
      "np.save(sys.argv[1] + '/fo.npy', np.asfortranarray(np.c_[ev.real, ev.imag]))",
    ].join('\n');
    execFileSync('python3', ['-c', script, dir]);
    for (const f of ['c.npy', 'f.npy', 'fo.npy']) {
      const r = readSubmission([{ name: f, bytes: new Uint8Array(readFileSync(join(dir, f))) }]);
      expectClose(values(r), fixtureValues);
    }
  });
});

describe('several parts in one submission', () => {
  const parts = [
    { name: 'eigenvalues', kind: 'eigenvalues' as const },
    { name: 'modes', kind: 'modes' as const },
    { name: 'prediction', kind: 'prediction' as const },
  ];
  it('reads named parts from one JSON object, and warns about unknown keys', () => {
    const text = JSON.stringify({ eigenvalues: [[0.9, 0.1]], modes: [[[1, 0], [0, 1], [2, 0]]], prediction: [1, 2, 3], notes: 'hi' });
    const r = readSubmissionText(text, 'answer.json', { parts });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.submission.parts.modes.vectors).toEqual([[{ re: 1, im: 0 }, { re: 0, im: 1 }, { re: 2, im: 0 }]]);
    expect(r.submission.parts.prediction.vectors[0]).toHaveLength(3);
    expect(r.submission.warnings[0].message).toMatch(/ignored the key "notes"/);
  });
  it('maps files to parts by their names, and a modes CSV with complex columns to one vector per column', () => {
    const enc = (s: string) => new TextEncoder().encode(s);
    const r = readSubmission(
      [
        { name: 'eigenvalues.txt', bytes: enc('0.9+0.1j\n0.8\n') },
        { name: 'modes.csv', bytes: enc('(1+0j),(0.5+0j)\n(0+1j),(0.25-0.5j)\n') },
      ],
      { parts },
    );
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.submission.parts.modes.vectors).toEqual([
      [{ re: 1, im: 0 }, { re: 0, im: 1 }],
      [{ re: 0.5, im: 0 }, { re: 0.25, im: -0.5 }],
    ]);
  });
  it('rejects a file whose name names no part when there are several files', () => {
    const enc = (s: string) => new TextEncoder().encode(s);
    const r = readSubmission([{ name: 'eigenvalues.txt', bytes: enc('0.9\n') }, { name: 'stuff.txt', bytes: enc('1\n') }], { parts });
    const two = readSubmission([{ name: 'ev.txt', bytes: enc('0.9\n') }, { name: 'stuff.txt', bytes: enc('1\n') }], { parts });
    expect(two.ok).toBe(false);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatchObject({ file: 'stuff.txt', line: 1, column: 1, message: expect.stringMatching(/name a part/) });
  });
});
