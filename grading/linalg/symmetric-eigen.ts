import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { eigenKernels, eigenMemory } from './eigen-wasm.js';

export interface SymmetricEigen {
  /** Eigenvalues, descending, length r (or the `valuesCount` asked for, when larger). */
  values: Float64Array;
  /** Eigenvectors, k×r column-major, orthonormal; column i belongs to values[i]. */
  vectors: Float64Array;
}

/**
 * Leading r eigenpairs of a symmetric k×k matrix (column-major; the lower
 * triangle is read).
 *
 * Partial route (the textbook one for "a few eigenpairs of a dense symmetric
 * matrix"):
 *   1. Householder reduction to tridiagonal form T = Hᵀ A H, with the rank-2
 *      update of one step fused into the matrix–vector product of the next,
 *      so the trailing matrix is swept once per step;
 *   2. the r largest eigenvalues of T by Sturm-sequence bisection;
 *   3. their eigenvectors of T by inverse iteration, re-orthogonalised inside
 *      clusters of close eigenvalues;
 *   4. back-transformation by the stored reflectors (k²·r work instead of the
 *      k³ of accumulating all of H and all eigenvectors).
 * Each eigenvector's largest-magnitude entry is made positive, so the output
 * does not depend on the sign choices of the solver.
 *
 * `valuesCount` (r ≤ valuesCount ≤ k, default r) asks for more eigenvalues
 * than eigenvectors: e.g. all k values (to find a numerical rank) with the
 * vectors of the leading r only; the extra values cost bisection only.
 */
export function leadingSymmetricEigen(a: Float64Array, k: number, r: number, valuesCount: number = r): SymmetricEigen {
  checkInput(a, k, r);
  if (!Number.isInteger(valuesCount) || valuesCount < r || valuesCount > k) {
    throw new RangeError(`asked for ${valuesCount} eigenvalues with ${r} eigenvectors of a ${k}×${k} matrix; expected ${r} to ${k}`);
  }
  if (valuesCount === 0) return { values: new Float64Array(0), vectors: new Float64Array(0) };
  if (k === 1) return { values: Float64Array.of(a[0]), vectors: r === 1 ? Float64Array.of(1) : new Float64Array(0) };
  const ws = workspace(k, r);
  ws.w.set(a.subarray(0, k * k));
  const d = new Float64Array(k);
  const e = new Float64Array(Math.max(0, k - 1));
  const tau = ws.tau;
  tridiagonalize(ws, k, d, e);
  // Bisection for eigenvalue c depends only on the ones before it, and inverse iteration for vector c
  // only on values[0…c]: the leading r pairs are the same whatever valuesCount is.
  const values = largestTridiagonalEigenvalues(d, e, valuesCount);
  if (r === 0) return { values, vectors: new Float64Array(0) };
  tridiagonalEigenvectors(ws, d, e, values.subarray(0, r));
  if (ws.kernels) ws.kernels.backTransform(ws.at.w, k, ws.at.tau, ws.at.z, r);
  else backTransform(ws.w, k, tau, ws.z, r);
  const z = Float64Array.from(ws.z);
  normaliseSigns(z, k, r);
  return { values, vectors: z };
}

/**
 * Working arrays of one decomposition: in the WebAssembly kernels' memory when
 * they run here (eigen-wasm.ts), else ordinary arrays. `at` holds byte offsets.
 */
interface Workspace {
  w: Float64Array;
  pv: Float64Array;
  pw: Float64Array;
  v: Float64Array;
  p: Float64Array;
  tau: Float64Array;
  z: Float64Array;
  x: Float64Array;
  kernels: ReturnType<typeof eigenKernels>;
  at: { w: number; pv: number; pw: number; v: number; p: number; tau: number; z: number; x: number };
}

