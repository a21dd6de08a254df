/** Real non-symmetric eigensolver: Householder Hessenberg reduction, double-shift Francis QR to real Schur form, eigenvector back-substitution (EISPACK orthes/hqr2: Wilkinson & Reinsch, Handbook for Automatic Computation vol. II, 1971; Golub & Van Loan, Matrix Computations, §7.5). */

/*
 * Storage: flat Float64Array, column-major, entry (i, j) of an n×n matrix at
 * i + j·n. Every inner loop runs down a column (contiguous) or touches three
 * adjacent entries of one column, so the working set of a 100×100 problem
 * (two 80 KB matrices) stays in cache.
 *
 * Departures from the EISPACK text, none of which changes what is computed:
 * - the Hessenberg step applies each reflector from both sides as one rank-2
 *   update (two passes over the trailing columns instead of four);
 * - while the active block is large, the double shift comes from the trailing
 *   16×16 window instead of the trailing 2×2 block (windowShift), which saves
 *   about a third of the QR sweeps on dense matrices;
 * - a matrix with entries far from 1 in size is scaled by a power of two first;
 * - the iteration count is limited (EigenConvergenceError), the exceptional
 *   shifts recur every 10 iterations, and the left eigenvectors come from the
 *   same triangular factor: VR = Z·Y, so VR⁻ᵀ = Z·Y⁻ᵀ.
 */

export interface RealEigenOptions {
  /** Compute right eigenvectors (default true). Without them only the active block is updated (well under half the work). */
  vectors?: boolean;
  /** Also compute the real block form of the left eigenvectors, VR⁻ᵀ (default false; needs vectors). */
  left?: boolean;
  /** Limit on the total number of QR iterations (default 30·max(n, 10)); exceeding it throws EigenConvergenceError. */
  maxIterations?: number;
}

export interface RealEigenResult {
  /** Eigenvalues λ_j = re[j] + i·im[j]. A complex pair occupies j, j+1 with im[j] > 0, im[j+1] = −im[j], re[j] = re[j+1]. */
  re: Float64Array;
  im: Float64Array;
  /**
   * Right eigenvectors in real block form VR, n×n column-major, not normalised:
   * column j for a real λ_j; for a pair (j, j+1), columns j and j+1 are Re v and
   * Im v of the eigenvector v of λ_j (the one with positive imaginary part).
   * null when vectors were not asked for.
   */
  vectors: Float64Array | null;
  /**
   * C = VR⁻ᵀ (n×n column-major), so that Cᵀ·VR = I: column c_j is a left
   * eigenvector of a real λ_j; for a pair, w = (c_j + i c_{j+1})/2 is the left
   * eigenvector of λ_j with wᴴ v = 1 for the v of `vectors`. null when not asked
   * for, or when VR is singular to working precision (a zero pivot, or an
   * inverse that overflows).
   */
  left: Float64Array | null;
}

/** The QR iteration did not split off every eigenvalue within the iteration limit. */
export class EigenConvergenceError extends Error {
  override name = 'EigenConvergenceError';
}

