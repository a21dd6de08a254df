/**
 * Exact DMD (Tu, Rowley, Luchtenburg, Brunton & Kutz 2014, J. Comput. Dyn.
 * 1:391–421). X ≈ UΣVᵀ (rank r), Ã = UᵀYVΣ⁻¹ (r×r), ÃW = WΛ, exact modes
 * Φ = YVΣ⁻¹W (n×r), amplitudes b = Φ⁺x_1. For n ≫ m, V and Σ come from the
 * eigendecomposition of XᵀX (method of snapshots) and no n×n object is formed.
 */
import { backend } from '../linalg/backend.js';
import { cabs, columnNorm, complexFromRealForm, lstsqRealFormTall, rcProductRealForm, type Complex, type ComplexMatrix } from '../linalg/complex.js';
import { giveBack } from '../linalg/scratch.js';
import { checkCommonOptions, finalizeSpectrum, padRows, spectrumWithVectors, wantModes } from './finalize.js';
import { innerProducts, pairMatrices, validateSource } from './pairs.js';
import { measureSensitivity } from './sensitivity.js';
import { bandRanks } from './spectrum.js';
import { chooseRank } from './truncation.js';
import { SpectrumInputError, type DmdOptions, type PairSource, type SpectrumResult } from './types.js';

interface Factors {
  /** Singular values of X, descending. */
  sigma: Float64Array;
  /** Right singular vectors V (m×kv), column-major. */
  v: Float64Array;
  kv: number;
  /** Reduced operator at rank q: Ã_q (q×q). */
  reduced(q: number): Promise<Float64Array>;
  /** Relative floor below which σ are round-off for this route. */
  floor: number;
  /** Hand the working arrays back to the pool (scratch.ts) once no reduced operator is needed any more. */
  release(): void;
}

/**
 * Factors by the method of snapshots: XᵀX = VΣ²Vᵀ via backend().symmetricEigen; XᵀY from the same Gram products.
 * All min(n, m) eigenvalues (σ² for the numerical rank and the truncation rules), but only `vectorCount` eigenvectors.
 */
async function snapshotFactors(source: PairSource, n: number, m: number, vectorCount: (kAll: number) => number): Promise<Factors> {
  const ip = await innerProducts(source, { n, m });
  const kAll = Math.min(n, m);
  const kv = Math.min(kAll, vectorCount(kAll));
  const eig = backend().symmetricEigen(ip.xx, m, kv, kAll);
  const sigma = Float64Array.from(eig.values, (l) => Math.sqrt(Math.max(l, 0)));
  const v = eig.vectors;
  // Ã_q = Σ_q⁻¹ V_qᵀ (XᵀY) V_q Σ_q⁻¹ is the leading q×q block of P = V_kᵀ (XᵀY) V_k scaled: P is
  // computed once on the dense kernels for the largest q asked so far (the rank, then its band).
  let cached: { k: number; p: Float64Array } | null = null;
  const reduced = async (q: number): Promise<Float64Array> => {
    if (q > kv) throw new Error(`internal: reduced operator of rank ${q} asked for, but only ${kv} right singular vectors were computed`);
    if (!cached || cached.k < q) {
      const k = Math.min(kv, q + 2);
      const vk = v.subarray(0, m * k);
      const yxv = await backend().product(ip.yx, m, m, vk, k); // YᵀX V, m×k
      const pt = await backend().cross(vk, yxv, m, k, k); // Vᵀ YᵀX V = Pᵀ
      const p = new Float64Array(k * k);
      for (let j = 0; j < k; j++) for (let i = 0; i < k; i++) p[i + j * k] = pt[j + i * k];
      cached = { k, p };
    }
    const { k, p } = cached;
    const a = new Float64Array(q * q);
    for (let b = 0; b < q; b++) for (let c = 0; c < q; c++) a[c + b * q] = p[c + b * k] / (sigma[c] * sigma[b]);
    return a;
  };
  return { sigma, v, kv, reduced, floor: Math.sqrt(Math.max(n, m) * Number.EPSILON), release: () => giveBack(ip.xx, ip.yx) };
}

/** Factors by the thin SVD of X (ml-matrix). */
async function directFactors(source: PairSource, shape: { n: number; m: number }): Promise<Factors> {
  const { x, y, n, m } = pairMatrices(source, shape);
  const svd = backend().svd(x, n, m);
  const k = svd.k;
  // UᵀY (k×m)
  const uty = await backend().cross(svd.u, y, n, k, m);
  const reduced = async (q: number): Promise<Float64Array> => {
    const a = new Float64Array(q * q);
    for (let b = 0; b < q; b++) {
      for (let c = 0; c < q; c++) {
        let acc = 0;
        for (let i = 0; i < m; i++) acc += uty[c + i * k] * svd.v[i + b * m];
        a[c + b * q] = acc / svd.s[b];
      }
    }
    return a;
  };
  return { sigma: svd.s, v: svd.v, kv: k, reduced, floor: Math.max(n, m) * Number.EPSILON, release: () => undefined };
}

