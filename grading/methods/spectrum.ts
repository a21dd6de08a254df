/**
 * Post-processing shared by the methods: conjugate pairs kept exact,
 * continuous-time values log(λ)/dt, orderings, the top-K cut that never splits
 * a conjugate pair, and the spread of each eigenvalue across a rank band.
 * (numerics.md, "Time and ordering" and "Conditioning"; common practice, no source.)
 */
import { linearSumAssignment } from 'linear-sum-assignment';
import { clog, selectColumns, takeColumnsInPlace, type Complex, type ComplexMatrix } from '../linalg/complex.js';
import type { EigenEntry, Ordering, SpectrumOptions } from './types.js';

export interface RawSpectrum {
  re: Float64Array;
  im: Float64Array;
  condition: Float64Array;
  modeNorm: Float64Array;
  amplitude: Float64Array;
  modes?: ComplexMatrix;
  eigenfunctions?: ComplexMatrix;
  eigenfunctionsAt?: ComplexMatrix;
  /** Eigenvectors in a basis shared with the rank band (reduced coordinates), to pair band values by vector as well as value. */
  coordinates?: ComplexMatrix;
  /** Entries the data do not determine (EDMD: beyond the dictionary's numerical rank), with the reason. */
  undetermined?: ({ reason: 'dictionary-rank'; message: string } | null)[];
}

export interface OrderedSpectrum {
  eigenvalues: EigenEntry[];
  cut?: { requested: number; returned: number; pairAtCut: 'took-both' | 'took-neither' | 'no-split' };
  modes?: ComplexMatrix;
  eigenfunctions?: ComplexMatrix;
  eigenfunctionsAt?: ComplexMatrix;
  coordinates?: ComplexMatrix;
  notes: string[];
}

/** Groups of indices: conjugate pairs [i, j] (positive imaginary part first) and real singletons [i]. */
export function conjugateGroups(re: Float64Array, im: Float64Array): number[][] {
  const k = re.length;
  const used = new Uint8Array(k);
  const groups: number[][] = [];
  for (let i = 0; i < k; i++) {
    if (used[i]) continue;
    used[i] = 1;
    if (im[i] === 0) {
      groups.push([i]);
      continue;
    }
    // nearest unused conjugate partner
    let best = -1;
    let bestD = Infinity;
    for (let j = 0; j < k; j++) {
      if (used[j] || Math.sign(im[j]) !== -Math.sign(im[i])) continue;
      const d = Math.hypot(re[j] - re[i], im[j] + im[i]);
      if (d < bestD) {
        bestD = d;
        best = j;
      }
    }
    const scale = Math.hypot(re[i], im[i]);
    if (best >= 0 && bestD <= 1e-8 * Math.max(scale, 1e-300)) {
      used[best] = 1;
      groups.push(im[i] > 0 ? [i, best] : [best, i]);
    } else {
      groups.push([i]);
    }
  }
  return groups;
}

/** Continuous-time eigenvalue ω = log(λ)/dt (principal branch); null for λ = 0. */
export function continuousEigenvalue(lambda: Complex, dt: number): Complex | null {
  if (lambda.re === 0 && lambda.im === 0) return null;
  const l = clog(lambda);
  return { re: l.re / dt, im: l.im / dt };
}

function groupKey(order: Ordering, re: number, im: number, amp: number): number {
  const mag = Math.hypot(re, im);
  switch (order) {
    case 'magnitude':
      return -mag;
    case 'amplitude':
      return -amp;
    case 'unit-circle':
      return Math.abs(mag - 1);
    case 'frequency':
      return Math.abs(Math.atan2(im, re));
  }
}

/**
 * Order the raw spectrum, symmetrise conjugate pairs, add continuous values and
 * cut to the leading K without splitting a pair.
 */
