/**
 * Register-blocked inner-product kernels on column-major snapshot matrices.
 *
 * Every function here is synchronous, allocation-free and self-contained so
 * that the same code runs on the main thread and inside a worker. The
 * summation order depends only on the row range and the fixed chunk length
 * `ROW_CHUNK`, never on the thread that runs it, so the threaded and the
 * single-thread routes give bit-identical results.
 *
 * Layout: matrix M with leading dimension `ld` stores entry (t, j) at
 * m[j*ld + t]; one snapshot (column) is contiguous.
 */

/** Rows per pass: a 4-column panel of this many rows (4 × 8 KiB) stays in L1/L2. */
export const ROW_CHUNK = 1024;

/**
 * out[i + j*k] += Σ_{t ∈ [r0, r1)} D[t, i]·D[t, j] for all i ≤ j (upper triangle,
 * diagonal included; some entries just below the diagonal inside 4×4 diagonal
 * tiles are touched as well). `out` is k×k column-major.
 */
export function gramRowsInto(d: Float64Array, ld: number, k: number, r0: number, r1: number, out: Float64Array): void {
  const k4 = k - (k % 4);
  for (let t0 = r0; t0 < r1; t0 += ROW_CHUNK) {
    const t1 = Math.min(r1, t0 + ROW_CHUNK);
    // Full 4×4 tiles of the upper triangle.
    for (let j = 0; j < k4; j += 4) {
      const j0 = j * ld, j1 = j0 + ld, j2 = j1 + ld, j3 = j2 + ld;
      for (let i = 0; i <= j; i += 4) {
        const i0 = i * ld, i1 = i0 + ld, i2 = i1 + ld, i3 = i2 + ld;
        let s00 = 0, s01 = 0, s02 = 0, s03 = 0, s10 = 0, s11 = 0, s12 = 0, s13 = 0;
        let s20 = 0, s21 = 0, s22 = 0, s23 = 0, s30 = 0, s31 = 0, s32 = 0, s33 = 0;
        for (let t = t0; t < t1; t++) {
          const a0 = d[i0 + t], a1 = d[i1 + t], a2 = d[i2 + t], a3 = d[i3 + t];
          const b0 = d[j0 + t], b1 = d[j1 + t], b2 = d[j2 + t], b3 = d[j3 + t];
          s00 += a0 * b0; s01 += a0 * b1; s02 += a0 * b2; s03 += a0 * b3;
          s10 += a1 * b0; s11 += a1 * b1; s12 += a1 * b2; s13 += a1 * b3;
          s20 += a2 * b0; s21 += a2 * b1; s22 += a2 * b2; s23 += a2 * b3;
          s30 += a3 * b0; s31 += a3 * b1; s32 += a3 * b2; s33 += a3 * b3;
        }
        let o = i + j * k;
        out[o] += s00; out[o + 1] += s10; out[o + 2] += s20; out[o + 3] += s30;
        o += k;
        out[o] += s01; out[o + 1] += s11; out[o + 2] += s21; out[o + 3] += s31;
        o += k;
        out[o] += s02; out[o + 1] += s12; out[o + 2] += s22; out[o + 3] += s32;
        o += k;
        out[o] += s03; out[o + 1] += s13; out[o + 2] += s23; out[o + 3] += s33;
      }
    }
    // Remaining columns j ≥ k4: one column at a time against 4-row groups of i.
    for (let j = k4; j < k; j++) {
      const jo = j * ld;
      let i = 0;
      for (; i + 3 <= j && i + 4 <= k4; i += 4) {
        const i0 = i * ld, i1 = i0 + ld, i2 = i1 + ld, i3 = i2 + ld;
        let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
        for (let t = t0; t < t1; t++) {
          const b = d[jo + t];
          s0 += d[i0 + t] * b; s1 += d[i1 + t] * b; s2 += d[i2 + t] * b; s3 += d[i3 + t] * b;
        }
        const o = i + j * k;
        out[o] += s0; out[o + 1] += s1; out[o + 2] += s2; out[o + 3] += s3;
      }
      for (; i <= j; i++) {
        const io = i * ld;
        let s = 0;
        for (let t = t0; t < t1; t++) s += d[io + t] * d[jo + t];
        out[i + j * k] += s;
      }
    }
  }
}

/**
 * out[i + j*ka] += Σ_{t ∈ [r0, r1)} A[t, i]·B[t, j] (full ka×kb, column-major).
 */