function workspace(k: number, r: number): Workspace {
  const sizes = { w: k * k, pv: k, pw: k, v: k, p: k, tau: k, z: k * r, x: k };
  const at = { w: 0, pv: 0, pw: 0, v: 0, p: 0, tau: 0, z: 0, x: 0 };
  let off = 0;
  for (const key of Object.keys(sizes) as (keyof typeof sizes)[]) {
    at[key] = off * 8;
    off += sizes[key] + (sizes[key] & 1); // keep every array 16-byte aligned
  }
  const kr = eigenKernels();
  const mem = kr ? eigenMemory(kr, off * 8) : null;
  const view = (key: keyof typeof sizes, buf: Float64Array): Float64Array => buf.subarray(at[key] / 8, at[key] / 8 + sizes[key]);
  const buf = mem ?? new Float64Array(off);
  // w is filled by the caller and z, x, tau are written before they are read; the pending
  // update (pv, pw) and p must start at zero, as in fresh arrays.
  if (mem) buf.fill(0, at.pv / 8, at.tau / 8);
  return {
    w: view('w', buf), pv: view('pv', buf), pw: view('pw', buf), v: view('v', buf), p: view('p', buf),
    tau: view('tau', buf), z: view('z', buf), x: view('x', buf),
    kernels: mem ? kr : null,
    at,
  };
}

/**
 * Full decomposition by ml-matrix (tridiagonal QL), then the r largest.
 * Kept as the independent cross-check of the partial route.
 */
export function leadingSymmetricEigenFull(a: Float64Array, k: number, r: number): SymmetricEigen {
  checkInput(a, k, r);
  const m = new Matrix(k, k);
  for (let j = 0; j < k; j++) for (let i = 0; i < k; i++) m.set(i, j, a[i + j * k]);
  const evd = new EigenvalueDecomposition(m, { assumeSymmetric: true });
  const vals = evd.realEigenvalues; // ascending
  const vecs = evd.eigenvectorMatrix;
  const values = new Float64Array(r);
  const vectors = new Float64Array(k * r);
  for (let c = 0; c < r; c++) {
    const src = k - 1 - c;
    values[c] = vals[src];
    for (let i = 0; i < k; i++) vectors[i + c * k] = vecs.get(i, src);
  }
  normaliseSigns(vectors, k, r);
  return { values, vectors };
}

function checkInput(a: Float64Array, k: number, r: number): void {
  if (!Number.isInteger(k) || k < 0) throw new RangeError(`matrix size ${k} is not a non-negative integer`);
  if (!Number.isInteger(r) || r < 0) throw new RangeError(`number of eigenpairs ${r} is not a non-negative integer`);
  if (r > k) throw new RangeError(`asked for ${r} eigenpairs of a ${k}×${k} matrix`);
  if (a.length < k * k) throw new RangeError(`matrix has ${a.length} entries, expected ${k}×${k} = ${k * k}`);
  for (let j = 0; j < k; j++) {
    for (let i = j; i < k; i++) {
      const x = a[i + j * k];
      if (!Number.isFinite(x)) throw new RangeError(`matrix entry (${i}, ${j}) is ${x}; a symmetric eigenproblem needs finite entries`);
    }
  }
}

/**
 * Householder tridiagonalisation of the lower triangle of w (k×k, column-major)
 * in place. On return d/e hold the diagonal/subdiagonal of T; reflector j is
 * H_j = I − tau[j]·v vᵀ acting on rows j+1…k−1 with v = [1, w[j+2…k−1, j]].
 */
