/**
 * Complex helpers for the reduced (small) operators of the engine.
 * Storage: split real/imaginary Float64Arrays, column-major, rows×cols.
 * Fact of the trade: common practice, no source (dense complex LU with partial pivoting).
 */
import { backend } from './backend.js';
import { matProductSync } from './gram.js';

export interface Complex {
  re: number;
  im: number;
}

/** A dense complex matrix, rows×cols, column-major, split storage. */
export interface ComplexMatrix {
  rows: number;
  cols: number;
  re: Float64Array;
  im: Float64Array;
}

/** Zero complex matrix of shape rows×cols. */
export function complexZeros(rows: number, cols: number): ComplexMatrix {
  return { rows, cols, re: new Float64Array(rows * cols), im: new Float64Array(rows * cols) };
}

/** Complex view of a real column-major matrix (rows×cols); copies. */
export function complexFromReal(a: Float64Array, rows: number, cols: number): ComplexMatrix {
  return { rows, cols, re: Float64Array.from(a.subarray(0, rows * cols)), im: new Float64Array(rows * cols) };
}

/** |z|. */
export function cabs(z: Complex): number {
  return Math.hypot(z.re, z.im);
}

/** Principal complex logarithm log z = ln|z| + i arg z (z ≠ 0). */
export function clog(z: Complex): Complex {
  return { re: Math.log(Math.hypot(z.re, z.im)), im: Math.atan2(z.im, z.re) };
}

/** C = A·B for complex A (p×q) and B (q×s). */
export function cmatmul(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  if (a.cols !== b.rows) throw new RangeError(`cannot multiply ${a.rows}×${a.cols} by ${b.rows}×${b.cols}`);
  const p = a.rows;
  const q = a.cols;
  const s = b.cols;
  const c = complexZeros(p, s);
  for (let j = 0; j < s; j++) {
    for (let t = 0; t < q; t++) {
      const br = b.re[t + j * q];
      const bi = b.im[t + j * q];
      if (br === 0 && bi === 0) continue;
      const oa = t * p;
      const oc = j * p;
      for (let i = 0; i < p; i++) {
        const ar = a.re[oa + i];
        const ai = a.im[oa + i];
        c.re[oc + i] += ar * br - ai * bi;
        c.im[oc + i] += ar * bi + ai * br;
      }
    }
  }
  return c;
}

/**
 * C = A·B for real A (p×q, column-major) and complex B (q×s).
 * Eigenvector matrices of real operators are mostly real columns and
 * conjugate pairs: a real column of B costs one real product, a column that
 * is the exact conjugate of the one before it costs nothing (A·conj(b) =
 * conj(A·b) exactly, A being real), any other column two real products.
 */
export function rcmatmul(a: Float64Array, p: number, q: number, b: ComplexMatrix): ComplexMatrix {
  const rhs = realRightHandSide(p, q, b);
  return assembleComplex(matProductSync(a, p, q, rhs.values, rhs.width), p, rhs);
}

/** rcmatmul for large A: the real products run on the dense kernels (backend().product: wasm, both cores). */
export async function rcProduct(a: Float64Array, p: number, q: number, b: ComplexMatrix): Promise<ComplexMatrix> {
  const { realForm, form } = await rcProductRealForm(a, p, q, b);
  return complexFromRealForm(realForm, p, form);
}

/**
 * The real form of C = A·B (p×width: per column of C its real part, and its imaginary
 * part unless C's column is real or the conjugate of the one before), which is A times
 * B's real form, with its layout (`form`). complexFromRealForm turns it into C;
 * lstsqRealFormTall solves on it directly.
 */
export async function rcProductRealForm(a: Float64Array, p: number, q: number, b: ComplexMatrix): Promise<{ realForm: Float64Array; form: RealForm }> {
  const rhs = realRightHandSide(p, q, b);
  return { realForm: await backend().product(a, p, q, rhs.values, rhs.width), form: rhs };
}

/** The complex p×s matrix whose real form (rcProductRealForm) is given. */
export function complexFromRealForm(realForm: Float64Array, p: number, form: RealForm): ComplexMatrix {
  return assembleComplex(realForm, p, form);
}

/** Which columns of a complex matrix are real, complex, or the conjugate of the one before, and where each starts in its real form. */
export type RealForm = RealRightHandSide;

interface RealRightHandSide {
  /** Per column of B: 0 real, 1 complex, 2 exact conjugate of the column before. */
  kind: Int8Array;
  /** Column of `values` where column j of B starts (its real part; the imaginary part follows when complex). */
  at: Int32Array;
  values: Float64Array;
  width: number;
}

