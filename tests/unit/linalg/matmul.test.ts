import { describe, expect, it } from 'vitest';
import { rcmatmul, type ComplexMatrix } from '../../../grading/linalg/complex.js';
import { matmul } from '../../../grading/linalg/matmul.js';
import { seeded } from './numpy-helper.js';

// Fact of the trade: common practice, no source — a blocked product equals the textbook triple loop up to rounding.

function naive(a: Float64Array, p: number, q: number, b: Float64Array, s: number): Float64Array {
  const c = new Float64Array(p * s);
  for (let j = 0; j < s; j++) for (let i = 0; i < p; i++) {
    let acc = 0;
    for (let t = 0; t < q; t++) acc += a[i + t * p] * b[t + j * q];
    c[i + j * p] = acc;
  }
  return c;
}

function random(len: number, seed: number): Float64Array {
  const r = seeded(seed);
  return Float64Array.from({ length: len }, () => r());
}

describe('real product C = A·B (blocked)', () => {
  for (const [p, q, s] of [[1, 1, 1], [3, 5, 2], [7, 4, 9], [300, 13, 6], [517, 101, 11], [64, 64, 64]] as const) {
    it(`${p}×${q} times ${q}×${s} matches the triple loop to 1e-13 relative`, () => {
      const a = random(p * q, p + 7 * q), b = random(q * s, 3 * s + q);
      const c = matmul(a, p, q, b, s), ref = naive(a, p, q, b, s);
      const scale = Math.max(...ref.map(Math.abs), 1);
      for (let i = 0; i < c.length; i++) expect(Math.abs(c[i] - ref[i])).toBeLessThanOrEqual(1e-13 * scale * q);
    });
  }

  it('refuses arrays shorter than their stated shape', () => {
    expect(() => matmul(new Float64Array(5), 2, 3, new Float64Array(6), 2)).toThrow(/A has 5 entries, expected 2×3/);
    expect(() => matmul(new Float64Array(6), 2, 3, new Float64Array(5), 2)).toThrow(/B has 5 entries, expected 3×2/);
  });
});

describe('real times complex (eigenvector matrices: real columns and conjugate pairs)', () => {
  it('a mix of real columns, conjugate pairs and a lone complex column gives the straightforward complex product; pairs come out exactly conjugate', () => {
    const p = 37, q = 9, s = 7;
    const a = random(p * q, 5);
    const r = seeded(9);
    const b: ComplexMatrix = { rows: q, cols: s, re: new Float64Array(q * s), im: new Float64Array(q * s) };
    // columns: 0 real, 1–2 conjugate pair, 3 complex (no partner), 4 real, 5–6 conjugate pair
    for (let j = 0; j < s; j++) for (let t = 0; t < q; t++) {
      b.re[t + j * q] = r();
      b.im[t + j * q] = j === 0 || j === 4 ? 0 : r();
    }
    for (const j of [2, 6]) for (let t = 0; t < q; t++) {
      b.re[t + j * q] = b.re[t + (j - 1) * q];
      b.im[t + j * q] = -b.im[t + (j - 1) * q];
    }
    const c = rcmatmul(a, p, q, b);
    const cre = naive(a, p, q, b.re, s), cim = naive(a, p, q, b.im, s);
    for (let i = 0; i < p * s; i++) {
      expect(Math.abs(c.re[i] - cre[i])).toBeLessThan(1e-13 * q);
      expect(Math.abs(c.im[i] - cim[i])).toBeLessThan(1e-13 * q);
    }
    for (const j of [2, 6]) for (let i = 0; i < p; i++) {
      expect(c.re[i + j * p]).toBe(c.re[i + (j - 1) * p]);
      expect(c.im[i + j * p]).toBe(-c.im[i + (j - 1) * p]);
    }
    for (const j of [0, 4]) for (let i = 0; i < p; i++) expect(c.im[i + j * p]).toBe(0);
  });

  it('refuses shapes that do not fit', () => {
    const b: ComplexMatrix = { rows: 2, cols: 1, re: new Float64Array(2), im: new Float64Array(2) };
    expect(() => rcmatmul(new Float64Array(6), 2, 3, b)).toThrow(/cannot multiply 2×3 by 2×1/);
  });
});