function tridiagonalize(ws: Workspace, k: number, d: Float64Array, e: Float64Array): void {
  const { w, v, p, tau } = ws;
  // Pending rank-2 update A −= pv·pwᵀ + pw·pvᵀ of the trailing block (zero when none).
  const { pv, pw } = ws;
  const kr = ws.kernels;
  for (let j = 0; j < k; j++) {
    const cj = j * k;
    {
      const b = pv[j], c = pw[j];
      for (let i = j; i < k; i++) w[cj + i] -= pv[i] * c + pw[i] * b;
    }
    d[j] = w[cj + j];
    if (j >= k - 1) break;
    if (j === k - 2) {
      e[j] = w[cj + j + 1];
      tau[j] = 0;
      w[(k - 1) * k + (k - 1)] -= 2 * pv[k - 1] * pw[k - 1];
      pv[k - 1] = 0;
      pw[k - 1] = 0;
      continue;
    }
    // Reflector for x = w[j+1…k−1, j].
    const alpha = w[cj + j + 1];
    let sigma = 0;
    for (let i = j + 2; i < k; i++) sigma += w[cj + i] * w[cj + i];
    if (sigma === 0) {
      // Already tridiagonal in this column: H_j = I; apply the pending update now.
      e[j] = alpha;
      tau[j] = 0;
      for (let c = j + 1; c < k; c++) {
        const cc = c * k, b = pv[c], g = pw[c];
        for (let i = c; i < k; i++) w[cc + i] -= pv[i] * g + pw[i] * b;
      }
      pv.fill(0);
      pw.fill(0);
      continue;
    }
    const norm = Math.hypot(alpha, Math.sqrt(sigma));
    const beta = alpha > 0 ? -norm : norm;
    const t = (beta - alpha) / beta;
    const scale = 1 / (alpha - beta);
    v[j + 1] = 1;
    for (let i = j + 2; i < k; i++) {
      const x = w[cj + i] * scale;
      w[cj + i] = x;
      v[i] = x;
    }
    e[j] = beta;
    tau[j] = t;
    // p = A22·v over the trailing block, fused with the pending update; two columns per sweep.
    for (let i = j + 1; i < k; i++) p[i] = 0;
    if (kr) kr.sweep(ws.at.w, k, j + 1, ws.at.pv, ws.at.pw, ws.at.v, ws.at.p);
    else sweep(w, k, j + 1, pv, pw, v, p);
    // w = tau·p − (tau²/2)(pᵀv)·v ; new pending update A −= v wᵀ + w vᵀ.
    let pv0 = 0;
    for (let i = j + 1; i < k; i++) pv0 += p[i] * v[i];
    const half = 0.5 * t * t * pv0;
    for (let i = j + 1; i < k; i++) {
      pv[i] = v[i];
      pw[i] = t * p[i] - half * v[i];
    }
  }
}

/**
 * One step's O(k²) part (scalar route; eigen-wasm.ts `sweep` is the SIMD one):
 * for the trailing columns c ≥ c0 of the lower triangle, W −= pv·pwᵀ + pw·pvᵀ
 * and p += W·v, two columns per sweep.
 */
function sweep(w: Float64Array, k: number, c0: number, pv: Float64Array, pw: Float64Array, v: Float64Array, p: Float64Array): void {
    let c = c0;
    for (; c + 1 < k; c += 2) {
      const c1 = c + 1;
      const o0 = c * k, o1 = c1 * k;
      const b0 = pv[c], g0 = pw[c], b1 = pv[c1], g1 = pw[c1];
      const v0 = v[c], v1 = v[c1];
      const x00 = w[o0 + c] - 2 * b0 * g0;
      const x10 = w[o0 + c1] - (pv[c1] * g0 + pw[c1] * b0);
      const x11 = w[o1 + c1] - 2 * b1 * g1;
      w[o0 + c] = x00;
      w[o0 + c1] = x10;
      w[o1 + c1] = x11;
      let acc0 = x00 * v0 + x10 * v1;
      let acc1 = x10 * v0 + x11 * v1;
      for (let i = c1 + 1; i < k; i++) {
        const pvi = pv[i], pwi = pw[i], vi = v[i];
        const y0 = w[o0 + i] - (pvi * g0 + pwi * b0);
        const y1 = w[o1 + i] - (pvi * g1 + pwi * b1);
        w[o0 + i] = y0;
        w[o1 + i] = y1;
        p[i] += y0 * v0 + y1 * v1;
        acc0 += y0 * vi;
        acc1 += y1 * vi;
      }
      p[c] += acc0;
      p[c1] += acc1;
    }
    if (c < k) {
      const cc = c * k, b = pv[c], g = pw[c];
      const x = w[cc + c] - 2 * b * g;
      w[cc + c] = x;
      p[c] += x * v[c];
    }
}