/** Eigenvalues and (by default) eigenvectors in real block form of the real n×n column-major matrix a. */
export function realEigen(a: Float64Array, n: number, options: RealEigenOptions = {}): RealEigenResult {
  if (!Number.isInteger(n) || n < 0) throw new RangeError(`the matrix order must be a non-negative integer, got ${n}`);
  if (a.length < n * n) throw new RangeError(`a ${n}×${n} matrix needs ${n * n} entries, got ${a.length}`);
  let amax = 0;
  for (let t = 0; t < n * n; t++) {
    const v = Math.abs(a[t]);
    if (!(v <= Number.MAX_VALUE)) throw new RangeError(`the matrix has a non-finite entry (${a[t]}) at row ${(t % n) + 1}, column ${Math.floor(t / n) + 1}`);
    if (v > amax) amax = v;
  }
  const maxIterations = options.maxIterations ?? 30 * Math.max(n, 10);
  if (!(Number.isInteger(maxIterations) && maxIterations >= 0)) throw new RangeError(`maxIterations must be a non-negative integer, got ${maxIterations}`);
  const wantVectors = options.vectors !== false;
  if (options.left === true && !wantVectors) throw new RangeError('left eigenvectors need the right ones: do not combine left: true with vectors: false');
  const wantLeft = wantVectors && options.left === true;
  const h = Float64Array.from(a.subarray(0, n * n));
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  const z = wantVectors ? new Float64Array(n * n) : null;
  if (n === 0) return { re, im, vectors: z, left: wantLeft ? new Float64Array(0) : null };
  // Entries far from 1 in size: scale by a power of two (exact) so that the
  // iteration's sums and squares cannot overflow or underflow; eigenvalues are
  // scaled back, eigenvectors do not change.
  const scale = amax > 0 && (amax > 1e140 || amax < 1e-140) ? 2 ** -Math.round(Math.log2(amax)) : 1;
  if (scale !== 1) for (let t = 0; t < n * n; t++) h[t] *= scale;
  hessenberg(h, n, z);
  const norm = schur(h, n, re, im, z, maxIterations);
  let vectors: Float64Array | null = null;
  let left: Float64Array | null = null;
  if (z !== null && norm === 0) {
    // The zero matrix: Z = I already holds the eigenvectors, and VR⁻ᵀ = I.
    vectors = z;
    if (wantLeft) left = Float64Array.from(z);
  } else if (z !== null) {
    eigenvectorsOfSchurForm(h, n, re, im, norm);
    // h now holds Y (upper triangular, T Y = Y Λ); VR = Z Y and VR⁻ᵀ = Z Y⁻ᵀ.
    for (let j = 0; j < n - 1; j++) h.fill(0, j * n + j + 1, (j + 1) * n);
    if (wantLeft) {
      const yInvT = upperInverseTransposed(h, n);
      if (yInvT !== null) {
        left = multiplyLower(z, yInvT, n);
        for (let t = 0; t < n * n; t++) {
          if (!Number.isFinite(left[t])) {
            left = null;
            break;
          }
        }
      }
    }
    multiplyUpperInPlace(z, h, n);
    vectors = z;
  }
  if (scale !== 1) {
    for (let j = 0; j < n; j++) {
      re[j] /= scale;
      im[j] /= scale;
    }
  }
  return { re, im, vectors, left };
}

/**
 * Reduce h (n×n, in place) to upper Hessenberg form H = Qᵀ A Q by Householder
 * reflections (orthes); with z given, accumulate Q into it (from the last
 * reflector back). Entries below the subdiagonal are zero on return.
 */
