/**
 * C = A·B for real column-major matrices (no transposes), the small and
 * medium products of the methods (reduced operators, eigenfunctions, modes).
 * Register-blocked: four columns of A (four terms of the sum) update four
 * output columns per sweep over a row range of 256 rows, so each output entry
 * is loaded and stored once per four terms. Fact of the trade: common
 * practice, no source (a blocked GEMM loop order, as in Golub & Van Loan,
 * Matrix Computations, §1.5).
 */

const ROWS = 256;

/** C (p×s) = A (p×q) · B (q×s), all column-major. */
export function matmul(a: Float64Array, p: number, q: number, b: Float64Array, s: number): Float64Array {
  if (a.length < p * q) throw new RangeError(`matmul: A has ${a.length} entries, expected ${p}×${q}`);
  if (b.length < q * s) throw new RangeError(`matmul: B has ${b.length} entries, expected ${q}×${s}`);
  const c = new Float64Array(p * s);
  for (let i0 = 0; i0 < p; i0 += ROWS) {
    const i1 = Math.min(p, i0 + ROWS);
    let j = 0;
    for (; j + 4 <= s; j += 4) {
      const c0 = j * p, c1 = c0 + p, c2 = c1 + p, c3 = c2 + p;
      const b0 = j * q, b1 = b0 + q, b2 = b1 + q, b3 = b2 + q;
      let t = 0;
      for (; t + 4 <= q; t += 4) {
        const a0 = t * p, a1 = a0 + p, a2 = a1 + p, a3 = a2 + p;
        const x00 = b[b0 + t], x10 = b[b0 + t + 1], x20 = b[b0 + t + 2], x30 = b[b0 + t + 3];
        const x01 = b[b1 + t], x11 = b[b1 + t + 1], x21 = b[b1 + t + 2], x31 = b[b1 + t + 3];
        const x02 = b[b2 + t], x12 = b[b2 + t + 1], x22 = b[b2 + t + 2], x32 = b[b2 + t + 3];
        const x03 = b[b3 + t], x13 = b[b3 + t + 1], x23 = b[b3 + t + 2], x33 = b[b3 + t + 3];
        for (let i = i0; i < i1; i++) {
          const u0 = a[a0 + i], u1 = a[a1 + i], u2 = a[a2 + i], u3 = a[a3 + i];
          c[c0 + i] += u0 * x00 + u1 * x10 + u2 * x20 + u3 * x30;
          c[c1 + i] += u0 * x01 + u1 * x11 + u2 * x21 + u3 * x31;
          c[c2 + i] += u0 * x02 + u1 * x12 + u2 * x22 + u3 * x32;
          c[c3 + i] += u0 * x03 + u1 * x13 + u2 * x23 + u3 * x33;
        }
      }
      for (; t < q; t++) {
        const at = t * p;
        const x0 = b[b0 + t], x1 = b[b1 + t], x2 = b[b2 + t], x3 = b[b3 + t];
        for (let i = i0; i < i1; i++) {
          const u = a[at + i];
          c[c0 + i] += u * x0;
          c[c1 + i] += u * x1;
          c[c2 + i] += u * x2;
          c[c3 + i] += u * x3;
        }
      }
    }
    for (; j < s; j++) {
      const cj = j * p, bj = j * q;
      let t = 0;
      for (; t + 4 <= q; t += 4) {
        const a0 = t * p, a1 = a0 + p, a2 = a1 + p, a3 = a2 + p;
        const x0 = b[bj + t], x1 = b[bj + t + 1], x2 = b[bj + t + 2], x3 = b[bj + t + 3];
        for (let i = i0; i < i1; i++) c[cj + i] += a[a0 + i] * x0 + a[a1 + i] * x1 + a[a2 + i] * x2 + a[a3 + i] * x3;
      }
      for (; t < q; t++) {
        const at = t * p, x = b[bj + t];
        for (let i = i0; i < i1; i++) c[cj + i] += a[at + i] * x;
      }
    }
  }
  return c;
}
