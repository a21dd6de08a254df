/**
 * Assemble a SpectrumResult from a reduced operator's raw spectrum: order,
 * cut, continuous values, and rank-band spreads (numerics.md, "Conditioning").
 */
import { backend } from '../linalg/backend.js';
import type { Complex } from '../linalg/complex.js';
import { bandSpread, orderSpectrum, type RawSpectrum } from './spectrum.js';
import type { MethodName, RankRule, SpectrumOptions, SpectrumResult } from './types.js';

export const ENGINE_VERSION = 'modewright-engine 1.0.0';

/** Eigenvalues only of a real k×k column-major operator. */
export function eigenvaluesOf(a: Float64Array, k: number): Complex[] {
  const e = backend().eigenvalues(a, k);
  return Array.from(e.re, (re, i) => ({ re, im: e.im[i] }));
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
  /** Reduced operators at neighbouring ranks, eigenvalues only. */
  band?: { ranks: number[]; spectra: Complex[][] };
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
    const others = input.band.spectra;
    const spread = bandSpread(
      result.eigenvalues.map((e) => e.lambda),
      others,
    );
    // conjugate partners share the larger spread
    result.eigenvalues.forEach((e, i) => (e.spread = e.partner >= 0 ? Math.max(spread[i], spread[e.partner]) : spread[i]));
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