function realRightHandSide(p: number, q: number, b: ComplexMatrix): RealRightHandSide {
  if (q !== b.rows) throw new RangeError(`cannot multiply ${p}×${q} by ${b.rows}×${b.cols}`);
  const s = b.cols;
  const kind = new Int8Array(s);
  let width = 0;
  for (let j = 0; j < s; j++) {
    const o = j * q;
    let real = true;
    for (let t = 0; t < q; t++) if (b.im[o + t] !== 0) { real = false; break; }
    if (real) { kind[j] = 0; width += 1; continue; }
    if (j > 0 && kind[j - 1] === 1) {
      const o1 = o - q;
      let conj = true;
      for (let t = 0; t < q; t++) if (b.re[o + t] !== b.re[o1 + t] || b.im[o + t] !== -b.im[o1 + t]) { conj = false; break; }
      if (conj) { kind[j] = 2; continue; }
    }
    kind[j] = 1;
    width += 2;
  }
  const values = new Float64Array(q * width);
  const at = new Int32Array(s);
  let w = 0;
  for (let j = 0; j < s; j++) {
    if (kind[j] === 2) continue;
    at[j] = w;
    values.set(b.re.subarray(j * q, j * q + q), w * q);
    w++;
    if (kind[j] === 1) {
      values.set(b.im.subarray(j * q, j * q + q), w * q);
      w++;
    }
  }
  return { kind, at, values, width };
}

function assembleComplex(prod: Float64Array, p: number, rhs: RealRightHandSide): ComplexMatrix {
  const { kind, at } = rhs;
  const s = kind.length;
  const c = complexZeros(p, s);
  for (let j = 0; j < s; j++) {
    const oc = j * p;
    if (kind[j] === 2) {
      for (let i = 0; i < p; i++) {
        c.re[oc + i] = c.re[oc - p + i];
        c.im[oc + i] = -c.im[oc - p + i];
      }
      continue;
    }
    c.re.set(prod.subarray(at[j] * p, at[j] * p + p), oc);
    if (kind[j] === 1) c.im.set(prod.subarray((at[j] + 1) * p, (at[j] + 1) * p + p), oc);
  }
  return c;
}

/** Aᴴ (conjugate transpose). */
export function cadjoint(a: ComplexMatrix): ComplexMatrix {
  const c = complexZeros(a.cols, a.rows);
  for (let j = 0; j < a.cols; j++) {
    for (let i = 0; i < a.rows; i++) {
      c.re[j + i * a.cols] = a.re[i + j * a.rows];
      c.im[j + i * a.cols] = -a.im[i + j * a.rows];
    }
  }
  return c;
}

/** Euclidean norm of column j. */
export function columnNorm(a: ComplexMatrix, j: number): number {
  let s = 0;
  const o = j * a.rows;
  for (let i = 0; i < a.rows; i++) s += a.re[o + i] ** 2 + a.im[o + i] ** 2;
  return Math.sqrt(s);
}

/** Euclidean norm of row i. */
export function rowNorm(a: ComplexMatrix, i: number): number {
  let s = 0;
  for (let j = 0; j < a.cols; j++) s += a.re[i + j * a.rows] ** 2 + a.im[i + j * a.rows] ** 2;
  return Math.sqrt(s);
}

/** Scale column j in place by the complex factor z. */
export function scaleColumn(a: ComplexMatrix, j: number, z: Complex): void {
  const o = j * a.rows;
  for (let i = 0; i < a.rows; i++) {
    const r = a.re[o + i];
    const m = a.im[o + i];
    a.re[o + i] = r * z.re - m * z.im;
    a.im[o + i] = r * z.im + m * z.re;
  }
}

/**
 * Columns idx[0], idx[1], … of `a` (distinct indices) as a matrix of idx.length
 * columns, moved within a's own storage (cycle by cycle, one column of scratch):
 * `a` is consumed. Same result as selectColumns without a second copy.
 */
