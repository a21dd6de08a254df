/**
 * Stand-in routes used by the benchmark only while grading/methods does not
 * export kernelEdmd / exactDmd yet: the same steps on the same dense kernels
 * (Gram reuse, partial eigensolver), with ml-matrix for the small r×r eig.
 */
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { backend } from '../grading/linalg/backend.js';

export interface Eigenvalues {
  re: number[];
  im: number[];
}

function eigSmall(kh: Float64Array, r: number): { ev: EigenvalueDecomposition } {
  const mat = new Matrix(r, r);
  for (let j = 0; j < r; j++) for (let i = 0; i < r; i++) mat.set(i, j, kh[i + j * r]);
  return { ev: new EigenvalueDecomposition(mat) };
}

/** Kernel EDMD, polynomial kernel (1 + xᵀy)^p, single trajectory D (n×(m+1)), rank r; steps 1–5. */
export async function kernelEdmdMinimal(d: Float64Array, n: number, m: number, p: number, r: number): Promise<Eigenvalues> {
  const be = backend();
  const k = m + 1;
  const s = await be.gram(d, n, k);
  const g = new Float64Array(m * m), a = new Float64Array(m * m);
  for (let j = 0; j < m; j++) {
    for (let i = 0; i < m; i++) {
      g[i + j * m] = (1 + s[i + j * k]) ** p;
      a[i + j * m] = (1 + s[i + 1 + j * k]) ** p;
    }
  }
  const { values, vectors: q } = be.symmetricEigen(g, m, r);
  const t = await be.cross(a, q, m, m, r); // ÂᵀQ
  const kq = await be.cross(t, q, m, r, r); // QᵀÂQ
  const sig = Array.from(values, (v) => Math.sqrt(Math.max(v, 0)));
  for (let j = 0; j < r; j++) for (let i = 0; i < r; i++) kq[i + j * r] /= sig[i] * sig[j];
  const { ev } = eigSmall(kq, r);
  // Step 5: eigenfunctions on the samples Φ_X = Q Σ V̂ (real storage of ml-matrix's V).
  const v = ev.eigenvectorMatrix;
  const phi = new Float64Array(m * r);
  for (let c = 0; c < r; c++) for (let l = 0; l < r; l++) {
    const f = sig[l] * v.get(l, c);
    for (let i = 0; i < m; i++) phi[i + c * m] += q[i + l * m] * f;
  }
  return { re: ev.realEigenvalues, im: ev.imaginaryEigenvalues };
}

/** Exact DMD by the method of snapshots on one trajectory, rank r; modes Φ = Y V Σ⁻¹ W (real parts of ml-matrix's storage). */
export async function exactDmdMinimal(d: Float64Array, n: number, m: number, r: number): Promise<Eigenvalues> {
  const be = backend();
  const k = m + 1;
  const s = await be.gram(d, n, k);
  const xx = new Float64Array(m * m);
  for (let j = 0; j < m; j++) for (let i = 0; i < m; i++) xx[i + j * m] = s[i + j * k];
  const { values, vectors: v } = be.symmetricEigen(xx, m, r);
  const sig = Array.from(values, (x) => Math.sqrt(Math.max(x, 0)));
  // Ã = Σ⁻¹ Vᵀ (XᵀY) V Σ⁻¹ with (XᵀY)_ij = S_{i, j+1}.
  const xy = new Float64Array(m * m);
  for (let j = 0; j < m; j++) for (let i = 0; i < m; i++) xy[i + j * m] = s[i + (j + 1) * k];
  const t = await be.cross(xy, v, m, m, r); // (XᵀY)ᵀ V = YᵀX V
  const at = await be.cross(v, t, m, r, r); // Vᵀ YᵀX V = (Vᵀ XᵀY V)ᵀ
  const aTilde = new Float64Array(r * r);
  for (let j = 0; j < r; j++) for (let i = 0; i < r; i++) aTilde[i + j * r] = at[j + i * r] / (sig[i] * sig[j]);
  const { ev } = eigSmall(aTilde, r);
  // Modes: B = V Σ⁻¹ W (m×r), then Φ = Y B via the Gram kernel on Yᵀ… as a cross product Φᵀ = Bᵀ Yᵀ.
  const w = ev.eigenvectorMatrix;
  const b = new Float64Array(m * r);
  for (let c = 0; c < r; c++) for (let l = 0; l < r; l++) {
    const f = w.get(l, c) / sig[l];
    for (let i = 0; i < m; i++) b[i + c * m] += v[i + l * m] * f;
  }
  // Φ = Y B: n×r; computed column by column from the contiguous snapshots.
  const phi = new Float64Array(n * r);
  for (let c = 0; c < r; c++) {
    const o = c * n;
    for (let i = 0; i < m; i++) {
      const f = b[i + c * m];
      const y = (i + 1) * n;
      for (let t2 = 0; t2 < n; t2++) phi[o + t2] += d[y + t2] * f;
    }
  }
  return { re: ev.realEigenvalues, im: ev.imaginaryEigenvalues };
}
