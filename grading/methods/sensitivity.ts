/**
 * Measured sensitivity of a spectrum (numerics.md, "Conditioning"): κ_j sees
 * only the reduced operator, so the spectrum is recomputed from the data
 * perturbed at the level of float32 rounding — each entry times (1 + δ), δ
 * uniform in [−2⁻²⁴, 2⁻²⁴] (the relative rounding error of IEEE single
 * precision), a few seeded draws — at the same rank, and each value's
 * deviation is the distance to its partner under optimal assignment, the
 * largest over the draws. A student who rounds the data to float32 and
 * computes in float64 is one more such draw.
 */
import { createRng } from '../scenarios/prng.js';
import type { Complex } from '../linalg/complex.js';
import { matchEigenvalues } from './spectrum.js';
import type { PairSource, Snapshots, SpectrumOptions, SpectrumResult } from './types.js';

/** Relative size of the perturbation: the unit round-off of float32. */
export const FLOAT32_LEVEL = 2 ** -24;
export const DEFAULT_DRAWS = 3;

export function sensitivitySettings(opts: SpectrumOptions): { draws: number; seed: number } | null {
  const s = opts.sensitivity;
  if (!s) return null;
  const draws = s === true ? DEFAULT_DRAWS : (s.draws ?? DEFAULT_DRAWS);
  const seed = s === true ? 1 : (s.seed ?? 1);
  if (!(Number.isInteger(draws) && draws >= 1 && draws <= 20)) throw new RangeError(`sensitivity draws must be an integer from 1 to 20, got ${draws}`);
  if (!Number.isFinite(seed)) throw new RangeError(`sensitivity seed must be a number, got ${seed}`);
  return { draws, seed };
}

function perturbed(s: Snapshots, rng: ReturnType<typeof createRng>): Snapshots {
  const len = s.n * s.k;
  const data = new Float64Array(len);
  const src = s.data;
  for (let i = 0; i < len; i++) data[i] = src[i] * (1 + FLOAT32_LEVEL * (2 * rng.uniform() - 1));
  return { data, n: s.n, k: s.k };
}

/** A copy of the source with every entry times (1 + δ), δ uniform in ±2⁻²⁴; one trajectory is perturbed once (X and Y share it). */
export function perturbSource(source: PairSource, seed: number, draw: number): PairSource {
  const rng = createRng(((seed * 1_000_003) ^ (draw * 7919 + 17)) >>> 0);
  switch (source.kind) {
    case 'trajectory':
      return { kind: 'trajectory', snapshots: perturbed(source.snapshots, rng) };
    case 'trajectories':
      return { kind: 'trajectories', list: source.list.map((s) => perturbed(s, rng)) };
    case 'pairs':
      return { kind: 'pairs', x: perturbed(source.x, rng), y: perturbed(source.y, rng) };
  }
}

/** Largest distance of each reference value to its optimally assigned partner in each perturbed spectrum. */
export function deviations(reference: readonly Complex[], perturbedSpectra: readonly (readonly Complex[])[]): number[] {
  const dev = reference.map(() => 0);
  for (const other of perturbedSpectra) {
    const match = matchEigenvalues(reference, other);
    match.forEach((j, i) => {
      const d = j >= 0 ? Math.hypot(reference[i].re - other[j].re, reference[i].im - other[j].im) : Infinity;
      dev[i] = Math.max(dev[i], d);
    });
  }
  return dev;
}

/**
 * Fill in `sensitivity` of every eigenvalue of `result` (conjugate partners share the larger one) from
 * `rerun`, which computes the eigenvalues of a perturbed source at the same rank with the same settings.
 * The perturbed copies are made one at a time and dropped after use.
 */
export async function measureSensitivity(result: SpectrumResult, source: PairSource, opts: SpectrumOptions, rerun: (s: PairSource) => Promise<Complex[]>): Promise<void> {
  const settings = sensitivitySettings(opts);
  if (!settings) return;
  const spectra: Complex[][] = [];
  for (let d = 0; d < settings.draws; d++) spectra.push(await rerun(perturbSource(source, settings.seed, d)));
  const dev = deviations(
    result.eigenvalues.map((e) => e.lambda),
    spectra,
  );
  result.eigenvalues.forEach((e, i) => {
    e.sensitivity = e.partner >= 0 ? Math.max(dev[i], dev[e.partner]) : dev[i];
  });
  result.sensitivity = { model: 'float32-rounding', level: FLOAT32_LEVEL, draws: settings.draws, seed: settings.seed };
}
