/**
 * Kernel EDMD (Williams, Rowley & Kevrekidis 2015, J. Comput. Dyn. 2:247–265).
 * Ĝ_ij = k(x_i,x_j), Â_ij = k(y_i,x_j) (m×m); Ĝ = QΣ²Qᵀ (leading r);
 * K̂ = (Σ⁺Qᵀ)Â(QΣ⁺) (r×r); K̂V̂ = V̂Λ, Ŵᴴ V̂ = I; eigenfunctions Φ_X = QΣV̂
 * (m×r); modes Ξ = ŴᴴΣ⁺QᵀXᵀ (r×n, returned as n×r columns).
 * A single trajectory needs one Gram product S = DᵀD for both Ĝ and Â.
 */
import { backend } from '../linalg/backend.js';
import { cabs, columnNorm, rcProduct, rcmatmul, type Complex, type ComplexMatrix } from '../linalg/complex.js';
import { giveBack } from '../linalg/scratch.js';
import { checkCommonOptions, finalizeSpectrum, padRows, wantModes } from './finalize.js';
import { checkKernel, kernelMatrix } from './kernels.js';
import { innerProducts, pairMatrices, validateSource, type InnerProducts } from './pairs.js';
import { measureSensitivity } from './sensitivity.js';
import { bandRanks } from './spectrum.js';
import { SpectrumInputError, type Kernel, type KernelEdmdOptions, type PairSource, type SpectrumResult } from './types.js';

/**
 * Ĝ and Â (m×m column-major) from the inner products of the pairs. With `inPlace` they
 * overwrite ip.xx and ip.yx (two m×m arrays fewer at the peak of a large run).
 */
export function kernelGramMatrices(kernel: Kernel, ip: InnerProducts, inPlace = false): { g: Float64Array; a: Float64Array } {
  const m = ip.m;
  const g = kernelMatrix(kernel, ip.xx, m, m, ip.xNorm2, ip.xNorm2, inPlace ? ip.xx : undefined);
  // symmetrise exactly
  for (let j = 0; j < m; j++) for (let i = 0; i < j; i++) g[j + i * m] = g[i + j * m];
  const a = kernelMatrix(kernel, ip.yx, m, m, ip.yNorm2, ip.xNorm2, inPlace ? ip.yx : undefined);
  return { g, a };
}

/**
 * QᵀÂQ (kq×kq) for Q (m×kq): every reduced operator of ranks t ≤ kq is its leading
 * t×t block scaled by Σ_t⁻¹ on both sides, so the rank band costs no further products.
 * Two products on the dense kernels: ÂQ (m×kq), then Qᵀ(ÂQ).
 */
async function projectedKernel(a: Float64Array, q: Float64Array, m: number, kq: number): Promise<Float64Array> {
  const be = backend();
  const aq = await be.product(a, m, m, q, kq);
  return be.cross(q, aq, m, kq, kq);
}

/** K̂_t = Σ_t⁻¹ (QᵀÂQ)_{t×t} Σ_t⁻¹ (t×t) from the projected kernel (kq×kq). */
function reducedKernelOperator(proj: Float64Array, kq: number, sigma: Float64Array, t: number): Float64Array {
  const k = new Float64Array(t * t);
  for (let c = 0; c < t; c++) {
    for (let b = 0; b < t; b++) k[b + c * t] = proj[b + c * kq] / (sigma[b] * sigma[c]);
  }
  return k;
}