export function takeColumnsInPlace(a: ComplexMatrix, idx: readonly number[]): ComplexMatrix {
  const { rows, cols } = a;
  const seen = new Uint8Array(cols);
  const full: number[] = [];
  for (const c of idx) {
    if (!Number.isInteger(c) || c < 0 || c >= cols || seen[c]) throw new RangeError(`column index ${c} is out of range or repeated (${cols} columns)`);
    seen[c] = 1;
    full.push(c);
  }
  for (let c = 0; c < cols; c++) if (!seen[c]) full.push(c);
  // new column d = old column full[d]
  const done = new Uint8Array(cols);
  const tr = new Float64Array(rows), ti = new Float64Array(rows);
  for (let d = 0; d < cols; d++) {
    if (done[d] || full[d] === d) continue;
    tr.set(a.re.subarray(d * rows, d * rows + rows));
    ti.set(a.im.subarray(d * rows, d * rows + rows));
    let cur = d;
    for (;;) {
      done[cur] = 1;
      const src = full[cur];
      if (src === d) {
        a.re.set(tr, cur * rows);
        a.im.set(ti, cur * rows);
        break;
      }
      a.re.copyWithin(cur * rows, src * rows, src * rows + rows);
      a.im.copyWithin(cur * rows, src * rows, src * rows + rows);
      cur = src;
    }
  }
  const k = idx.length;
  return { rows, cols: k, re: a.re.subarray(0, rows * k), im: a.im.subarray(0, rows * k) };
}

/** Select columns by index. */
export function selectColumns(a: ComplexMatrix, idx: readonly number[]): ComplexMatrix {
  const c = complexZeros(a.rows, idx.length);
  idx.forEach((src, dst) => {
    c.re.set(a.re.subarray(src * a.rows, (src + 1) * a.rows), dst * a.rows);
    c.im.set(a.im.subarray(src * a.rows, (src + 1) * a.rows), dst * a.rows);
  });
  return c;
}

/** Select rows by index. */
export function selectRows(a: ComplexMatrix, idx: readonly number[]): ComplexMatrix {
  const c = complexZeros(idx.length, a.cols);
  for (let j = 0; j < a.cols; j++) {
    idx.forEach((src, dst) => {
      c.re[dst + j * idx.length] = a.re[src + j * a.rows];
      c.im[dst + j * idx.length] = a.im[src + j * a.rows];
    });
  }
  return c;
}

/**
 * Solve A X = B for square complex A (k×k) by LU with partial pivoting.
 * Throws when A is singular to working precision.
 */
export function csolve(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  const k = a.rows;
  if (a.cols !== k || b.rows !== k) throw new RangeError(`csolve: A is ${a.rows}×${a.cols}, B is ${b.rows}×${b.cols}`);
  const lr = Float64Array.from(a.re);
  const li = Float64Array.from(a.im);
  const xr = Float64Array.from(b.re);
  const xi = Float64Array.from(b.im);
  const s = b.cols;
  let scale = 0;
  for (let t = 0; t < k * k; t++) scale = Math.max(scale, Math.hypot(lr[t], li[t]));
  for (let c = 0; c < k; c++) {
    let p = c;
    let best = -1;
    for (let i = c; i < k; i++) {
      const v = Math.hypot(lr[i + c * k], li[i + c * k]);
      if (v > best) {
        best = v;
        p = i;
      }
    }
    if (!(best > scale * 1e-300) || best === 0) throw new RangeError('matrix is singular to working precision');
    if (p !== c) {
      for (let j = 0; j < k; j++) {
        swap(lr, p + j * k, c + j * k);
        swap(li, p + j * k, c + j * k);
      }
      for (let j = 0; j < s; j++) {
        swap(xr, p + j * k, c + j * k);
        swap(xi, p + j * k, c + j * k);
      }
    }
    const dr = lr[c + c * k];
    const di = li[c + c * k];
    const dd = dr * dr + di * di;
    for (let i = c + 1; i < k; i++) {
      const nr = lr[i + c * k];
      const ni = li[i + c * k];
      // f = n / d
      const fr = (nr * dr + ni * di) / dd;
      const fi = (ni * dr - nr * di) / dd;
      lr[i + c * k] = fr;
      li[i + c * k] = fi;
      for (let j = c + 1; j < k; j++) {
        const ur = lr[c + j * k];
        const ui = li[c + j * k];
        lr[i + j * k] -= fr * ur - fi * ui;
        li[i + j * k] -= fr * ui + fi * ur;
      }
      for (let j = 0; j < s; j++) {
        const ur = xr[c + j * k];
        const ui = xi[c + j * k];
        xr[i + j * k] -= fr * ur - fi * ui;
        xi[i + j * k] -= fr * ui + fi * ur;
      }
    }
  }
  for (let j = 0; j < s; j++) {
    for (let i = k - 1; i >= 0; i--) {
      let sr = xr[i + j * k];
      let si = xi[i + j * k];
      for (let t = i + 1; t < k; t++) {
        const ar = lr[i + t * k];
        const ai = li[i + t * k];
        const vr = xr[t + j * k];
        const vi = xi[t + j * k];
        sr -= ar * vr - ai * vi;
        si -= ar * vi + ai * vr;
      }
      const dr = lr[i + i * k];
      const di = li[i + i * k];
      const dd = dr * dr + di * di;
      xr[i + j * k] = (sr * dr + si * di) / dd;
      xi[i + j * k] = (si * dr - sr * di) / dd;
    }
  }
  return { rows: k, cols: s, re: xr, im: xi };
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i];
  a[i] = a[j];
  a[j] = t;
}