/** Exact DMD of the snapshot pairs of `source` (X, Y: n×m); eigenvalues of Ã (r×r), exact modes, amplitudes, κ, rank band. */
export async function exactDmd(source: PairSource, options: DmdOptions = {}): Promise<SpectrumResult> {
  checkCommonOptions(options);
  const { n, m } = validateSource(source);
  const route = options.svd ?? 'auto';
  let useSnapshots = route === 'snapshots' || (route === 'auto' && n >= 2 * m);
  const rule = options.truncation ?? { kind: 'numerical' as const };
  // Eigenvectors of XᵀX are needed up to the rank used (r, or r + 2 with the rank band). A given rank fixes that
  // before the solve; the other rules choose r from all σ, so they keep all vectors. The σ are always all of them.
  const wantBand = options.rankBand ?? true;
  const vectorCount = (kAll: number): number =>
    rule.kind === 'rank' && Number.isInteger(rule.rank) && rule.rank >= 1 ? rule.rank + (wantBand ? 2 : 0) : kAll;
  let f = useSnapshots ? await snapshotFactors(source, n, m, vectorCount) : await directFactors(source, { n, m });
  // The numerical rank floor of this route (the method of snapshots resolves σ only down to ≈ √(ε·max(n,m))·σ_1).
  const rankOf = (g: Factors) => {
    let q = 0;
    while (q < g.sigma.length && g.sigma[q] > g.floor * g.sigma[0]) q++;
    return q;
  };
  let maxRank = rankOf(f);
  if (route === 'auto' && useSnapshots && maxRank < Math.min(n, m) && (rule.kind === 'numerical' || (rule.kind === 'rank' && rule.rank > maxRank))) {
    // Singular values below the snapshot route's floor were asked for: use the SVD of X instead.
    f.release();
    f = await directFactors(source, { n, m });
    useSnapshots = false;
    maxRank = rankOf(f);
  }
  if (maxRank === 0) throw new SpectrumInputError('the snapshot matrix X is zero; there is nothing to decompose', 0);
  const chosen = chooseRank(f.sigma, n, m, rule, maxRank);
  const r = Math.min(chosen.rank, maxRank);
  const aTilde = await f.reduced(r);
  const eig = backend().generalEigen(aTilde, r);
  const modeNorm = new Float64Array(r).fill(Number.NaN);
  const amplitude = new Float64Array(r).fill(Number.NaN);
  const notes: string[] = [];
  let phi: ComplexMatrix | undefined;
  if (wantModes(options)) {
    // Φ = Y V Σ⁻¹ W: first YB with B = V_r Σ_r⁻¹ (m×r)
    const { x, y } = pairMatrices(source, { n, m });
    const bmat = new Float64Array(m * r);
    for (let c = 0; c < r; c++) for (let i = 0; i < m; i++) bmat[i + c * m] = f.v[i + c * m] / f.sigma[c];
    // Amplitudes first, on Φ's real form, then Φ itself: the least-squares factor and Φ are never alive together.
    const { realForm, form } = await rcProductRealForm(await backend().product(y, n, m, bmat, r), n, r, eig.right);
    let b: ComplexMatrix | null = null;
    try {
      // b = Φ⁺ x_1
      b = await lstsqRealFormTall(realForm, n, form, () => complexFromRealForm(realForm, n, form), x.subarray(0, n));
    } catch {
      notes.push('the DMD modes are linearly dependent; amplitudes b = Φ⁺x₁ are not defined');
    }
    phi = complexFromRealForm(realForm, n, form);
    for (let j = 0; j < r; j++) modeNorm[j] = columnNorm(phi, j);
    if (b) for (let j = 0; j < r; j++) amplitude[j] = modeNorm[j] * cabs({ re: b.re[j], im: b.im[j] });
  }
  let band: { ranks: number[]; spectra: Complex[][]; vectors: ComplexMatrix[] } | undefined;
  let coordinates: ComplexMatrix | undefined;
  if (wantBand) {
    // Eigenvectors of every Ã_q are in the coordinates of U's leading columns, so they compare across ranks.
    const ranks = bandRanks(r, maxRank);
    const rows = Math.max(...ranks);
    const spectra: Complex[][] = [];
    const vectors: ComplexMatrix[] = [];
    for (const q of ranks) {
      if (q === r) continue;
      const sv = spectrumWithVectors(await f.reduced(q), q, rows);
      spectra.push(sv.values);
      vectors.push(sv.vectors);
    }
    band = { ranks, spectra, vectors };
    coordinates = padRows(eig.right, rows);
  }
  f.release();
  const result = finalizeSpectrum(
    {
      method: 'dmd',
      n,
      m,
      rank: r,
      maxRank,
      raw: { re: eig.valuesRe, im: eig.valuesIm, condition: eig.condition, modeNorm, amplitude, modes: phi, coordinates },
      singularValues: f.sigma,
      truncation: { rule: rule.kind, rank: r, threshold: chosen.threshold },
      band,
      options: { truncation: rule, svd: useSnapshots ? 'snapshots' : 'direct' },
      notes,
    },
    options,
  );
  // Same rank and SVD route on each perturbed copy, eigenvalues only.
  await measureSensitivity(result, source, options, async (s) =>
    (await exactDmd(s, { truncation: { kind: 'rank', rank: r }, svd: useSnapshots ? 'snapshots' : 'direct', rankBand: false, modes: false })).eigenvalues.map((e) => e.lambda),
  );
  return result;
}
