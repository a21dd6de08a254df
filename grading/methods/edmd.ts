/**
 * EDMD (Williams, Kevrekidis & Rowley 2015, J. Nonlinear Sci. 25:1307–1346).
 * Ψ_X, Ψ_Y (m×N); G = Ψ_XᵀΨ_X/m, A = Ψ_XᵀΨ_Y/m (N×N, via backend().gram and
 * backend().cross); K = G⁺A; Kξ_j = λ_jξ_j; eigenfunctions φ_j = Ψξ_j; modes of
 * the full state from the left eigenvectors: x ≈ Σ_j φ_j(x) (w_jᴴB), B = G⁺Ψ_XᵀXᵀ/m.
 */
import { backend } from '../linalg/backend.js';
import { cabs, columnNorm, rcmatmul, type ComplexMatrix } from '../linalg/complex.js';
import { buildDictionary } from './dictionaries.js';
import { checkCommonOptions, finalizeSpectrum, wantModes } from './finalize.js';
import { pairMatrices } from './pairs.js';
import { SpectrumInputError, type EdmdOptions, type PairSource, type SpectrumResult } from './types.js';

/** G⁺ (N×N) of a symmetric positive semi-definite G via its eigendecomposition; eigenvalues ≤ N·ε·λ_max are dropped. */
export function symmetricPseudoInverse(g: Float64Array, size: number): { pinv: Float64Array; rank: number; eigenvalues: Float64Array } {
  const e = backend().symmetricEigen(g, size, size);
  const tol = size * Number.EPSILON * Math.max(e.values[0], 0);
  const pinv = new Float64Array(size * size);
  let rank = 0;
  for (let c = 0; c < size; c++) {
    const l = e.values[c];
    if (!(l > tol)) continue;
    rank++;
    for (let j = 0; j < size; j++) {
      const vj = e.vectors[j + c * size] / l;
      if (vj === 0) continue;
      for (let i = 0; i < size; i++) pinv[i + j * size] += e.vectors[i + c * size] * vj;
    }
  }
  return { pinv, rank, eigenvalues: e.values };
}

function matmul(a: Float64Array, b: Float64Array, p: number, q: number, s: number): Float64Array {
  const c = new Float64Array(p * s);
  for (let j = 0; j < s; j++) {
    for (let t = 0; t < q; t++) {
      const w = b[t + j * q];
      if (w === 0) continue;
      for (let i = 0; i < p; i++) c[i + j * p] += a[i + t * p] * w;
    }
  }
  return c;
}

/** EDMD of the pairs of `source` with the given dictionary: eigenvalues of K = G⁺A (N×N), κ, eigenfunctions, modes. */
export async function edmd(source: PairSource, options: EdmdOptions): Promise<SpectrumResult> {
  checkCommonOptions(options);
  const { x, y, n, m } = pairMatrices(source);
  const dict = buildDictionary(options.dictionary, n, options.maxDictionarySize ?? 2000);
  const size = dict.size;
  const psiX = dict.evaluate(x, m);
  const psiY = dict.evaluate(y, m);
  const be = backend();
  const g = await be.gram(psiX, m, size);
  const a = await be.cross(psiX, psiY, m, size, size);
  for (let t = 0; t < size * size; t++) {
    g[t] /= m;
    a[t] /= m;
  }
  const { pinv, rank: gRank, eigenvalues } = symmetricPseudoInverse(g, size);
  if (gRank === 0) throw new SpectrumInputError('the dictionary matrix G is zero; there is nothing to decompose', 0);
  const k = matmul(pinv, a, size, size, size);
  const ev = backend().generalEigen(k, size);
  const phiX = rcmatmul(psiX, m, size, ev.right); // m×N
  const modeNorm = new Float64Array(size).fill(Number.NaN);
  const amplitude = new Float64Array(size).fill(Number.NaN);
  let modes: ComplexMatrix | undefined;
  if (wantModes(options)) {
    // B = G⁺ Ψ_Xᵀ Xᵀ / m (N×n); Bᵀ = X Ψ_X G⁺ / m (n×N)
    const xPsi = new Float64Array(n * size);
    for (let f = 0; f < size; f++) {
      for (let i = 0; i < m; i++) {
        const w = psiX[i + f * m] / m;
        if (w === 0) continue;
        for (let t = 0; t < n; t++) xPsi[t + f * n] += x[i * n + t] * w;
      }
    }
    const bT = matmul(xPsi, pinv, n, size, size);
    const wConj: ComplexMatrix = { rows: size, cols: size, re: ev.left.re, im: Float64Array.from(ev.left.im, (v) => -v) };
    modes = rcmatmul(bT, n, size, wConj); // column j = (w_jᴴ B)ᵀ
    for (let j = 0; j < size; j++) {
      modeNorm[j] = columnNorm(modes, j);
      amplitude[j] = modeNorm[j] * cabs({ re: phiX.re[j * m], im: phiX.im[j * m] });
    }
  }
  let eigenfunctionsAt: ComplexMatrix | undefined;
  if (options.points) {
    if (options.points.n !== n) throw new SpectrumInputError(`evaluation points have dimension ${options.points.n}, the data has ${n}`);
    eigenfunctionsAt = rcmatmul(dict.evaluate(options.points.data, options.points.k), options.points.k, size, ev.right);
  }
  const notes: string[] = [];
  if (gRank < size) notes.push(`G is rank deficient (${gRank} of ${size}); K = G⁺A uses the pseudo-inverse`);
  return finalizeSpectrum(
    {
      method: 'edmd',
      n,
      m,
      rank: size,
      maxRank: gRank,
      raw: { re: ev.valuesRe, im: ev.valuesIm, condition: ev.condition, modeNorm, amplitude, modes, eigenfunctions: phiX, eigenfunctionsAt },
      singularValues: Float64Array.from(eigenvalues, (l) => Math.sqrt(Math.max(l, 0))),
      truncation: { rule: 'rank', rank: size },
      options: { dictionary: options.dictionary.kind === 'gaussian-radial' ? { kind: 'gaussian-radial', sigma: options.dictionary.sigma, centres: options.dictionary.centres.k } : options.dictionary, labels: dict.labels },
      notes,
    },
    options,
  );
}