export function orderSpectrum(raw: RawSpectrum, opts: SpectrumOptions, consume = false): OrderedSpectrum {
  const order = opts.order ?? 'magnitude';
  const notes: string[] = [];
  const groups = conjugateGroups(raw.re, raw.im);
  // Symmetrise pairs: exact conjugates, shared condition, mode norm and amplitude.
  const re = Float64Array.from(raw.re);
  const im = Float64Array.from(raw.im);
  const cond = Float64Array.from(raw.condition);
  const mnorm = Float64Array.from(raw.modeNorm);
  const amp = Float64Array.from(raw.amplitude);
  for (const g of groups) {
    if (g.length !== 2) continue;
    const [a, b] = g;
    const r = 0.5 * (re[a] + re[b]);
    const i = 0.5 * (Math.abs(im[a]) + Math.abs(im[b]));
    re[a] = r;
    re[b] = r;
    im[a] = i;
    im[b] = -i;
    for (const arr of [cond, mnorm, amp]) {
      const v = 0.5 * (arr[a] + arr[b]);
      arr[a] = v;
      arr[b] = v;
    }
  }
  const keyed = groups.map((g) => {
    const h = g[0];
    return { g, key: groupKey(order, re[h], im[h], Math.max(...g.map((t) => amp[t]))), mag: Math.hypot(re[h], im[h]), re: re[h], im: Math.abs(im[h]) };
  });
  const close = (x: number, y: number) => Math.abs(x - y) <= 1e-12 * Math.max(1, Math.abs(x), Math.abs(y));
  keyed.sort((p, q) => {
    if (!close(p.key, q.key)) return p.key - q.key;
    if (!close(p.mag, q.mag)) return q.mag - p.mag;
    if (!close(p.re, q.re)) return q.re - p.re;
    return q.im - p.im;
  });
  let chosen = keyed.map((x) => x.g);
  let cut: OrderedSpectrum['cut'];
  if (opts.top !== undefined) {
    const k = opts.top;
    const out: number[][] = [];
    let count = 0;
    let status: 'took-both' | 'took-neither' | 'no-split' = 'no-split';
    for (const g of chosen) {
      if (count >= k) break;
      if (count + g.length > k) {
        if ((opts.pairAtCut ?? 'both') === 'both') {
          out.push(g);
          count += g.length;
          status = 'took-both';
        } else {
          status = 'took-neither';
        }
        break;
      }
      out.push(g);
      count += g.length;
    }
    chosen = out;
    cut = { requested: k, returned: count, pairAtCut: status };
    if (status === 'took-both') notes.push(`the cut at ${k} fell inside a conjugate pair; both members were kept (${count} eigenvalues)`);
    if (status === 'took-neither') notes.push(`the cut at ${k} fell inside a conjugate pair; both members were left out (${count} eigenvalues)`);
  }
  const perm = chosen.flat();
  // With `consume` the raw matrices are reordered in their own storage (n×r modes are the large ones).
  const take = consume ? takeColumnsInPlace : selectColumns;
  const position = new Map<number, number>();
  perm.forEach((src, dst) => position.set(src, dst));
  const partnerOf = new Map<number, number>();
  for (const g of groups) if (g.length === 2) {
    partnerOf.set(g[0], g[1]);
    partnerOf.set(g[1], g[0]);
  }
  let zeroNoted = false;
  const eigenvalues: EigenEntry[] = perm.map((src) => {
    const lambda = { re: re[src], im: im[src] };
    const p = partnerOf.get(src);
    const e: EigenEntry = {
      lambda,
      condition: cond[src],
      modeNorm: mnorm[src],
      amplitude: amp[src],
      partner: p !== undefined && position.has(p) ? (position.get(p) as number) : -1,
    };
    const und = raw.undetermined?.[src];
    if (und) e.undetermined = und;
    if (opts.dt !== undefined) {
      e.continuous = continuousEigenvalue(lambda, opts.dt);
      if (e.continuous === null && !zeroNoted) {
        notes.push('an eigenvalue λ = 0 has no continuous-time counterpart log(λ)/dt; it is reported as null');
        zeroNoted = true;
      }
    }
    return e;
  });
  return {
    eigenvalues,
    cut,
    modes: raw.modes ? take(raw.modes, perm) : undefined,
    eigenfunctions: raw.eigenfunctions ? take(raw.eigenfunctions, perm) : undefined,
    eigenfunctionsAt: raw.eigenfunctionsAt ? take(raw.eigenfunctionsAt, perm) : undefined,
    coordinates: raw.coordinates ? take(raw.coordinates, perm) : undefined,
    notes,
  };
}

/**
 * Optimal one-to-one matching of eigenvalue lists a and b (Jonker–Volgenant via
 * linear-sum-assignment) on |a_i − b_j|; returns for each a_i its partner in b or -1.
 */
export function matchEigenvalues(a: readonly Complex[], b: readonly Complex[]): number[] {
  if (a.length === 0) return [];
  if (b.length === 0) return a.map(() => -1);
  const cost = a.map((x) => b.map((y) => Math.hypot(x.re - y.re, x.im - y.im)));
  const res = linearSumAssignment(cost, { maximaze: false });
  return Array.from(res.rowAssignments, (v) => Number(v));
}

/**
 * Spread of each reference eigenvalue across band spectra: max distance to its
 * matched value. Matching is optimal and keeps types apart: a real eigenvalue
 * is matched only to a real one, a complex one only to a complex one of the
 * same half-plane (an odd rank that drops one member of a pair leaves the
 * pair unmatched at that rank rather than pairing it with an unrelated value).
 */
export function bandSpread(reference: readonly Complex[], band: readonly Complex[][]): number[] {
  const spread = reference.map(() => 0);
  const type = (z: Complex) => (z.im === 0 ? 0 : z.im > 0 ? 1 : -1);
  const BIG = 1e12;
  for (const other of band) {
    if (other.length === 0) continue;
    const cost = reference.map((x) => other.map((y) => (type(x) === type(y) ? Math.hypot(x.re - y.re, x.im - y.im) : BIG)));
    const res = linearSumAssignment(cost, { maximaze: false });
    Array.from(res.rowAssignments, Number).forEach((j, i) => {
      if (j >= 0 && cost[i][j] < BIG) spread[i] = Math.max(spread[i], cost[i][j]);
    });
  }
  return spread;
}