function hessenberg(h: Float64Array, n: number, z: Float64Array | null): void {
  const ort = new Float64Array(n);
  const f = new Float64Array(n);
  const sv = new Float64Array(n);
  for (let m = 1; m < n - 1; m++) {
    const col = (m - 1) * n;
    let scale = 0;
    for (let i = m; i < n; i++) scale += Math.abs(h[col + i]);
    if (scale === 0) continue;
    let hh = 0;
    for (let i = n - 1; i >= m; i--) {
      const u = h[col + i] / scale;
      ort[i] = u;
      hh += u * u;
    }
    let g = Math.sqrt(hh);
    if (ort[m] > 0) g = -g;
    hh -= ort[m] * g;
    ort[m] -= g;
    // H ← P H P with P = I − u uᵀ/hh, as one rank-2 update of columns m…n−1:
    // P H P = H − u sᵀ/hh − f uᵀ/hh with s = Hᵀu, f = P H u = H u − u (sᵀu)/hh.
    // One pass reads H for s and H u, a second writes the update.
    f.fill(0);
    let j = m;
    for (; j + 3 < n; j += 4) {
      const o0 = j * n;
      const o1 = o0 + n;
      const o2 = o1 + n;
      const o3 = o2 + n;
      const u0 = ort[j];
      const u1 = ort[j + 1];
      const u2 = ort[j + 2];
      const u3 = ort[j + 3];
      for (let i = 0; i < m; i++) f[i] += u0 * h[o0 + i] + u1 * h[o1 + i] + u2 * h[o2 + i] + u3 * h[o3 + i];
      let s0 = 0;
      let s1 = 0;
      let s2 = 0;
      let s3 = 0;
      for (let i = m; i < n; i++) {
        const a0 = h[o0 + i];
        const a1 = h[o1 + i];
        const a2 = h[o2 + i];
        const a3 = h[o3 + i];
        const ui = ort[i];
        f[i] += u0 * a0 + u1 * a1 + u2 * a2 + u3 * a3;
        s0 += ui * a0;
        s1 += ui * a1;
        s2 += ui * a2;
        s3 += ui * a3;
      }
      sv[j] = s0;
      sv[j + 1] = s1;
      sv[j + 2] = s2;
      sv[j + 3] = s3;
    }
    for (; j < n; j++) {
      const o = j * n;
      const uj = ort[j];
      for (let i = 0; i < m; i++) f[i] += uj * h[o + i];
      let s0 = 0;
      for (let i = m; i < n; i++) {
        const a0 = h[o + i];
        f[i] += uj * a0;
        s0 += ort[i] * a0;
      }
      sv[j] = s0;
    }
    const inv = 1 / hh;
    let su = 0;
    for (let i = m; i < n; i++) su += sv[i] * ort[i];
    su *= inv;
    for (let i = 0; i < n; i++) f[i] *= inv;
    for (let i = m; i < n; i++) f[i] -= ort[i] * su * inv;
    j = m;
    for (; j + 3 < n; j += 4) {
      const o0 = j * n;
      const o1 = o0 + n;
      const o2 = o1 + n;
      const o3 = o2 + n;
      const u0 = ort[j];
      const u1 = ort[j + 1];
      const u2 = ort[j + 2];
      const u3 = ort[j + 3];
      const t0 = sv[j] * inv;
      const t1 = sv[j + 1] * inv;
      const t2 = sv[j + 2] * inv;
      const t3 = sv[j + 3] * inv;
      for (let i = 0; i < m; i++) {
        const fi = f[i];
        h[o0 + i] -= fi * u0;
        h[o1 + i] -= fi * u1;
        h[o2 + i] -= fi * u2;
        h[o3 + i] -= fi * u3;
      }
      for (let i = m; i < n; i++) {
        const fi = f[i];
        const ui = ort[i];
        h[o0 + i] -= fi * u0 + ui * t0;
        h[o1 + i] -= fi * u1 + ui * t1;
        h[o2 + i] -= fi * u2 + ui * t2;
        h[o3 + i] -= fi * u3 + ui * t3;
      }
    }
    for (; j < n; j++) {
      const o = j * n;
      const uj = ort[j];
      const tj = sv[j] * inv;
      for (let i = 0; i < m; i++) h[o + i] -= f[i] * uj;
      for (let i = m; i < n; i++) h[o + i] -= f[i] * uj + ort[i] * tj;
    }
    ort[m] *= scale;
    h[col + m] = scale * g;
  }
  if (z !== null) {
    // Q = H_1 H_2 … applied to I from the last reflector back; the reflector of
    // step m is ort[m] with the untouched entries h(m+1…n−1, m−1), and
    // I − u uᵀ/hh = I + u uᵀ/(u_m · h(m, m−1)).
    z.fill(0);
    for (let i = 0; i < n; i++) z[i + i * n] = 1;
    for (let m = n - 2; m >= 1; m--) {
      const col = (m - 1) * n;
      const hm = h[col + m];
      if (hm === 0) continue;
      for (let i = m + 1; i < n; i++) ort[i] = h[col + i];
      // Columns m…n−1 of z; only rows m…n−1 are nonzero beyond the identity part.
      reflectColumns(z, n, ort, m, m, n, -ort[m] * hm);
    }
  }
  for (let j = 0; j < n - 2; j++) for (let i = j + 2; i < n; i++) h[i + j * n] = 0;
}

/** Columns j0…n−1 of a (n×n), rows m…n−1: a ← (I − u uᵀ/hh) a with u = ort[m…n−1]. */
function reflectColumns(a: Float64Array, n: number, ort: Float64Array, m: number, j0: number, j1: number, hh: number): void {
  const inv = 1 / hh;
  let j = j0;
  for (; j + 3 < j1; j += 4) {
    const o0 = j * n;
    const o1 = o0 + n;
    const o2 = o1 + n;
    const o3 = o2 + n;
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    for (let i = m; i < n; i++) {
      const u = ort[i];
      s0 += u * a[o0 + i];
      s1 += u * a[o1 + i];
      s2 += u * a[o2 + i];
      s3 += u * a[o3 + i];
    }
    s0 *= inv;
    s1 *= inv;
    s2 *= inv;
    s3 *= inv;
    for (let i = m; i < n; i++) {
      const u = ort[i];
      a[o0 + i] -= s0 * u;
      a[o1 + i] -= s1 * u;
      a[o2 + i] -= s2 * u;
      a[o3 + i] -= s3 * u;
    }
  }
  for (; j < j1; j++) {
    const o = j * n;
    let s = 0;
    for (let i = m; i < n; i++) s += ort[i] * a[o + i];
    s *= inv;
    if (s !== 0) for (let i = m; i < n; i++) a[o + i] -= s * ort[i];
  }
}