export function crossRowsInto(
  a: Float64Array, lda: number, ka: number,
  b: Float64Array, ldb: number, kb: number,
  r0: number, r1: number, out: Float64Array,
): void {
  const ka4 = ka - (ka % 4);
  const kb4 = kb - (kb % 4);
  for (let t0 = r0; t0 < r1; t0 += ROW_CHUNK) {
    const t1 = Math.min(r1, t0 + ROW_CHUNK);
    for (let j = 0; j < kb4; j += 4) {
      const j0 = j * ldb, j1 = j0 + ldb, j2 = j1 + ldb, j3 = j2 + ldb;
      for (let i = 0; i < ka4; i += 4) {
        const i0 = i * lda, i1 = i0 + lda, i2 = i1 + lda, i3 = i2 + lda;
        let s00 = 0, s01 = 0, s02 = 0, s03 = 0, s10 = 0, s11 = 0, s12 = 0, s13 = 0;
        let s20 = 0, s21 = 0, s22 = 0, s23 = 0, s30 = 0, s31 = 0, s32 = 0, s33 = 0;
        for (let t = t0; t < t1; t++) {
          const a0 = a[i0 + t], a1 = a[i1 + t], a2 = a[i2 + t], a3 = a[i3 + t];
          const b0 = b[j0 + t], b1 = b[j1 + t], b2 = b[j2 + t], b3 = b[j3 + t];
          s00 += a0 * b0; s01 += a0 * b1; s02 += a0 * b2; s03 += a0 * b3;
          s10 += a1 * b0; s11 += a1 * b1; s12 += a1 * b2; s13 += a1 * b3;
          s20 += a2 * b0; s21 += a2 * b1; s22 += a2 * b2; s23 += a2 * b3;
          s30 += a3 * b0; s31 += a3 * b1; s32 += a3 * b2; s33 += a3 * b3;
        }
        let o = i + j * ka;
        out[o] += s00; out[o + 1] += s10; out[o + 2] += s20; out[o + 3] += s30;
        o += ka;
        out[o] += s01; out[o + 1] += s11; out[o + 2] += s21; out[o + 3] += s31;
        o += ka;
        out[o] += s02; out[o + 1] += s12; out[o + 2] += s22; out[o + 3] += s32;
        o += ka;
        out[o] += s03; out[o + 1] += s13; out[o + 2] += s23; out[o + 3] += s33;
      }
      // Leftover rows i ≥ ka4 of this 4-column group.
      for (let i = ka4; i < ka; i++) {
        const io = i * lda;
        let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
        for (let t = t0; t < t1; t++) {
          const x = a[io + t];
          s0 += x * b[j0 + t]; s1 += x * b[j1 + t]; s2 += x * b[j2 + t]; s3 += x * b[j3 + t];
        }
        const o = i + j * ka;
        out[o] += s0; out[o + ka] += s1; out[o + 2 * ka] += s2; out[o + 3 * ka] += s3;
      }
    }
    // Leftover columns j ≥ kb4.
    for (let j = kb4; j < kb; j++) {
      const jo = j * ldb;
      let i = 0;
      for (; i < ka4; i += 4) {
        const i0 = i * lda, i1 = i0 + lda, i2 = i1 + lda, i3 = i2 + lda;
        let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
        for (let t = t0; t < t1; t++) {
          const y = b[jo + t];
          s0 += a[i0 + t] * y; s1 += a[i1 + t] * y; s2 += a[i2 + t] * y; s3 += a[i3 + t] * y;
        }
        const o = i + j * ka;
        out[o] += s0; out[o + 1] += s1; out[o + 2] += s2; out[o + 3] += s3;
      }
      for (; i < ka; i++) {
        const io = i * lda;
        let s = 0;
        for (let t = t0; t < t1; t++) s += a[io + t] * b[jo + t];
        out[i + j * ka] += s;
      }
    }
  }
}

/** Copy the upper triangle onto the lower one so the k×k matrix is exactly symmetric. */
export function mirrorUpper(s: Float64Array, k: number): void {
  for (let j = 0; j < k; j++) for (let i = j + 1; i < k; i++) s[i + j * k] = s[j + i * k];
}

/** Copy rows [r0, r1) of an n-row column-major matrix with kc columns into a compact (r1−r0)×kc one. */
export function copyRows(src: Float64Array, ld: number, kc: number, r0: number, r1: number, dst: Float64Array): void {
  const h = r1 - r0;
  for (let j = 0; j < kc; j++) dst.set(src.subarray(j * ld + r0, j * ld + r1), j * h);
}

/**
 * out[i − r0 + oc + j*ldc] = Σ_{t < q} A[i, t]·B[t, j] for rows i ∈ [r0, r1) and
 * all s columns (A: leading dimension lda, B: q×s column-major; oc, the row of
 * out that row r0 goes to, defaults to r0). Every entry is a
 * running sum from 0 in t order with no fused multiply-add: the same
 * arithmetic as the wasm product (kernels-wasm.ts), so both give the same
 * bits, whichever rows each thread computes.
 */
export function productRowsInto(
  a: Float64Array, lda: number, q: number, b: Float64Array, s: number, r0: number, r1: number, out: Float64Array, ldc: number,
  oc: number = r0,
): void {
  const shift = oc - r0; // row i of A goes to row i + shift of out
  for (let i0 = r0; i0 < r1; i0 += 256) {
    const i1 = Math.min(r1, i0 + 256);
    let j = 0;
    for (; j + 4 <= s; j += 4) {
      const c0 = j * ldc + shift, c1 = c0 + ldc, c2 = c1 + ldc, c3 = c2 + ldc;
      const b0 = j * q, b1 = b0 + q, b2 = b1 + q, b3 = b2 + q;
      for (let i = i0; i < i1; i++) { out[c0 + i] = 0; out[c1 + i] = 0; out[c2 + i] = 0; out[c3 + i] = 0; }
      for (let t = 0; t < q; t++) {
        const at = t * lda;
        const x0 = b[b0 + t], x1 = b[b1 + t], x2 = b[b2 + t], x3 = b[b3 + t];
        for (let i = i0; i < i1; i++) {
          const u = a[at + i];
          out[c0 + i] += u * x0;
          out[c1 + i] += u * x1;
          out[c2 + i] += u * x2;
          out[c3 + i] += u * x3;
        }
      }
    }
    for (; j < s; j++) {
      const cj = j * ldc + shift, bj = j * q;
      for (let i = i0; i < i1; i++) out[cj + i] = 0;
      for (let t = 0; t < q; t++) {
        const at = t * lda, x = b[bj + t];
        for (let i = i0; i < i1; i++) out[cj + i] += a[at + i] * x;
      }
    }
  }
}
