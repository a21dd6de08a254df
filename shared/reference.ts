import { z } from 'zod';

/**
 * A reference spectrum: what `npm run -s spectrum -- DATA --json` prints and
 * what the scorer grades against. Required fields are the command-line
 * contract; optional fields are filled in by the engine where it computed
 * them (the server always stores the full form).
 */
export const complexValue = z.object({ re: z.number(), im: z.number() });
export type ComplexValue = z.infer<typeof complexValue>;

export const referenceEigenvalue = z.object({
  re: z.number(),
  im: z.number(),
  /** Eigenvalue condition number κ = ‖w‖‖v‖/|wᴴv| of the reduced operator. */
  condition: z.number(),
  /** Spread of this eigenvalue across the rank band (max distance to the value at rank r), if computed. */
  spread: z.number().optional(),
  /** |b_j| or ‖ξ_j‖·|b_j|, if computed. */
  amplitude: z.number().optional(),
  modeNorm: z.number().optional(),
  /**
   * Measured sensitivity: the largest distance this value moved when the spectrum was recomputed from the
   * data perturbed at float32-rounding level (see `sensitivityModel`). The scorer leaves a value whose
   * sensitivity reaches the assignment's tolerance out of grading ("undetermined").
   */
  sensitivity: z.number().nonnegative().optional(),
  /**
   * false when the data cannot determine this value whatever the tolerance (reason in `undetermined`);
   * absent or true otherwise. Whether the sensitivity reaches a tolerance depends on the assignment and is
   * decided by the scorer, not recorded here.
   */
  determined: z.boolean().optional(),
  undetermined: z.object({ reason: z.enum(['dictionary-rank']), message: z.string() }).optional(),
  /** Distance to this value's counterpart at each other rank of the band (null: no counterpart there). */
  bandDistances: z.array(z.object({ rank: z.number().int(), distance: z.number().nonnegative().nullable() })).optional(),
  /** The lowest rank of the band from which this value has a counterpart, when it has none below (not unstable). */
  resolvedFromRank: z.number().int().positive().optional(),
});
export type ReferenceEigenvalue = z.infer<typeof referenceEigenvalue>;

export const referenceSpectrum = z.object({
  method: z.enum(['dmd', 'edmd', 'kernel-edmd']),
  rank: z.number().int(),
  n: z.number().int(),
  m: z.number().int(),
  eigenvalues: z.array(referenceEigenvalue),
  /** log(λ)/dt, same order as eigenvalues; only when dt was given. λ = 0 gives re = -Infinity, written as null. */
  continuous: z.array(z.object({ re: z.number().nullable(), im: z.number().nullable() })).optional(),
  dt: z.number().positive().optional(),
  order: z.enum(['magnitude', 'amplitude', 'unit-circle', 'frequency']).optional(),
  /** The ranks of the sensitivity band, when computed. */
  rankBand: z.array(z.number().int()).optional(),
  engineVersion: z.string().optional(),
  /** The engine's linear-algebra backend that computed it ('openblas' or 'typescript'; grading/linalg/backend.ts). */
  backend: z.string().optional(),
  /** sha256 of the canonical JSON of method, rank, n, m and eigenvalues. */
  hash: z.string().optional(),
  /** Options the engine ran with (kernel, degree, …), for the record. */
  options: z.record(z.string(), z.unknown()).optional(),
  /** How `sensitivity` was measured: each data entry times (1 + δ), δ uniform in ±level, `draws` seeded draws. */
  sensitivityModel: z.object({ model: z.literal('float32-rounding'), level: z.number().positive(), draws: z.number().int().positive(), seed: z.number() }).optional(),
  /** EDMD: numerical rank of the dictionary on the data (pivoted QR of Ψ_X), out of `rank` functions. */
  dictionaryRank: z.number().int().nonnegative().optional(),
  /** EDMD: the relative cut-off of the least-squares solve that set `dictionaryRank`. */
  cutoff: z.number().positive().optional(),
});
export type ReferenceSpectrum = z.infer<typeof referenceSpectrum>;