/**
 * Double-shift Francis QR on the Hessenberg matrix h (hqr2's iteration).
 * Writes the eigenvalues to re/im. With zv given, h becomes the real Schur form
 * T (2×2 blocks for complex pairs, not standardised) and zv the Schur vectors
 * (A = Z T Zᵀ, zv holding Q on entry); without, only the active block is
 * updated. With until > 0 it stops once the eigenvalues until…nn−1 (those that
 * split off at the bottom first) are known. Returns the norm of the Hessenberg
 * matrix (sum of absolute entries), the scale of negligible quantities.
 */
function schur(h: Float64Array, nn: number, re: Float64Array, im: Float64Array, zv: Float64Array | null, maxIterations: number, until = 0): number {
  const wantT = zv !== null;
  const eps = Number.EPSILON;
  let norm = 0;
  for (let j = 0; j < nn; j++) {
    const o = j * nn;
    const last = Math.min(j + 1, nn - 1);
    for (let i = 0; i <= last; i++) norm += Math.abs(h[o + i]);
  }
  // The zero matrix: every eigenvalue is 0 (re, im are zero already) and T = H = 0.
  if (norm === 0) return 0;
  let n = nn - 1;
  let exshift = 0;
  let iter = 0;
  let total = 0;
  let p = 0;
  let q = 0;
  let r = 0;
  let s = 0;
  let x = 0;
  let y = 0;
  let w = 0;
  let zz = 0;
  // Work space of windowShift: the window, its eigenvalues, the shift.
  const bigEnough = nn >= SHIFT_WINDOW + 9;
  const win = bigEnough ? new Float64Array(SHIFT_WINDOW * SHIFT_WINDOW) : null;
  const winRe = bigEnough ? new Float64Array(SHIFT_WINDOW) : null;
  const winIm = bigEnough ? new Float64Array(SHIFT_WINDOW) : null;
  const shift = new Float64Array(3);
  while (n >= until) {
    // Look for a single small subdiagonal element.
    let l = n;
    while (l > 0) {
      s = Math.abs(h[l - 1 + (l - 1) * nn]) + Math.abs(h[l + l * nn]);
      if (s === 0) s = norm;
      if (Math.abs(h[l + (l - 1) * nn]) < eps * s) break;
      l--;
    }
    if (l === n) {
      // One root found.
      h[n + n * nn] += exshift;
      re[n] = h[n + n * nn];
      im[n] = 0;
      n--;
      iter = 0;
    } else if (l === n - 1) {
      // Two roots found.
      const n1 = n - 1;
      w = h[n + n1 * nn] * h[n1 + n * nn];
      p = (h[n1 + n1 * nn] - h[n + n * nn]) / 2;
      q = p * p + w;
      zz = Math.sqrt(Math.abs(q));
      h[n + n * nn] += exshift;
      h[n1 + n1 * nn] += exshift;
      x = h[n + n * nn];
      if (q >= 0) {
        // Real pair: rotate the 2×2 block to upper triangular form.
        zz = p >= 0 ? p + zz : p - zz;
        re[n1] = x + zz;
        re[n] = zz !== 0 ? x - w / zz : re[n1];
        im[n1] = 0;
        im[n] = 0;
        if (wantT) {
          x = h[n + n1 * nn];
          s = Math.abs(x) + Math.abs(zz);
          p = x / s;
          q = zz / s;
          r = Math.sqrt(p * p + q * q);
          p /= r;
          q /= r;
          for (let j = n1; j < nn; j++) {
            const o = j * nn;
            const t = h[o + n1];
            h[o + n1] = q * t + p * h[o + n];
            h[o + n] = q * h[o + n] - p * t;
          }
          const c1 = n1 * nn;
          const c2 = n * nn;
          for (let i = 0; i <= n; i++) {
            const t = h[c1 + i];
            h[c1 + i] = q * t + p * h[c2 + i];
            h[c2 + i] = q * h[c2 + i] - p * t;
          }
          for (let i = 0; i < nn; i++) {
            const t = zv[c1 + i];
            zv[c1 + i] = q * t + p * zv[c2 + i];
            zv[c2 + i] = q * zv[c2 + i] - p * t;
          }
        }
      } else {
        // Complex pair, positive imaginary part first.
        re[n1] = x + p;
        re[n] = x + p;
        im[n1] = zz;
        im[n] = -zz;
      }
      n -= 2;
      iter = 0;
    } else {
      if (total >= maxIterations) {
        throw new EigenConvergenceError(
          `the QR iteration for the eigenvalues of a ${nn}×${nn} matrix did not converge within ${maxIterations} iterations (${nn - 1 - n} of ${nn} eigenvalues found)`,
        );
      }
      // Shifts (the roots of z² − (x + y) z + x y − w): from a trailing window while the active
      // block is large, from the trailing 2×2 block otherwise.
      if (win !== null && winRe !== null && winIm !== null && n - l >= SHIFT_WINDOW + 8 && windowShift(h, nn, n, win, winRe, winIm, shift)) {
        x = shift[0];
        y = shift[1];
        w = shift[2];
      } else {
        x = h[n + n * nn];
        y = h[n - 1 + (n - 1) * nn];
        w = h[n + (n - 1) * nn] * h[n - 1 + n * nn];
      }
      if (iter > 0 && iter % 20 === 10) {
        // Exceptional shift (after 10, 30, … iterations without a split).
        x = h[n + n * nn];
        exshift += x;
        for (let i = 0; i <= n; i++) h[i + i * nn] -= x;
        s = Math.abs(h[n + (n - 1) * nn]) + Math.abs(h[n - 1 + (n - 2) * nn]);
        x = 0.75 * s;
        y = x;
        w = -0.4375 * s * s;
      } else if (iter > 0 && iter % 20 === 0) {
        // A second kind of exceptional shift (after 20, 40, …).
        x = h[n + n * nn];
        y = h[n - 1 + (n - 1) * nn];
        w = h[n + (n - 1) * nn] * h[n - 1 + n * nn];
        s = (y - x) / 2;
        s = s * s + w;
        if (s > 0) {
          s = Math.sqrt(s);
          if (y < x) s = -s;
          s = x - w / ((y - x) / 2 + s);
          for (let i = 0; i <= n; i++) h[i + i * nn] -= s;
          exshift += s;
          x = 0.964;
          y = x;
          w = x;
        }
      }
      iter++;
      total++;
      // Look for two consecutive small subdiagonal elements.
      let m = n - 2;
      while (m >= l) {
        zz = h[m + m * nn];
        r = x - zz;
        s = y - zz;
        p = (r * s - w) / h[m + 1 + m * nn] + h[m + (m + 1) * nn];
        q = h[m + 1 + (m + 1) * nn] - zz - r - s;
        r = h[m + 2 + (m + 1) * nn];
        s = Math.abs(p) + Math.abs(q) + Math.abs(r);
        p /= s;
        q /= s;
        r /= s;
        if (m === l) break;
        const lhs = Math.abs(h[m + (m - 1) * nn]) * (Math.abs(q) + Math.abs(r));
        const rhs = eps * (Math.abs(p) * (Math.abs(h[m - 1 + (m - 1) * nn]) + Math.abs(zz) + Math.abs(h[m + 1 + (m + 1) * nn])));
        if (lhs < rhs) break;
        m--;
      }
      for (let i = m + 2; i <= n; i++) {
        h[i + (i - 2) * nn] = 0;
        if (i > m + 2) h[i + (i - 3) * nn] = 0;
      }
      // Double QR step on rows l…n and columns m…n (bulge chase).
      const jEnd = wantT ? nn - 1 : n;
      const iStart = wantT ? 0 : l;
      for (let k = m; k <= n - 1; k++) {
        const notlast = k !== n - 1;
        if (k !== m) {
          const ck = (k - 1) * nn;
          p = h[ck + k];
          q = h[ck + k + 1];
          r = notlast ? h[ck + k + 2] : 0;
          x = Math.abs(p) + Math.abs(q) + Math.abs(r);
          if (x === 0) continue;
          p /= x;
          q /= x;
          r /= x;
        }
        s = Math.sqrt(p * p + q * q + r * r);
        if (p < 0) s = -s;
        if (s === 0) continue;
        if (k !== m) h[k + (k - 1) * nn] = -s * x;
        else if (l !== m) h[k + (k - 1) * nn] = -h[k + (k - 1) * nn];
        p += s;
        x = p / s;
        y = q / s;
        zz = r / s;
        q /= p;
        r /= p;
        const c0 = k * nn;
        const c1 = c0 + nn;
        const iEnd = Math.min(n, k + 3);
        if (notlast) {
          const c2 = c1 + nn;
          // (Each entry is read once into a local: a compound h[o + 1] −= … after the
          // store to h[o] would read it again.)
          for (let j = k; j <= jEnd; j++) {
            const o = j * nn + k;
            const a0 = h[o];
            const a1 = h[o + 1];
            const a2 = h[o + 2];
            const t = a0 + q * a1 + r * a2;
            h[o] = a0 - t * x;
            h[o + 1] = a1 - t * y;
            h[o + 2] = a2 - t * zz;
          }
          for (let i = iStart; i <= iEnd; i++) {
            const a0 = h[c0 + i];
            const a1 = h[c1 + i];
            const a2 = h[c2 + i];
            const t = x * a0 + y * a1 + zz * a2;
            h[c0 + i] = a0 - t;
            h[c1 + i] = a1 - t * q;
            h[c2 + i] = a2 - t * r;
          }
          if (zv !== null) {
            for (let i = 0; i < nn; i++) {
              const a0 = zv[c0 + i];
              const a1 = zv[c1 + i];
              const a2 = zv[c2 + i];
              const t = x * a0 + y * a1 + zz * a2;
              zv[c0 + i] = a0 - t;
              zv[c1 + i] = a1 - t * q;
              zv[c2 + i] = a2 - t * r;
            }
          }
        } else {
          for (let j = k; j <= jEnd; j++) {
            const o = j * nn + k;
            const a0 = h[o];
            const a1 = h[o + 1];
            const t = a0 + q * a1;
            h[o] = a0 - t * x;
            h[o + 1] = a1 - t * y;
          }
          for (let i = iStart; i <= iEnd; i++) {
            const a0 = h[c0 + i];
            const a1 = h[c1 + i];
            const t = x * a0 + y * a1;
            h[c0 + i] = a0 - t;
            h[c1 + i] = a1 - t * q;
          }
          if (zv !== null) {
            for (let i = 0; i < nn; i++) {
              const a0 = zv[c0 + i];
              const a1 = zv[c1 + i];
              const t = x * a0 + y * a1;
              zv[c0 + i] = a0 - t;
              zv[c1 + i] = a1 - t * q;
            }
          }
        }
      }
    }
  }
  return norm;
}