/** Identity k×k. */
export function cidentity(k: number): ComplexMatrix {
  const c = complexZeros(k, k);
  for (let i = 0; i < k; i++) c.re[i + i * k] = 1;
  return c;
}

/** A⁻¹ for square complex A. */
export function cinverse(a: ComplexMatrix): ComplexMatrix {
  return csolve(a, cidentity(a.rows));
}

/**
 * Least-squares solution of min ‖A x − b‖ for complex A (p×q, full column rank):
 * thin QR by modified Gram–Schmidt with one re-orthogonalisation, then R x = Qᴴ b.
 * Shapes: A p×q, b p×s → q×s. Fact of the trade: common practice, no source.
 */
export function clstsq(a: ComplexMatrix, b: ComplexMatrix): ComplexMatrix {
  const p = a.rows;
  const q = a.cols;
  if (b.rows !== p) throw new RangeError(`clstsq: A is ${p}×${q}, b has ${b.rows} rows`);
  const qr = Float64Array.from(a.re);
  const qi = Float64Array.from(a.im);
  const r = complexZeros(q, q);
  for (let j = 0; j < q; j++) {
    for (let pass = 0; pass < 2; pass++) {
      for (let t = 0; t < j; t++) {
        // c = q_tᴴ a_j
        let cr = 0;
        let ci = 0;
        for (let i = 0; i < p; i++) {
          const ur = qr[i + t * p];
          const ui = qi[i + t * p];
          const vr = qr[i + j * p];
          const vi = qi[i + j * p];
          cr += ur * vr + ui * vi;
          ci += ur * vi - ui * vr;
        }
        r.re[t + j * q] += cr;
        r.im[t + j * q] += ci;
        for (let i = 0; i < p; i++) {
          const ur = qr[i + t * p];
          const ui = qi[i + t * p];
          qr[i + j * p] -= cr * ur - ci * ui;
          qi[i + j * p] -= cr * ui + ci * ur;
        }
      }
    }
    let nrm = 0;
    for (let i = 0; i < p; i++) nrm += qr[i + j * p] ** 2 + qi[i + j * p] ** 2;
    nrm = Math.sqrt(nrm);
    if (nrm === 0) throw new RangeError('least squares: the columns are linearly dependent');
    r.re[j + j * q] = nrm;
    for (let i = 0; i < p; i++) {
      qr[i + j * p] /= nrm;
      qi[i + j * p] /= nrm;
    }
  }
  const qm: ComplexMatrix = { rows: p, cols: q, re: qr, im: qi };
  const rhs = cmatmul(cadjoint(qm), b);
  return csolve(r, rhs);
}

/**
 * Least squares min ‖Φ b − x‖ for a complex Φ (p×q) whose columns are real or
 * come in exact conjugate pairs (modes of a real operator), and a real x.
 * With Φ = Φ_R·P (Φ_R: real and imaginary parts of each pair, P block-diagonal
 * and invertible), the complex solution is b = P⁻¹c where c solves the real
 * problem min ‖Φ_R c − x‖: a pair's (u + iv, u − iv) coefficients are
 * ((c_u − i c_v)/2, (c_u + i c_v)/2). About four times fewer flops than the
 * complex route, which is used when a complex column has no partner.
 * Fact of the trade: common practice, no source.
 */
export function lstsqConjugateColumns(phi: ComplexMatrix, x: Float64Array): ComplexMatrix {
  const p = phi.rows;
  const rhs = realRightHandSide(p, p, phi);
  if (!pairedColumns(rhs.kind)) return complexRoute(phi, x);
  return fromRealForm(rlstsq(rhs.values, p, rhs.width, x), rhs);
}

