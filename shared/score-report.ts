import { z } from 'zod';

/**
 * Grading settings (an assignment's tolerances and rules) and the score
 * report the scorer produces from them. Shared by the scorer, the server and
 * the client: a report carries everything needed to reproduce it.
 */

export const SCORER_VERSION = '0.2.1';

export const partKinds = ['eigenvalues', 'modes', 'eigenfunctions', 'prediction'] as const;
export const partKind = z.enum(partKinds);
export type PartKind = z.infer<typeof partKind>;

export const gradingPart = z.object({
  /** Name of the part in the submission (JSON key or file name stem), e.g. "eigenvalues". */
  name: z.string().min(1).max(64).regex(/^[A-Za-z][A-Za-z0-9_-]*$/, 'letters, digits, "_" and "-", starting with a letter'),
  kind: partKind,
  /** Points this part is worth. */
  weight: z.number().nonnegative().finite(),
  /**
   * modes/eigenfunctions: similarity |⟨a,b⟩|/(‖a‖‖b‖) at or above which a vector gets full credit,
   * and at or below which it gets none (linear in between).
   * prediction: relative error at or below which the prediction gets full credit, and at or above which none.
   */
  fullCreditAt: z.number().finite().optional(),
  zeroCreditAt: z.number().finite().optional(),
  /** modes/eigenfunctions: which reference eigenvalues (0-based indices) have their vector graded; default all that the reference carries. */
  referenceIndices: z.array(z.number().int().nonnegative()).optional(),
});
export type GradingPart = z.infer<typeof gradingPart>;

export const gradingSettings = z
  .object({
    /** Absolute tolerance on an eigenvalue, in the grading domain. */
    absTol: z.number().nonnegative().finite().default(1e-6),
    /** Relative tolerance: relTol × |λ| (or |ω| in the continuous domain). */
    relTol: z.number().nonnegative().finite().default(1e-3),
    /**
     * Tolerance term of a determined value: sensitivitySafety × its measured sensitivity. A determined value's
     * sensitivity is below the stated tolerance max(absTol, relTol·|λ|), so its tolerance is at most this many
     * times the stated one; keep it at or below 10 / zeroCreditMultiple so a value 10× the stated tolerance away
     * earns nothing.
     */
    sensitivitySafety: z.number().positive().finite().default(3),
    /** Only for references without measured sensitivities (engine before 1.1.0): allowance κ_j × perturbationScale (discrete λ units). */
    perturbationScale: z.number().nonnegative().finite().default(1e-8),
    /** A pair whose cost |λ_sub − λ_ref| / tol_ref is above this is left unmatched. */
    cutoffMultiple: z.number().positive().finite().default(10),
    /** Credit falls linearly from full at 1 × tolerance to zero at this multiple. */
    zeroCreditMultiple: z.number().gt(1).finite().default(3),
    domain: z.enum(['discrete', 'continuous']).default('discrete'),
    /** Time step for ω = log(λ)/dt; defaults to the reference's dt. */
    dt: z.number().positive().finite().optional(),
    conjugatePolicy: z.enum(['both-required', 'one-for-both']).default('both-required'),
    /** Each extra submitted eigenvalue costs this fraction of one eigenvalue's share (0: extras are free). */
    extraPenalty: z.number().nonnegative().finite().default(0),
    /**
     * A reference eigenvalue whose rank-band spread is above this (discrete λ units) is unstable. The spread is
     * taken from the rank at which the value is resolved (its counterparts within this limit up to r); the band
     * classifies, it never widens the tolerance of a stable value.
     */
    unstableSpreadLimit: z.number().nonnegative().finite().default(0.05),
    unstablePolicy: z.enum(['exclude', 'spread-as-tolerance']).default('spread-as-tolerance'),
    parts: z.array(gradingPart).min(1).default([{ name: 'eigenvalues', kind: 'eigenvalues', weight: 10 }]),
  })
  .refine((s) => s.cutoffMultiple >= s.zeroCreditMultiple, {
    message: 'cutoffMultiple must be at least zeroCreditMultiple',
    path: ['cutoffMultiple'],
  })
  .refine((s) => new Set(s.parts.map((p) => p.name)).size === s.parts.length, { message: 'part names must be unique', path: ['parts'] })
  .refine((s) => s.parts.filter((p) => p.kind === 'eigenvalues').length <= 1, {
    message: 'at most one eigenvalues part',
    path: ['parts'],
  })
  .refine((s) => s.parts.every((p) => p.kind === 'prediction' || p.kind === 'eigenvalues') || s.parts.some((p) => p.kind === 'eigenvalues'), {
    message: 'modes and eigenfunctions are paired through eigenvalues, so an eigenvalues part is needed',
    path: ['parts'],
  });
/** Settings as stored (all defaults filled in). */
export type GradingSettings = z.output<typeof gradingSettings>;
/** Settings as written by an instructor (anything may be left out). */
export type GradingSettingsInput = z.input<typeof gradingSettings>;

export const flagCodes = [
  'near-miss',
  'missing-values',
  'extra-values',
  'wrong-domain',
  'conjugate-missing',
  'unstable-reference',
  'reader-warning',
  'part-missing',
  'undetermined-reference',
] as const;
export const flagCode = z.enum(flagCodes);
export type FlagCode = z.infer<typeof flagCode>;

export const scoreFlag = z.object({
  code: flagCode,
  /** One human sentence. */
  message: z.string(),
  part: z.string().optional(),
});
export type ScoreFlag = z.infer<typeof scoreFlag>;