/** Size of the trailing window whose eigenvalues give the shifts while the active block is large. */
const SHIFT_WINDOW = 16;

/**
 * Double shift from the trailing w×w window of H (rows/columns n−w+1…n; w = wr.length, t a
 * w×w scratch matrix, wr/wi scratch for its eigenvalues): the first two
 * eigenvalues that the QR iteration on a copy of the window splits off, at its bottom. For
 * w = 2 this is the usual Francis shift; a larger window sees further and saves iterations
 * (eigenvalues of a trailing principal submatrix as shifts, as in multishift QR: Bai & Demmel
 * 1989; Braman, Byers & Mathias 2002; both cited from memory). Writes out = [x, y, c] for the shift polynomial
 * z² − (x + y) z + (x y − c) (hqr2's x, y, w); false if the window's iteration fails.
 */
function windowShift(h: Float64Array, nn: number, n: number, t: Float64Array, wr: Float64Array, wi: Float64Array, out: Float64Array): boolean {
  const w = wr.length;
  const kw = n - w + 1;
  t.fill(0);
  wr.fill(0);
  wi.fill(0);
  for (let j = 0; j < w; j++) {
    const src = (kw + j) * nn + kw;
    const last = Math.min(j + 1, w - 1);
    for (let i = 0; i <= last; i++) t[i + j * w] = h[src + i];
  }
  try {
    schur(t, w, wr, wi, null, 30 * w, w - 2);
  } catch {
    return false;
  }
  const b = w - 1;
  if (wi[b] !== 0) {
    // A complex pair a ± ib: x = y = a, c = −b².
    out[0] = wr[b];
    out[1] = wr[b];
    out[2] = -wi[b] * wi[b];
  } else {
    // Two real values (the bottom one twice if the next is half of a pair).
    out[0] = wr[b];
    out[1] = wi[b - 1] === 0 ? wr[b - 1] : wr[b];
    out[2] = 0;
  }
  return true;
}