/**
 * lstsqConjugateColumns for tall Φ: the real problem by CholeskyQR2 on the dense kernels
 * (Fukaya, Nakatsukasa, Yanagisawa & Yamamoto 2014, "CholeskyQR2: a simple and
 * communication-avoiding algorithm for computing a tall-skinny QR factorization"):
 * R₁ = chol(AᵀA), Q₁ = A R₁⁻¹, R₂ = chol(Q₁ᵀQ₁), then c = R₁⁻¹ R₂⁻¹ R₂⁻ᵀ Q₁ᵀx. The
 * second step restores orthogonality to round-off when the first one's is off by less
 * than about one (checked: ‖Q₁ᵀQ₁ − I‖_max ≤ 0.5); otherwise, or when a Cholesky
 * factorisation breaks down (nearly dependent columns), the Gram–Schmidt route decides.
 */
export async function lstsqConjugateColumnsTall(phi: ComplexMatrix, x: Float64Array): Promise<ComplexMatrix> {
  const rhs = realRightHandSide(phi.rows, phi.rows, phi);
  return lstsqRealFormTall(rhs.values, phi.rows, rhs, phi, x);
}

/**
 * lstsqConjugateColumnsTall given Φ's real form (p rows; from rcProductRealForm), without
 * building it again. `phi` (Φ itself, or a function that builds it) is used only when a
 * complex column has no partner and the complex route must run.
 */
export async function lstsqRealFormTall(
  values: Float64Array, p: number, rhs: RealForm, phi: ComplexMatrix | (() => ComplexMatrix), x: Float64Array,
): Promise<ComplexMatrix> {
  if (!pairedColumns(rhs.kind)) return complexRoute(typeof phi === 'function' ? phi() : phi, x);
  const q = rhs.width;
  const be = backend();
  const r1 = choleskyUpper(await be.gram(values, p, q), q);
  if (r1) {
    const q1 = await be.product(values, p, q, upperInverse(r1, q), q);
    const g2 = await be.gram(q1, p, q);
    let off = 0;
    for (let j = 0; j < q; j++) for (let i = 0; i < q; i++) off = Math.max(off, Math.abs(g2[i + j * q] - (i === j ? 1 : 0)));
    const r2 = off <= 0.5 ? choleskyUpper(g2, q) : null;
    if (r2) {
      const c = await be.cross(q1, x.subarray(0, p), p, q, 1); // Q₁ᵀx
      solveUpper(r2, q, c, true); // R₂⁻ᵀ
      solveUpper(r2, q, c, false); // R₂⁻¹
      solveUpper(r1, q, c, false); // R₁⁻¹
      if (c.every(Number.isFinite)) return fromRealForm(c, rhs);
    }
  }
  return fromRealForm(rlstsq(values, p, q, x), rhs);
}

function pairedColumns(kind: Int8Array): boolean {
  return Array.from(kind).every((k, j) => k !== 1 || kind[j + 1] === 2);
}

function complexRoute(phi: ComplexMatrix, x: Float64Array): ComplexMatrix {
  const xb = complexZeros(phi.rows, 1);
  xb.re.set(x.subarray(0, phi.rows));
  return clstsq(phi, xb);
}

/** Upper triangular R with RᵀR = G (q×q, column-major), or null when G is not numerically positive definite. */
function choleskyUpper(g: Float64Array, q: number): Float64Array | null {
  const r = new Float64Array(q * q);
  for (let j = 0; j < q; j++) {
    for (let i = 0; i <= j; i++) {
      let s = g[i + j * q];
      for (let t = 0; t < i; t++) s -= r[t + i * q] * r[t + j * q];
      if (i === j) {
        if (!(s > 0)) return null;
        r[j + j * q] = Math.sqrt(s);
      } else {
        r[i + j * q] = s / r[i + i * q];
      }
    }
  }
  return r;
}

/** R⁻¹ of an upper triangular q×q matrix (column-major). */
function upperInverse(r: Float64Array, q: number): Float64Array {
  const inv = new Float64Array(q * q);
  for (let j = 0; j < q; j++) {
    const col = new Float64Array(q);
    col[j] = 1;
    solveUpper(r, q, col, false);
    inv.set(col, j * q);
  }
  return inv;
}

/** b ← R⁻¹b, or R⁻ᵀb with `transposed`, for upper triangular R (q×q, column-major). */
function solveUpper(r: Float64Array, q: number, b: Float64Array, transposed: boolean): void {
  if (transposed) {
    for (let i = 0; i < q; i++) {
      let s = b[i];
      for (let t = 0; t < i; t++) s -= r[t + i * q] * b[t];
      b[i] = s / r[i + i * q];
    }
  } else {
    for (let i = q - 1; i >= 0; i--) {
      let s = b[i];
      for (let t = i + 1; t < q; t++) s -= r[i + t * q] * b[t];
      b[i] = s / r[i + i * q];
    }
  }
}