/** The r largest eigenvalues of T, descending, by bisection to full precision. */
function largestTridiagonalEigenvalues(d: Float64Array, e: Float64Array, r: number): Float64Array {
  const k = d.length;
  const e2 = new Float64Array(e.length);
  let lo = Infinity, hi = -Infinity, tnorm = 0;
  for (let i = 0; i < k; i++) {
    const rad = (i > 0 ? Math.abs(e[i - 1]) : 0) + (i < k - 1 ? Math.abs(e[i]) : 0);
    lo = Math.min(lo, d[i] - rad);
    hi = Math.max(hi, d[i] + rad);
    tnorm = Math.max(tnorm, Math.abs(d[i]) + rad);
  }
  let maxE2 = 0;
  for (let i = 0; i < e.length; i++) {
    e2[i] = e[i] * e[i];
    maxE2 = Math.max(maxE2, e2[i]);
  }
  const eps = Number.EPSILON;
  const tiny = Number.MIN_VALUE * 2 ** 60;
  const pivmin = Math.max(tiny, tiny * maxE2);
  const pad = 2 * eps * tnorm + 2 * pivmin;
  lo -= pad;
  hi += pad;
  const out = new Float64Array(r);
  // The eigenvalue with index idx (0 = smallest) is the one where the count passes idx.
  // Four eigenvalues are bisected at once: their Sturm sequences are independent, so one
  // pass over T serves four shifts (the divisions of one sequence no longer wait on each other).
  const lo4 = new Float64Array(4), hi4 = new Float64Array(4), mid4 = new Float64Array(4);
  const done = new Uint8Array(4);
  let upper = hi;
  for (let c0 = 0; c0 < r; c0 += 4) {
    const lanes = Math.min(4, r - c0);
    for (let l = 0; l < 4; l++) {
      lo4[l] = lo;
      hi4[l] = upper;
      done[l] = l < lanes ? 0 : 1;
    }
    for (let it = 0; it < 200; it++) {
      let active = 0;
      for (let l = 0; l < 4; l++) {
        const a = lo4[l], b = hi4[l];
        const mid = 0.5 * (a + b);
        if (!done[l] && (b - a <= 2 * eps * Math.max(Math.abs(a), Math.abs(b)) + pivmin || mid === a || mid === b)) done[l] = 1;
        mid4[l] = done[l] ? a : mid;
        if (!done[l]) active++;
      }
      if (active === 0) break;
      countBelow4(d, e2, mid4, pivmin, counts4);
      for (let l = 0; l < 4; l++) {
        if (done[l]) continue;
        if (counts4[l] > k - 1 - (c0 + l)) hi4[l] = mid4[l];
        else lo4[l] = mid4[l];
      }
    }
    for (let l = 0; l < lanes; l++) out[c0 + l] = 0.5 * (lo4[l] + hi4[l]);
    upper = hi4[lanes - 1]; // the next (smaller) eigenvalues lie below this bracket's top
  }
  return out;
}

const counts4 = new Int32Array(4);

/** Sturm counts: the number of eigenvalues of T (diagonal d, squared subdiagonal e2) below each of four shifts. */
function countBelow4(d: Float64Array, e2: Float64Array, x: Float64Array, pivmin: number, out: Int32Array): void {
  const k = d.length;
  const x0 = x[0], x1 = x[1], x2 = x[2], x3 = x[3];
  let n0 = 0, n1 = 0, n2 = 0, n3 = 0;
  let q0 = d[0] - x0, q1 = d[0] - x1, q2 = d[0] - x2, q3 = d[0] - x3;
  for (let i = 0; ; i++) {
    if (Math.abs(q0) < pivmin) q0 = -pivmin;
    if (Math.abs(q1) < pivmin) q1 = -pivmin;
    if (Math.abs(q2) < pivmin) q2 = -pivmin;
    if (Math.abs(q3) < pivmin) q3 = -pivmin;
    if (q0 < 0) n0++;
    if (q1 < 0) n1++;
    if (q2 < 0) n2++;
    if (q3 < 0) n3++;
    if (i + 1 >= k) break;
    const di = d[i + 1], ei = e2[i];
    q0 = di - x0 - ei / q0;
    q1 = di - x1 - ei / q1;
    q2 = di - x2 - ei / q2;
    q3 = di - x3 - ei / q3;
  }
  out[0] = n0; out[1] = n1; out[2] = n2; out[3] = n3;
}

/** Deterministic pseudo-random start vectors for inverse iteration. */
function seededFill(x: Float64Array, seed: number): void {
  let s = (seed * 2654435761 + 12345) >>> 0;
  for (let i = 0; i < x.length; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    x[i] = s / 4294967296 - 0.5;
  }
}

