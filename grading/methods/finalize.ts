/**
 * Assemble a SpectrumResult from a reduced operator's raw spectrum: order,
 * cut, continuous values, and rank-band spreads (numerics.md, "Conditioning").
 */
import { backend } from '../linalg/backend.js';
import type { Complex, ComplexMatrix } from '../linalg/complex.js';
import { bandPairing, orderSpectrum, type RawSpectrum } from './spectrum.js';
import type { MethodName, RankRule, SpectrumOptions, SpectrumResult } from './types.js';

/**
 * 1.2.0: the measured sensitivity draws δ from one 32-bit output per entry (same distribution, other
 * numbers than 1.1.0 for the same seed) and perturbs radial centres picked from X with the data; OpenBLAS
 * bisection at dstebz's default tolerance.
 */
export const ENGINE_VERSION = 'modewright-engine 1.2.0';

/** Eigenvalues only of a real k×k column-major operator. */
export function eigenvaluesOf(a: Float64Array, k: number): Complex[] {
  const e = backend().eigenvalues(a, k);
  return Array.from(e.re, (re, i) => ({ re, im: e.im[i] }));
}

/** Eigenvalues and right eigenvectors of a real q×q operator, the vectors padded with zero rows to `rows`. */
export function spectrumWithVectors(a: Float64Array, q: number, rows: number): { values: Complex[]; vectors: ComplexMatrix } {
  const e = backend().generalEigen(a, q);
  return { values: Array.from(e.valuesRe, (re, i) => ({ re, im: e.valuesIm[i] })), vectors: padRows(e.right, rows) };
}

/** Copy of a complex matrix with zero rows appended up to `rows` (columns optionally scaled row-wise by `rowScale`). */
export function padRows(a: ComplexMatrix, rows: number, rowScale?: Float64Array): ComplexMatrix {
  const re = new Float64Array(rows * a.cols);
  const im = new Float64Array(rows * a.cols);
  for (let j = 0; j < a.cols; j++) {
    for (let i = 0; i < a.rows; i++) {
      const f = rowScale ? rowScale[i] : 1;
      re[i + j * rows] = a.re[i + j * a.rows] * f;
      im[i + j * rows] = a.im[i + j * a.rows] * f;
    }
  }
  return { rows, cols: a.cols, re, im };
}

export interface FinalizeInput {
  method: MethodName;
  n: number;
  m: number;
  rank: number;
  maxRank: number;
  raw: RawSpectrum;
  singularValues: Float64Array;
  truncation: { rule: RankRule['kind']; rank: number; threshold?: number };
  /** Spectra at neighbouring ranks (same order as ranks without r); with `vectors`, their eigenvectors in the basis of raw.coordinates. */
  band?: { ranks: number[]; spectra: Complex[][]; vectors?: ComplexMatrix[] };
  options: Record<string, unknown>;
  notes?: string[];
}

export function finalizeSpectrum(input: FinalizeInput, opts: SpectrumOptions): SpectrumResult {
  const ordered = orderSpectrum(input.raw, opts, true); // the raw spectrum is ours: reorder its matrices in place
  const result: SpectrumResult = {
    method: input.method,
    n: input.n,
    m: input.m,
    rank: input.rank,
    maxRank: input.maxRank,
    eigenvalues: ordered.eigenvalues,
    order: opts.order ?? 'magnitude',
    singularValues: input.singularValues,
    truncation: input.truncation,
    cut: ordered.cut,
    dt: opts.dt,
    options: input.options,
    notes: [...(input.notes ?? []), ...ordered.notes],
  };
  if (opts.modes) {
    result.modes = ordered.modes;
    result.eigenfunctions = ordered.eigenfunctions;
  }
  if (ordered.eigenfunctionsAt) result.eigenfunctionsAt = ordered.eigenfunctionsAt;
  if (input.band) {
    const others = input.band.ranks.filter((q) => q !== input.rank);
    const { spread, resolvedFromRank, distances } = bandPairing(
      result.eigenvalues.map((e) => e.lambda),
      others.map((rank, t) => ({ rank, values: input.band?.spectra[t] ?? [], vectors: input.band?.vectors?.[t] })),
      input.rank,
      ordered.coordinates,
    );
    // conjugate partners share the larger spread and the later rank
    result.eigenvalues.forEach((e, i) => {
      const p = e.partner;
      e.spread = p >= 0 ? Math.max(spread[i], spread[p]) : spread[i];
      const from = p >= 0 ? Math.max(resolvedFromRank[i] ?? 0, resolvedFromRank[p] ?? 0) : (resolvedFromRank[i] ?? 0);
      if (from > 0) e.resolvedFromRank = from;
      // partners share the larger distance at each rank (null if either has no partner there)
      e.bandDistances = distances[i].map((d, t) => {
        const q = p >= 0 ? distances[p][t].distance : d.distance;
        return { rank: d.rank, distance: d.distance === null || q === null ? null : Math.max(d.distance, q) };
      });
    });
    const resolved = result.eigenvalues.filter((e) => e.resolvedFromRank !== undefined).length;
    if (resolved > 0) result.notes.push(`${resolved} eigenvalue${resolved === 1 ? ' has' : 's have'} no counterpart at the lower ranks of the band: resolved from the rank shown, not unstable; the spread is taken over the ranks where a counterpart exists`);
    result.rankBand = { ranks: input.band.ranks };
  }
  return result;
}

/** Check the common options; throws SpectrumInputError-like RangeErrors with a plain message. */
export function checkCommonOptions(opts: SpectrumOptions): void {
  if (opts.dt !== undefined && !(Number.isFinite(opts.dt) && opts.dt > 0)) throw new RangeError(`dt must be a positive number, got ${opts.dt}`);
  if (opts.top !== undefined && !(Number.isInteger(opts.top) && opts.top >= 1)) throw new RangeError(`top must be a positive integer, got ${opts.top}`);
}

/** Modes (and with them mode norms and amplitudes) are computed unless `modes: false`, and always for the amplitude ordering. */
export function wantModes(opts: SpectrumOptions): boolean {
  return opts.modes !== false || opts.order === 'amplitude';
}