const complex = z.object({ re: z.number().finite(), im: z.number().finite() });

export const readerWarning = z.object({
  part: z.string(),
  file: z.string(),
  line: z.number().int().positive().optional(),
  column: z.number().int().positive().optional(),
  message: z.string(),
});
export type ReaderWarning = z.infer<typeof readerWarning>;

/** 'conditioning' only for references without measured sensitivities; 'spread' only for unstable values graded with their spread. */
export const toleranceSource = z.enum(['absolute', 'relative', 'sensitivity', 'conditioning', 'spread']);

export const eigenvalueMatch = z.object({
  submittedIndex: z.number().int().nonnegative(),
  referenceIndex: z.number().int().nonnegative(),
  /** Values in the grading domain. */
  submitted: complex,
  reference: complex,
  distance: z.number().nonnegative().finite(),
  tolerance: z.number().positive().finite(),
  /** Which term of the tolerance was the largest. */
  toleranceSource,
  /** distance / tolerance. */
  cost: z.number().nonnegative().finite(),
  /** 0…1. */
  credit: z.number().min(0).max(1),
  points: z.number().nonnegative().finite(),
  status: z.enum(['full', 'near-miss', 'no-credit', 'excluded']),
  unstable: z.boolean(),
  /** Under 'one-for-both': this value also stands for its conjugate partner (that reference index), whose points are included here. */
  coversConjugate: z.number().int().nonnegative().optional(),
  /** Measured sensitivity of the reference value in the grading domain, when the reference has it. */
  sensitivity: z.number().nonnegative().optional(),
  /** The rank from which the reference value is resolved in the band (it has no close counterpart below). */
  resolvedFromRank: z.number().int().positive().optional(),
  /** Why the credit is what it is, when the distance alone does not say it. */
  note: z.string().optional(),
});
export type EigenvalueMatch = z.infer<typeof eigenvalueMatch>;

export const missingValue = z.object({
  referenceIndex: z.number().int().nonnegative(),
  reference: complex,
  tolerance: z.number().positive().finite(),
  /** Distance to the nearest submitted value, if any was submitted. */
  nearestDistance: z.number().nonnegative().finite().optional(),
});
export const extraValue = z.object({ submittedIndex: z.number().int().nonnegative(), submitted: complex });
export const excludedValue = z.object({
  referenceIndex: z.number().int().nonnegative(),
  reference: complex,
  reason: z.string(),
  /** undetermined-dictionary | undetermined-sensitivity | unstable | no-continuous | not-finite */
  code: z.enum(['undetermined-dictionary', 'undetermined-sensitivity', 'unstable', 'no-continuous', 'not-finite']).optional(),
});

export const vectorComparison = z.object({
  referenceIndex: z.number().int().nonnegative(),
  /** Column of the submitted part paired with it (through the eigenvalue matching), if any. */
  submittedIndex: z.number().int().nonnegative().nullable(),
  /** |⟨a,b⟩|/(‖a‖‖b‖), phase- and scale-free. */
  similarity: z.number().min(0).max(1).nullable(),
  credit: z.number().min(0).max(1),
  points: z.number().nonnegative().finite(),
  note: z.string().optional(),
});

export const partReport = z.object({
  name: z.string(),
  kind: partKind,
  points: z.number().nonnegative().finite(),
  maxPoints: z.number().nonnegative().finite(),
  /** Whether the part was present in the submission. */
  submitted: z.boolean(),
  /** Domain the eigenvalues were graded in. */
  domain: z.enum(['discrete', 'continuous']).optional(),
  matches: z.array(eigenvalueMatch).default([]),
  missing: z.array(missingValue).default([]),
  extra: z.array(extraValue).default([]),
  excluded: z.array(excludedValue).default([]),
  /** Points deducted for extra values. */
  penalty: z.number().nonnegative().finite().default(0),
  vectors: z.array(vectorComparison).default([]),
  /** prediction: ‖p − ref‖/‖ref‖. */
  relativeError: z.number().nonnegative().finite().nullable().optional(),
  notes: z.array(z.string()).default([]),
});
export type PartReport = z.infer<typeof partReport>;

export const scoreReport = z.object({
  /** A score is provisional until staff release it. */
  status: z.literal('provisional'),
  points: z.number().nonnegative().finite(),
  maxPoints: z.number().nonnegative().finite(),
  parts: z.array(partReport),
  flags: z.array(scoreFlag),
  warnings: z.array(readerWarning),
  computedFrom: z.object({
    scorerVersion: z.string(),
    engineVersion: z.string().nullable(),
    referenceHash: z.string().nullable(),
    referenceMethod: z.string(),
    referenceRank: z.number().int(),
    /** The settings actually used, defaults filled in. */
    settings: gradingSettings,
    /** dt used for ω = log(λ)/dt, if any. */
    dt: z.number().positive().nullable(),
  }),
});
export type ScoreReport = z.infer<typeof scoreReport>;

/**
 * Extra reference data for mode, eigenfunction and prediction parts. The
 * reference file may carry these beside the spectrum: `modes[j]` and
 * `eigenfunctions[j]` belong to reference eigenvalue j (null when not
 * computed); `prediction` is the held-out snapshot.
 */
export const referenceExtras = z.object({
  modes: z.array(z.array(complex).nullable()).optional(),
  eigenfunctions: z.array(z.array(complex).nullable()).optional(),
  prediction: z.array(complex).optional(),
});
export type ReferenceExtras = z.infer<typeof referenceExtras>;
