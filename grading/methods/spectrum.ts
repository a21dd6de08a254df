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
}

export interface OrderedSpectrum {
  eigenvalues: EigenEntry[];
  cut?: { requested: number; returned: number; pairAtCut: 'took-both' | 'took-neither' | 'no-split' };
  modes?: ComplexMatrix;
  eigenfunctions?: ComplexMatrix;
  eigenfunctionsAt?: ComplexMatrix;
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

/** Ranks of the sensitivity band: r−2 … r+2 within [1, maxRank]. */
export function bandRanks(r: number, maxRank: number): number[] {
  const out: number[] = [];
  for (let q = r - 2; q <= r + 2; q++) if (q >= 1 && q <= maxRank) out.push(q);
  return out;
}