/**
 * Eigenvectors of the quasi-triangular Schur form T (in h) by back-substitution,
 * written over T's upper triangle: afterwards column j of h holds the
 * eigenvector y_j of T (pairs as Re, Im in columns j, j+1), so T Y = Y Λ.
 */
function eigenvectorsOfSchurForm(h: Float64Array, nn: number, re: Float64Array, im: Float64Array, norm: number): void {
  const eps = Number.EPSILON;
  const small = eps * norm;
  let r = 0;
  let s = 0;
  let zz = 0;
  for (let n = nn - 1; n >= 0; n--) {
    const p = re[n];
    const q = im[n];
    const cn = n * nn;
    if (q === 0) {
      // Real eigenvalue: solve (T − p I) y = 0 with y_n = 1, upwards.
      let l = n;
      h[cn + n] = 1;
      for (let i = n - 1; i >= 0; i--) {
        const w = h[i + i * nn] - p;
        r = 0;
        for (let j = l; j <= n; j++) r += h[i + j * nn] * h[cn + j];
        if (im[i] < 0) {
          zz = w;
          s = r;
        } else {
          l = i;
          if (im[i] === 0) {
            h[cn + i] = w !== 0 ? -r / w : -r / small;
          } else {
            // 2×2 diagonal block of a complex pair above.
            const x = h[i + (i + 1) * nn];
            const y = h[i + 1 + i * nn];
            const dr = re[i] - p;
            const t = (x * s - zz * r) / (dr * dr + im[i] * im[i]);
            h[cn + i] = t;
            h[cn + i + 1] = Math.abs(x) > Math.abs(zz) ? (-r - w * t) / x : (-s - y * t) / zz;
          }
          // Rescale against overflow.
          const t = Math.abs(h[cn + i]);
          if (eps * t * t > 1) for (let j = i; j <= n; j++) h[cn + j] /= t;
        }
      }
    } else if (q < 0) {
      // Complex pair (met at its second member, λ_n = p + i q, q < 0): columns n−1, n get
      // Re and Im of the eigenvector of λ_{n−1} = p − i q.
      const cm = cn - nn;
      let l = n - 1;
      let ra = 0;
      let sa = 0;
      if (Math.abs(h[n + cm]) > Math.abs(h[n - 1 + cn])) {
        h[n - 1 + cm] = q / h[n + cm];
        h[n - 1 + cn] = -(h[n + cn] - p) / h[n + cm];
      } else {
        cdiv(0, -h[n - 1 + cn], h[n - 1 + cm] - p, q);
        h[n - 1 + cm] = cdivRe;
        h[n - 1 + cn] = cdivIm;
      }
      h[n + cm] = 0;
      h[n + cn] = 1;
      for (let i = n - 2; i >= 0; i--) {
        ra = 0;
        sa = 0;
        for (let j = l; j <= n; j++) {
          const hij = h[i + j * nn];
          ra += hij * h[cm + j];
          sa += hij * h[cn + j];
        }
        const w = h[i + i * nn] - p;
        if (im[i] < 0) {
          zz = w;
          r = ra;
          s = sa;
        } else {
          l = i;
          if (im[i] === 0) {
            cdiv(-ra, -sa, w, q);
            h[cm + i] = cdivRe;
            h[cn + i] = cdivIm;
          } else {
            const x = h[i + (i + 1) * nn];
            const y = h[i + 1 + i * nn];
            const dr = re[i] - p;
            let vr = dr * dr + im[i] * im[i] - q * q;
            const vi = dr * 2 * q;
            if (vr === 0 && vi === 0) vr = small * (Math.abs(w) + Math.abs(q) + Math.abs(x) + Math.abs(y) + Math.abs(zz));
            cdiv(x * r - zz * ra + q * sa, x * s - zz * sa - q * ra, vr, vi);
            h[cm + i] = cdivRe;
            h[cn + i] = cdivIm;
            if (Math.abs(x) > Math.abs(zz) + Math.abs(q)) {
              h[cm + i + 1] = (-ra - w * h[cm + i] + q * h[cn + i]) / x;
              h[cn + i + 1] = (-sa - w * h[cn + i] - q * h[cm + i]) / x;
            } else {
              cdiv(-r - y * h[cm + i], -s - y * h[cn + i], zz, q);
              h[cm + i + 1] = cdivRe;
              h[cn + i + 1] = cdivIm;
            }
          }
          const t = Math.max(Math.abs(h[cm + i]), Math.abs(h[cn + i]));
          if (eps * t * t > 1) {
            for (let j = i; j <= n; j++) {
              h[cm + j] /= t;
              h[cn + j] /= t;
            }
          }
        }
      }
    }
  }
}

