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
});
export type ReferenceSpectrum = z.infer<typeof referenceSpectrum>;