/**
 * Eigenvectors of T for the given (descending) eigenvalues by inverse iteration
 * with a partially pivoted tridiagonal LU; vectors of eigenvalues closer than
 * 1e-3·‖T‖ to their neighbour are orthogonalised against that cluster.
 * Writes them, k×r column-major, into the workspace's z.
 */
function tridiagonalEigenvectors(ws: Workspace, d: Float64Array, e: Float64Array, values: Float64Array): void {
  const k = d.length;
  const r = values.length;
  const { z, x } = ws;
  const kr = ws.kernels;
  let tnorm = 0;
  for (let i = 0; i < k; i++) tnorm = Math.max(tnorm, Math.abs(d[i]) + (i > 0 ? Math.abs(e[i - 1]) : 0) + (i < k - 1 ? Math.abs(e[i]) : 0));
  if (tnorm === 0) tnorm = 1;
  const eps = Number.EPSILON;
  const ortol = 1e-3 * tnorm;
  const pivTiny = eps * tnorm;
  // LU of (T − λI) with row interchanges: U has diagonal u0, superdiagonals u1, u2; multipliers l; swap flags.
  const u0 = new Float64Array(k), u1 = new Float64Array(k), u2 = new Float64Array(k), l = new Float64Array(k);
  const swap = new Uint8Array(k);
  let clusterStart = 0;
  let prevLambda = Infinity;
  for (let c = 0; c < r; c++) {
    let lambda = values[c];
    if (c > 0 && prevLambda - lambda < ortol) {
      // Same cluster; separate equal eigenvalues slightly so the iterations differ.
      if (prevLambda - lambda < 10 * eps * Math.abs(lambda)) lambda = prevLambda - 10 * eps * Math.max(Math.abs(lambda), tnorm * 1e-12);
    } else {
      clusterStart = c;
    }
    prevLambda = lambda;
    // Factorise.
    let diag = d[0] - lambda;
    let sup = k > 1 ? e[0] : 0;
    for (let i = 0; i < k - 1; i++) {
      const sub = e[i];
      const nd = d[i + 1] - lambda;
      const nsup = i + 1 < k - 1 ? e[i + 1] : 0;
      if (Math.abs(diag) >= Math.abs(sub)) {
        swap[i] = 0;
        const piv = diag === 0 ? pivTiny : diag;
        const m = sub / piv;
        u0[i] = piv; u1[i] = sup; u2[i] = 0; l[i] = m;
        diag = nd - m * sup;
        sup = nsup;
      } else {
        swap[i] = 1;
        const m = diag / sub;
        u0[i] = sub; u1[i] = nd; u2[i] = nsup; l[i] = m;
        diag = sup - m * nd;
        sup = -m * nsup;
      }
    }
    u0[k - 1] = Math.abs(diag) < pivTiny ? (diag < 0 ? -pivTiny : pivTiny) : diag;
    for (let i = 0; i < k - 1; i++) if (Math.abs(u0[i]) < pivTiny) u0[i] = u0[i] < 0 ? -pivTiny : pivTiny;
    seededFill(x, c + 1);
    const zc = c * k;
    for (let it = 0; it < 3; it++) {
      // Forward: apply L⁻¹ with the recorded interchanges.
      for (let i = 0; i < k - 1; i++) {
        if (swap[i]) {
          const tmp = x[i];
          x[i] = x[i + 1];
          x[i + 1] = tmp - l[i] * x[i];
        } else {
          x[i + 1] -= l[i] * x[i];
        }
      }
      // Backward: U x = y.
      x[k - 1] /= u0[k - 1];
      if (k >= 2) x[k - 2] = (x[k - 2] - u1[k - 2] * x[k - 1]) / u0[k - 2];
      for (let i = k - 3; i >= 0; i--) x[i] = (x[i] - u1[i] * x[i + 1] - u2[i] * x[i + 2]) / u0[i];
      // Orthogonalise against the earlier vectors of this cluster (twice is enough).
      for (let pass = 0; it > 0 && pass < 2 && c > clusterStart; pass++) {
        if (kr) kr.orthogonalise(ws.at.x, ws.at.z, k, clusterStart, c);
        else orthogonaliseAgainst(x, z, k, clusterStart, c);
      }
      let nrm = 0;
      for (let i = 0; i < k; i++) nrm += x[i] * x[i];
      nrm = Math.sqrt(nrm);
      if (!(nrm > 0) || !Number.isFinite(nrm)) {
        seededFill(x, 7919 * (c + 1) + it);
        continue;
      }
      for (let i = 0; i < k; i++) x[i] /= nrm;
    }
    for (let i = 0; i < k; i++) z[zc + i] = x[i];
  }
}