/**
 * (U⁻¹)ᵀ of an upper triangular n×n matrix u (column-major, zero below the
 * diagonal), lower triangular; null on a zero diagonal entry. U⁻¹ column by
 * column (U x = e_j, back-substitution down the columns of U), then transposed.
 */
function upperInverseTransposed(u: Float64Array, n: number): Float64Array | null {
  for (let j = 0; j < n; j++) if (u[j + j * n] === 0) return null;
  const t = new Float64Array(n * n);
  const x = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    x.fill(0, 0, j);
    x[j] = 1;
    for (let k = j; k >= 0; k--) {
      const ck = k * n;
      const xk = (x[k] /= u[ck + k]);
      if (xk !== 0) for (let i = 0; i < k; i++) x[i] -= xk * u[ck + i];
    }
    // Row j of U⁻¹ is column j of the result.
    for (let i = 0; i <= j; i++) t[j + i * n] = x[i];
  }
  return t;
}

/** Z·L for a full n×n z and a lower triangular l (column j has rows j…n−1), column-major. Four output columns and two terms at a time. */
function multiplyLower(z: Float64Array, l: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n * n);
  let j = 0;
  for (; j + 3 < n; j += 4) addProducts(z, l, n, j, j, n - 1, out, j * n);
  for (; j < n; j++) addProducts1(z, l, n, j, j, n - 1, out, j * n);
  return out;
}

