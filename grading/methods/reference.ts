/**
 * SpectrumResult → the reference spectrum of shared/reference.ts (the CLI
 * --json contract and the scorer's input), with a sha256 hash of the canonical
 * JSON of method, rank, n, m and eigenvalues.
 */
import { createHash } from 'node:crypto';
import { referenceSpectrum, type ReferenceEigenvalue, type ReferenceSpectrum } from '../../shared/reference.js';
import { backend } from '../linalg/backend.js';
import { ENGINE_VERSION } from './finalize.js';
import type { SpectrumResult } from './types.js';

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
  ref.hash = referenceHash(ref);
  return referenceSpectrum.parse(ref);
}