/**
 * x ← x − Σ_q (z_qᵀx) z_q over columns q ∈ [from, to) of z, four columns per
 * sweep (classical within a group of four, modified across groups).
 */
function orthogonaliseAgainst(x: Float64Array, z: Float64Array, k: number, from: number, to: number): void {
  let q = from;
  for (; q + 4 <= to; q += 4) {
    const o0 = q * k, o1 = o0 + k, o2 = o1 + k, o3 = o2 + k;
    let s0 = 0, s1 = 0, s2 = 0, s3 = 0;
    for (let i = 0; i < k; i++) {
      const xi = x[i];
      s0 += z[o0 + i] * xi; s1 += z[o1 + i] * xi; s2 += z[o2 + i] * xi; s3 += z[o3 + i] * xi;
    }
    for (let i = 0; i < k; i++) x[i] -= s0 * z[o0 + i] + s1 * z[o1 + i] + s2 * z[o2 + i] + s3 * z[o3 + i];
  }
  for (; q < to; q++) {
    const o = q * k;
    let s = 0;
    for (let i = 0; i < k; i++) s += z[o + i] * x[i];
    for (let i = 0; i < k; i++) x[i] -= s * z[o + i];
  }
}

/** z ← H_0 H_1 … H_{k−3} z (k×r), from the reflectors stored in w. */
function backTransform(w: Float64Array, k: number, tau: Float64Array, z: Float64Array, r: number): void {
  for (let j = k - 3; j >= 0; j--) {
    const t = tau[j];
    if (t === 0) continue;
    const cj = j * k;
    let c = 0;
    for (; c + 4 <= r; c += 4) {
      const z0 = c * k, z1 = z0 + k, z2 = z1 + k, z3 = z2 + k;
      let s0 = z[z0 + j + 1], s1 = z[z1 + j + 1], s2 = z[z2 + j + 1], s3 = z[z3 + j + 1];
      for (let i = j + 2; i < k; i++) {
        const vi = w[cj + i];
        s0 += vi * z[z0 + i]; s1 += vi * z[z1 + i]; s2 += vi * z[z2 + i]; s3 += vi * z[z3 + i];
      }
      s0 *= t; s1 *= t; s2 *= t; s3 *= t;
      z[z0 + j + 1] -= s0; z[z1 + j + 1] -= s1; z[z2 + j + 1] -= s2; z[z3 + j + 1] -= s3;
      for (let i = j + 2; i < k; i++) {
        const vi = w[cj + i];
        z[z0 + i] -= s0 * vi; z[z1 + i] -= s1 * vi; z[z2 + i] -= s2 * vi; z[z3 + i] -= s3 * vi;
      }
    }
    for (; c < r; c++) {
      const zc = c * k;
      let s = z[zc + j + 1];
      for (let i = j + 2; i < k; i++) s += w[cj + i] * z[zc + i];
      s *= t;
      z[zc + j + 1] -= s;
      for (let i = j + 2; i < k; i++) z[zc + i] -= s * w[cj + i];
    }
  }
}

/** Make the largest-magnitude entry of every column positive. */
function normaliseSigns(z: Float64Array, k: number, r: number): void {
  for (let c = 0; c < r; c++) {
    const o = c * k;
    let best = 0, at = 0;
    for (let i = 0; i < k; i++) {
      const v = Math.abs(z[o + i]);
      if (v > best * (1 + 1e-12)) {
        best = v;
        at = i;
      }
    }
    if (z[o + at] < 0) for (let i = 0; i < k; i++) z[o + i] = -z[o + i];
  }
}