/** Eigenvectors of the band must be at least this similar (|⟨a,b⟩|/(‖a‖‖b‖)) to be partners. */
export const BAND_SIMILARITY = 0.5;

/** |⟨a_i, b_j⟩|/(‖a_i‖‖b_j‖) of column i of a and column j of b over their common leading rows (the rest counts in the norms). */
export function vectorSimilarity(a: ComplexMatrix, i: number, b: ComplexMatrix, j: number): number {
  let re = 0;
  let im = 0;
  let na = 0;
  let nb = 0;
  const rows = Math.min(a.rows, b.rows);
  for (let t = 0; t < a.rows; t++) na += a.re[t + i * a.rows] ** 2 + a.im[t + i * a.rows] ** 2;
  for (let t = 0; t < b.rows; t++) nb += b.re[t + j * b.rows] ** 2 + b.im[t + j * b.rows] ** 2;
  for (let t = 0; t < rows; t++) {
    const ar = a.re[t + i * a.rows];
    const ai = a.im[t + i * a.rows];
    const br = b.re[t + j * b.rows];
    const bi = b.im[t + j * b.rows];
    re += ar * br + ai * bi;
    im += ar * bi - ai * br;
  }
  return na > 0 && nb > 0 ? Math.hypot(re, im) / Math.sqrt(na * nb) : 0;
}

/**
 * Pairing of the rank-r spectrum with each band spectrum by optimal assignment (types kept apart as in
 * bandSpread). A value is "resolved from" the lowest rank q such that it has a partner at every band rank
 * from q up to r (a complex value may skip the odd rank between two that hold it, where its pair was split);
 * when that is above the lowest band rank it is reported. Its spread is the largest distance to its partner
 * over the ranks from there on, where it exists: a partner found below a rank where the value was absent is
 * a different value (numerics.md, "Conditioning").
 */
export function bandPairing(
  reference: readonly Complex[],
  band: readonly { rank: number; values: readonly Complex[]; vectors?: ComplexMatrix }[],
  r: number,
  referenceVectors?: ComplexMatrix,
): { spread: number[]; resolvedFromRank: (number | undefined)[]; distances: { rank: number; distance: number | null }[][] } {
  const type = (z: Complex) => (z.im === 0 ? 0 : z.im > 0 ? 1 : -1);
  const BIG = 1e12;
  const distAt = reference.map(() => new Map<number, number>());
  for (const { rank, values, vectors } of band) {
    if (values.length === 0) continue;
    // With eigenvectors in a shared basis, a partner must also have a similar eigenvector (|cos| ≥ BAND_SIMILARITY):
    // a value of an under-fitted rank that blends two of rank r is nobody's partner.
    const similar = (i: number, j: number) => !referenceVectors || !vectors || vectorSimilarity(referenceVectors, i, vectors, j) >= BAND_SIMILARITY;
    const cost = reference.map((x, i) => values.map((y, j) => (type(x) === type(y) && similar(i, j) ? Math.hypot(x.re - y.re, x.im - y.im) : BIG)));
    const res = linearSumAssignment(cost, { maximaze: false });
    Array.from(res.rowAssignments, Number).forEach((j, i) => {
      if (j >= 0 && cost[i][j] < BIG) distAt[i].set(rank, cost[i][j]);
    });
  }
  const below = band
    .map((b) => b.rank)
    .filter((q) => q < r)
    .sort((a, b) => a - b);
  const spread: number[] = [];
  const resolvedFromRank = reference.map((z, i) => {
    let from = r;
    for (let t = below.length - 1; t >= 0; t--) {
      const q = below[t];
      if (distAt[i].has(q)) from = q;
      else if (t > 0 && type(z) !== 0 && distAt[i].has(below[t - 1])) continue;
      else break;
    }
    let s = 0;
    for (const [q, d] of distAt[i]) if (q >= from) s = Math.max(s, d);
    spread.push(s);
    return below.length > 0 && from > below[0] ? from : undefined;
  });
  const ranks = band.map((b) => b.rank);
  const distances = reference.map((_, i) => ranks.map((rank) => ({ rank, distance: distAt[i].get(rank) ?? null })));
  return { spread, resolvedFromRank, distances };
}

/** Ranks of the sensitivity band: r−2 … r+2 within [1, maxRank]. */
export function bandRanks(r: number, maxRank: number): number[] {
  const out: number[] = [];
  for (let q = r - 2; q <= r + 2; q++) if (q >= 1 && q <= maxRank) out.push(q);
  return out;
}