/** Z ← Z·U in place for an upper triangular u (column j has rows 0…j): from the last column back, so the columns still needed are unchanged. */
function multiplyUpperInPlace(z: Float64Array, u: Float64Array, n: number): void {
  const buf = new Float64Array(4 * n);
  let j = n - 1;
  for (; j >= 3; j -= 4) {
    buf.fill(0);
    addProducts(z, u, n, j - 3, 0, j, buf, 0);
    z.set(buf, (j - 3) * n);
  }
  for (; j >= 0; j--) {
    buf.fill(0, 0, n);
    addProducts1(z, u, n, j, 0, j, buf, 0);
    z.set(buf.subarray(0, n), j * n);
  }
}

/** out[o…] (four columns, n rows) += Σ_{k=kLo}^{kHi} Z[:, k]·C[k, j…j+3]; two terms per pass. */
function addProducts(z: Float64Array, c: Float64Array, n: number, j: number, kLo: number, kHi: number, out: Float64Array, o: number): void {
  const c0 = j * n;
  const c1 = c0 + n;
  const c2 = c1 + n;
  const c3 = c2 + n;
  const o0 = o;
  const o1 = o0 + n;
  const o2 = o1 + n;
  const o3 = o2 + n;
  let k = kLo;
  for (; k < kHi; k += 2) {
    const a0 = c[k + c0];
    const a1 = c[k + c1];
    const a2 = c[k + c2];
    const a3 = c[k + c3];
    const b0 = c[k + 1 + c0];
    const b1 = c[k + 1 + c1];
    const b2 = c[k + 1 + c2];
    const b3 = c[k + 1 + c3];
    const zk = k * n;
    const zl = zk + n;
    for (let i = 0; i < n; i++) {
      const p = z[zk + i];
      const q = z[zl + i];
      out[o0 + i] += p * a0 + q * b0;
      out[o1 + i] += p * a1 + q * b1;
      out[o2 + i] += p * a2 + q * b2;
      out[o3 + i] += p * a3 + q * b3;
    }
  }
  if (k === kHi) {
    const a0 = c[k + c0];
    const a1 = c[k + c1];
    const a2 = c[k + c2];
    const a3 = c[k + c3];
    const zk = k * n;
    for (let i = 0; i < n; i++) {
      const p = z[zk + i];
      out[o0 + i] += p * a0;
      out[o1 + i] += p * a1;
      out[o2 + i] += p * a2;
      out[o3 + i] += p * a3;
    }
  }
}

/** out[o…] (one column, n rows) += Σ_{k=kLo}^{kHi} Z[:, k]·C[k, j]. */
function addProducts1(z: Float64Array, c: Float64Array, n: number, j: number, kLo: number, kHi: number, out: Float64Array, o: number): void {
  const cj = j * n;
  for (let k = kLo; k <= kHi; k++) {
    const a = c[k + cj];
    if (a === 0) continue;
    const zk = k * n;
    for (let i = 0; i < n; i++) out[o + i] += z[zk + i] * a;
  }
}

let cdivRe = 0;
let cdivIm = 0;

/** Complex division (xr + i xi)/(yr + i yi) without overflow (Smith's method); result in cdivRe, cdivIm. */
function cdiv(xr: number, xi: number, yr: number, yi: number): void {
  if (Math.abs(yr) > Math.abs(yi)) {
    const t = yi / yr;
    const d = yr + t * yi;
    cdivRe = (xr + t * xi) / d;
    cdivIm = (xi - t * xr) / d;
  } else {
    const t = yr / yi;
    const d = yi + t * yr;
    cdivRe = (t * xr + xi) / d;
    cdivIm = (t * xi - xr) / d;
  }
}
