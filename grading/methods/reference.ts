/**
 * SpectrumResult → the reference spectrum of shared/reference.ts (the CLI
 * --json contract and the scorer's input), with a sha256 hash of the canonical
 * JSON of method, rank, n, m and eigenvalues.
 */
import { createHash } from 'node:crypto';
import { referenceSpectrum, type ReferenceEigenvalue, type ReferenceSpectrum } from '../../shared/reference.js';
import { backend } from '../linalg/backend.js';
import { ENGINE_VERSION } from './finalize.js';
import { exactDmd } from './dmd.js';
import { edmd } from './edmd.js';
import { kernelEdmd } from './kernel-edmd.js';
import type { DmdOptions, EdmdOptions, KernelEdmdOptions, PairSource, SpectrumResult } from './types.js';

export { ENGINE_VERSION };

export interface ReferenceMeta {
  /** Defaults to ENGINE_VERSION. */
  engineVersion?: string;
  /** Extra options to record (dataset name, scenario, seed, …). */
  options?: Record<string, unknown>;
  /** The linear-algebra backend that computed the result; defaults to the one in use now (backend().name). */
  backend?: string;
}

/** JSON with object keys sorted at every level, no whitespace. */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') return JSON.stringify(value) ?? 'null';
  if (Array.isArray(value)) return `[${value.map((v) => canonicalJson(v)).join(',')}]`;
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj)
    .filter((k) => obj[k] !== undefined)
    .sort();
  return `{${keys.map((k) => `${JSON.stringify(k)}:${canonicalJson(obj[k])}`).join(',')}}`;
}

/** sha256 (hex) of the canonical JSON of method, rank, n, m and eigenvalues. */
export function referenceHash(ref: Pick<ReferenceSpectrum, 'method' | 'rank' | 'n' | 'm' | 'eigenvalues'>): string {
  const body = canonicalJson({ method: ref.method, rank: ref.rank, n: ref.n, m: ref.m, eigenvalues: ref.eigenvalues });
  return createHash('sha256').update(body, 'utf8').digest('hex');
}

function finiteOrUndefined(v: number | undefined): number | undefined {
  return v !== undefined && Number.isFinite(v) ? v : undefined;
}

/** The reference spectrum of a result, validated against the zod schema. */
export function toReferenceSpectrum(result: SpectrumResult, meta: ReferenceMeta = {}): ReferenceSpectrum {
  const eigenvalues: ReferenceEigenvalue[] = result.eigenvalues.map((e) => {
    const out: ReferenceEigenvalue = {
      re: e.lambda.re,
      im: e.lambda.im,
      // JSON has no Infinity: a defective eigenvector basis records the largest double.
      condition: Number.isFinite(e.condition) ? e.condition : Number.MAX_VALUE,
    };
    const spread = finiteOrUndefined(e.spread);
    const amplitude = finiteOrUndefined(e.amplitude);
    const modeNorm = finiteOrUndefined(e.modeNorm);
    if (spread !== undefined) out.spread = spread;
    if (amplitude !== undefined) out.amplitude = amplitude;
    if (modeNorm !== undefined) out.modeNorm = modeNorm;
    if (e.sensitivity !== undefined) out.sensitivity = Number.isFinite(e.sensitivity) ? e.sensitivity : Number.MAX_VALUE;
    if (e.undetermined) {
      out.determined = false;
      out.undetermined = { reason: e.undetermined.reason, message: e.undetermined.message };
    } else if (e.sensitivity !== undefined || result.leastSquares) out.determined = true;
    if (e.resolvedFromRank !== undefined) out.resolvedFromRank = e.resolvedFromRank;
    if (e.bandDistances) out.bandDistances = e.bandDistances.map((d) => ({ rank: d.rank, distance: d.distance !== null && Number.isFinite(d.distance) ? d.distance : null }));
    return out;
  });
  const ref: ReferenceSpectrum = {
    method: result.method,
    rank: result.rank,
    n: result.n,
    m: result.m,
    eigenvalues,
    order: result.order,
    engineVersion: meta.engineVersion ?? ENGINE_VERSION,
    backend: meta.backend ?? backend().name,
    options: {
      ...result.options,
      truncationRule: result.truncation.rule,
      ...(result.truncation.threshold !== undefined ? { threshold: result.truncation.threshold } : {}),
      maxRank: result.maxRank,
      ...(result.cut ? { cut: result.cut } : {}),
      ...(result.notes.length ? { notes: result.notes } : {}),
      ...(meta.options ?? {}),
    },
  };
  if (result.dt !== undefined) {
    ref.dt = result.dt;
    ref.continuous = result.eigenvalues.map((e) => (e.continuous ? { re: e.continuous.re, im: e.continuous.im } : { re: null, im: null }));
  }
  if (result.rankBand) ref.rankBand = result.rankBand.ranks;
  if (result.sensitivity) ref.sensitivityModel = { ...result.sensitivity };
  if (result.leastSquares) {
    ref.dictionaryRank = result.leastSquares.dictionaryRank;
    ref.cutoff = result.leastSquares.cutoff;
  }
  ref.hash = referenceHash(ref);
  return referenceSpectrum.parse(ref);
}

/** Which method and options a reference is computed with (the same options the method functions take). */
export type ReferenceRequest =
  | { method: 'dmd'; options?: DmdOptions }
  | { method: 'edmd'; options: EdmdOptions }
  | { method: 'kernel-edmd'; options: KernelEdmdOptions };

/**
 * The full reference of a dataset: the spectrum with the rank band (DMD, kernel EDMD) and the measured
 * sensitivity (3 seeded float32-level draws) unless the options turn them off, as the zod-validated
 * reference format, plus the SpectrumResult it came from (modes, eigenfunctions, notes). No I/O: the
 * spectrum CLI and the server both call this.
 */
export async function computeReference(source: PairSource, request: ReferenceRequest, meta: ReferenceMeta = {}): Promise<{ reference: ReferenceSpectrum; result: SpectrumResult }> {
  let result: SpectrumResult;
  switch (request.method) {
    case 'dmd':
      result = await exactDmd(source, { ...request.options, sensitivity: request.options?.sensitivity ?? true });
      break;
    case 'edmd':
      result = await edmd(source, { ...request.options, sensitivity: request.options.sensitivity ?? true });
      break;
    case 'kernel-edmd':
      result = await kernelEdmd(source, { ...request.options, sensitivity: request.options.sensitivity ?? true });
      break;
  }
  return { reference: toReferenceSpectrum(result, meta), result };
}