/** Kernel EDMD of the pairs of `source`: eigenvalues of K̂ (r×r), κ, eigenfunctions, optional modes, rank band. */
export async function kernelEdmd(source: PairSource, options: KernelEdmdOptions): Promise<SpectrumResult> {
  checkCommonOptions(options);
  checkKernel(options.kernel);
  const shape = validateSource(source);
  const { n, m } = shape;
  const ip = await innerProducts(source, shape);
  const { g, a } = kernelGramMatrices(options.kernel, ip, true);
  const trunc = options.truncation ?? { kind: 'tolerance' as const, tol: 1e-12 };
  const wantBand = options.rankBand ?? true;
  const needAll = trunc.kind === 'tolerance';
  const kEig = needAll ? m : Math.min(m, trunc.rank + (wantBand ? 2 : 0));
  if (trunc.kind === 'rank' && (!Number.isInteger(trunc.rank) || trunc.rank < 1)) throw new SpectrumInputError(`rank must be a positive integer, got ${trunc.rank}`);
  const eig = backend().symmetricEigen(g, m, kEig);
  const lam = eig.values;
  const q = eig.vectors;
  if (!(lam[0] > 0)) throw new SpectrumInputError('the kernel matrix Ĝ is zero or not positive; there is nothing to decompose', 0);
  const floor = m * Number.EPSILON * lam[0];
  let maxRank = 0;
  while (maxRank < kEig && lam[maxRank] > floor) maxRank++;
  let r: number;
  let threshold: number | undefined;
  if (trunc.kind === 'rank') {
    // kEig ≥ rank whenever rank ≤ m, so maxRank < rank means the numerical rank is known exactly.
    if (trunc.rank > maxRank) {
      throw new SpectrumInputError(`rank ${trunc.rank} is more than the data allows: the maximum is ${maxRank} (numerical rank of the ${m}×${m} kernel matrix)`, maxRank);
    }
    r = trunc.rank;
  } else {
    if (!(trunc.tol >= 0 && trunc.tol < 1)) throw new SpectrumInputError(`relative tolerance must be in [0, 1), got ${trunc.tol}`);
    threshold = trunc.tol * lam[0];
    r = 0;
    while (r < maxRank && lam[r] > threshold) r++;
    r = Math.max(r, 1);
  }
  const sigma = Float64Array.from(lam, (l) => Math.sqrt(Math.max(l, 0)));
  const bandRankList = wantBand ? bandRanks(r, Math.min(maxRank, kEig)) : [r];
  const kq = Math.max(r, ...bandRankList);
  const proj = await projectedKernel(a, q, m, kq);
  const kHat = reducedKernelOperator(proj, kq, sigma, r);
  const ev = backend().generalEigen(kHat, r);
  // Φ_X = Q Σ V̂ (m×r)
  const qs = new Float64Array(m * r);
  for (let c = 0; c < r; c++) for (let i = 0; i < m; i++) qs[i + c * m] = q[i + c * m] * sigma[c];
  const phiX = await rcProduct(qs, m, r, ev.right);
  // Modes: Ξᵀ = X Q Σ⁻¹ conj(Ŵ) (n×r); the one step that touches the n-dimensional data again.
  const { x } = pairMatrices(source, shape);
  let qsInvCache: Float64Array | undefined;
  const qsInverse = (): Float64Array => {
    if (!qsInvCache) {
      qsInvCache = new Float64Array(m * r);
      for (let c = 0; c < r; c++) for (let i = 0; i < m; i++) qsInvCache[i + c * m] = q[i + c * m] / sigma[c];
    }
    return qsInvCache;
  };
  const modeNorm = new Float64Array(r).fill(Number.NaN);
  const amplitude = new Float64Array(r).fill(Number.NaN);
  let modes: ComplexMatrix | undefined;
  if (wantModes(options)) {
    const wConj: ComplexMatrix = { rows: r, cols: r, re: ev.left.re, im: Float64Array.from(ev.left.im, (v) => -v) };
    const coeff = rcmatmul(qsInverse(), m, r, wConj); // m×r
    modes = await rcProduct(x, n, m, coeff); // n×r
    for (let j = 0; j < r; j++) {
      modeNorm[j] = columnNorm(modes, j);
      amplitude[j] = modeNorm[j] * cabs({ re: phiX.re[j * m], im: phiX.im[j * m] });
    }
  }
  let eigenfunctionsAt: ComplexMatrix | undefined;
  if (options.points) {
    const p = options.points;
    if (p.n !== n) throw new SpectrumInputError(`evaluation points have dimension ${p.n}, the data has ${n}`);
    const inner = await backend().cross(p.data, x, n, p.k, m);
    const pn = new Float64Array(p.k);
    for (let i = 0; i < p.k; i++) {
      let s = 0;
      for (let t = 0; t < n; t++) s += p.data[i * n + t] ** 2;
      pn[i] = s;
    }
    const kx = kernelMatrix(options.kernel, inner, p.k, m, pn, ip.xNorm2);
    const qv = rcmatmul(qsInverse(), m, r, ev.right);
    eigenfunctionsAt = rcmatmul(kx, p.k, m, qv);
  }
  let band: { ranks: number[]; spectra: Complex[][]; vectors: ComplexMatrix[] } | undefined;
  let coordinates: ComplexMatrix | undefined;
  if (wantBand) {
    // Eigenfunctions on the samples are Q_t Σ_t V̂_t: in the coordinates of Q's leading columns they are Σ_t V̂_t.
    const ranks = bandRankList;
    const spectra: Complex[][] = [];
    const vectors: ComplexMatrix[] = [];
    for (const t of ranks) {
      if (t === r) continue;
      const e = backend().generalEigen(reducedKernelOperator(proj, kq, sigma, t), t);
      spectra.push(Array.from(e.valuesRe, (re, i) => ({ re, im: e.valuesIm[i] })));
      vectors.push(padRows(e.right, kq, sigma));
    }
    band = { ranks, spectra, vectors };
    coordinates = padRows(ev.right, kq, sigma);
  }
  // Ĝ and Â (written over the inner products) are not part of the result: their memory goes to the next run.
  giveBack(g, a);
  const notes: string[] = [];
  if (ev.condition.some((c) => !Number.isFinite(c))) notes.push('the eigenvector basis of K̂ is singular; condition numbers are reported as infinite');
  const result = finalizeSpectrum(
    {
      method: 'kernel-edmd',
      n,
      m,
      rank: r,
      maxRank: Math.min(maxRank, kEig),
      raw: {
        re: ev.valuesRe,
        im: ev.valuesIm,
        condition: ev.condition,
        modeNorm,
        amplitude,
        modes,
        eigenfunctions: phiX,
        eigenfunctionsAt,
        coordinates,
      },
      singularValues: sigma,
      truncation: { rule: trunc.kind, rank: r, threshold },
      band,
      options: { kernel: options.kernel, truncation: trunc },
      notes,
    },
    options,
  );
  // Same rank on each perturbed copy, eigenvalues only (a partial eigensolve of r pairs).
  await measureSensitivity(result, source, options, async (s) =>
    (await kernelEdmd(s, { kernel: options.kernel, truncation: { kind: 'rank', rank: r }, rankBand: false, modes: false })).eigenvalues.map((e) => e.lambda),
  );
  return result;
}