/** b = P⁻¹c: real coefficients of the real form back to the complex columns. */
function fromRealForm(c: Float64Array, rhs: RealRightHandSide): ComplexMatrix {
  const { kind, at } = rhs;
  const q = kind.length;
  const out = complexZeros(q, 1);
  for (let j = 0; j < q; j++) {
    if (kind[j] === 0) out.re[j] = c[at[j]];
    else if (kind[j] === 1) {
      const cu = c[at[j]], cv = c[at[j] + 1];
      out.re[j] = 0.5 * cu;
      out.im[j] = -0.5 * cv;
      out.re[j + 1] = 0.5 * cu;
      out.im[j + 1] = 0.5 * cv;
    }
  }
  return out;
}

/** A column whose part outside the earlier columns' span is below this fraction of its norm counts as dependent. */
const DEPENDENT = 1e-12;

/**
 * Real least squares min ‖A c − x‖ (A p×q, full column rank): thin QR by
 * Gram–Schmidt with one re-orthogonalisation (block-modified in groups of four
 * columns; "twice is enough", Giraud, Langou & Rozložník 2005), then R c = Qᵀx.
 */
export function rlstsq(a: Float64Array, p: number, q: number, x: Float64Array): Float64Array {
  if (x.length < p) throw new RangeError(`rlstsq: A is ${p}×${q}, x has ${x.length} rows`);
  const be = backend();
  if (be.leastSquares) {
    // The backend's solver (LAPACK dgelsd on the OpenBLAS backend); the same refusal of
    // dependent columns: a singular value at or below DEPENDENT·σ₁ means rank < q.
    const res = be.leastSquares(a, p, q, x, 1, DEPENDENT);
    if (res.rank < q) throw new RangeError('least squares: the columns are linearly dependent');
    return res.x;
  }
  const qm = Float64Array.from(a.subarray(0, p * q));
  const r = new Float64Array(q * q);
  for (let j = 0; j < q; j++) {
    const oj = j * p;
    let norm0 = 0;
    for (let i = 0; i < p; i++) norm0 += qm[oj + i] * qm[oj + i];
    for (let pass = 0; pass < 2; pass++) {
      // Four earlier columns per sweep over the rows: classical inside a group of four, modified across groups.
      let t = 0;
      for (; t + 4 <= j; t += 4) {
        const o0 = t * p, o1 = o0 + p, o2 = o1 + p, o3 = o2 + p;
        let c0 = 0, c1 = 0, c2 = 0, c3 = 0;
        for (let i = 0; i < p; i++) {
          const v = qm[oj + i];
          c0 += qm[o0 + i] * v; c1 += qm[o1 + i] * v; c2 += qm[o2 + i] * v; c3 += qm[o3 + i] * v;
        }
        r[t + j * q] += c0; r[t + 1 + j * q] += c1; r[t + 2 + j * q] += c2; r[t + 3 + j * q] += c3;
        for (let i = 0; i < p; i++) qm[oj + i] -= c0 * qm[o0 + i] + c1 * qm[o1 + i] + c2 * qm[o2 + i] + c3 * qm[o3 + i];
      }
      for (; t < j; t++) {
        const ot = t * p;
        let c = 0;
        for (let i = 0; i < p; i++) c += qm[ot + i] * qm[oj + i];
        r[t + j * q] += c;
        for (let i = 0; i < p; i++) qm[oj + i] -= c * qm[ot + i];
      }
    }
    let nrm = 0;
    for (let i = 0; i < p; i++) nrm += qm[oj + i] * qm[oj + i];
    nrm = Math.sqrt(nrm);
    // What is left of the column after removing the earlier ones is round-off: dependent columns.
    if (!(nrm > DEPENDENT * Math.sqrt(norm0))) throw new RangeError('least squares: the columns are linearly dependent');
    r[j + j * q] = nrm;
    for (let i = 0; i < p; i++) qm[oj + i] /= nrm;
  }
  const c = new Float64Array(q);
  for (let j = 0; j < q; j++) {
    let s = 0;
    for (let i = 0; i < p; i++) s += qm[j * p + i] * x[i];
    c[j] = s;
  }
  for (let j = q - 1; j >= 0; j--) {
    let s = c[j];
    for (let t = j + 1; t < q; t++) s -= r[j + t * q] * c[t];
    c[j] = s / r[j + j * q];
  }
  return c;
}
