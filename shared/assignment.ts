import { z } from 'zod';
import { gradingPart, partKinds } from './score-report.js';
import { referenceSpectrum } from './reference.js';

/**
 * Assignments: the instructor's configuration (one zod schema, stored as
 * validated JSON in every AssignmentVersion), datasets, variants, reference
 * jobs, and the API bodies and responses around them.
 *
 * Option names and meanings of the method follow the spectrum CLI
 * (`npm run -s spectrum -- --help`), so a student or a script can compute
 * exactly what is asked.
 */

export const assignmentStatuses = ['draft', 'published', 'closed'] as const;
export const assignmentStatus = z.enum(assignmentStatuses);
export type AssignmentStatus = z.infer<typeof assignmentStatus>;
export const assignmentStatusLabels: Record<AssignmentStatus, string> = {
  draft: 'Draft',
  published: 'Published',
  closed: 'Closed',
};

export const orderings = ['magnitude', 'amplitude', 'unit-circle', 'frequency'] as const;
export const orderingLabels: Record<(typeof orderings)[number], string> = {
  magnitude: 'by |λ|, largest first',
  amplitude: 'by mode amplitude, largest first',
  'unit-circle': 'by closeness to the unit circle',
  frequency: 'by frequency, lowest first',
};

const positive = (what: string) => z.number({ error: `${what} must be a number` }).positive(`${what} must be above 0`).finite();

/** How the truncation rank is chosen (the CLI's --rank, --energy, --rank-tol, --rank optimal). */
export const rankRule = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('rank'), rank: z.number().int('The rank is a whole number').min(1, 'The rank is at least 1').max(2000) }),
  z.object({ kind: z.literal('energy'), fraction: z.number().gt(0, 'Above 0').max(1, 'At most 1') }),
  z.object({ kind: z.literal('tolerance'), tol: z.number().min(0).lt(1, 'Below 1') }),
  z.object({ kind: z.literal('optimal') }),
]);
export type RankRuleConfig = z.infer<typeof rankRule>;

export function describeRankRule(r: RankRuleConfig): string {
  switch (r.kind) {
    case 'rank':
      return `rank ${r.rank}`;
    case 'energy':
      return `smallest rank keeping ${r.fraction} of Σσ²`;
    case 'tolerance':
      return `σᵢ > ${r.tol}·σ₁`;
    case 'optimal':
      return 'optimal hard threshold (Gavish & Donoho 2014)';
  }
}

/**
 * The engine's largest EDMD dictionary, the constant function included (grading/methods/dictionaries.ts,
 * `buildDictionary`'s default `maxSize`, and EdmdOptions.maxDictionarySize's default).
 */
export const maxDictionaryFunctions = 2000;
/** Radial centres allowed: one function each, plus the constant. */
export const maxRadialCentres = maxDictionaryFunctions - 1;
const centreLimit = `at most ${maxRadialCentres} centres: with the constant function the dictionary may have at most ${maxDictionaryFunctions} functions (the engine's limit)`;

export const edmdDictionaries = ['monomial', 'hermite', 'radial'] as const;
export type EdmdDictionary = (typeof edmdDictionaries)[number];

/**
 * Which snapshots of X are the centres of a Gaussian radial dictionary, by 0-based column index of X
 * (a single trajectory D gives X = D[:, 0:m], its last snapshot is never a centre; explicit pairs: the
 * columns of X). Taken from each student's own variant, so every student rebuilds her centres exactly.
 * - every: columns 0, step, 2·step, … of X;
 * - indices: the listed columns, in the order given.
 */
export const centreRule = z.discriminatedUnion(
  'kind',
  [
    z.object({
      kind: z.literal('every'),
      step: z.number({ error: 'Enter a whole number' }).int('The step is a whole number').min(1, 'The step is at least 1 (every snapshot)').max(1_000_000, 'At most 1 000 000'),
    }),
    z.object({
      kind: z.literal('indices'),
      indices: z
        .array(z.number({ error: 'Enter whole numbers separated by commas' }).int('Snapshot indices are whole numbers').min(0, 'Indices start at 0, the first snapshot of X'))
        .min(1, 'Give at least one snapshot index')
        .max(maxRadialCentres, `Too many: ${centreLimit}`)
        .superRefine((list, ctx) => {
          const seen = new Map<number, number>();
          list.forEach((v, i) => {
            const first = seen.get(v);
            if (first !== undefined) ctx.addIssue({ code: 'custom', message: `Snapshot ${v} is listed twice (entries ${first + 1} and ${i + 1}): two equal centres make the dictionary rank-deficient` });
            else seen.set(v, i);
          });
        }),
    }),
  ],
  { error: 'Choose how the centres are taken: every s-th snapshot, or a list of snapshot indices' },
);
export type CentreRule = z.infer<typeof centreRule>;

/** The 0-based columns of X that a centre rule picks when X has `columns` columns (indices past the end are kept: the caller refuses them). */
export function centreIndices(rule: CentreRule, columns: number): number[] {
  if (rule.kind === 'indices') return rule.indices.slice();
  const out: number[] = [];
  for (let i = 0; i < columns; i += rule.step) out.push(i);
  return out;
}

const ordinal = (k: number) => {
  const t = k % 100;
  const s = t >= 11 && t <= 13 ? 'th' : k % 10 === 1 ? 'st' : k % 10 === 2 ? 'nd' : k % 10 === 3 ? 'rd' : 'th';
  return `${k}${s}`;
};

/** A centre rule in words, e.g. "every 20th snapshot of X from the first (0-based columns 0, 20, 40, …)". */
export function describeCentreRule(rule: CentreRule, columns?: number): string {
  if (rule.kind === 'every') {
    if (rule.step === 1) return 'every snapshot of X';
    const idx = columns !== undefined ? centreIndices(rule, columns) : [0, rule.step, 2 * rule.step];
    const shown = idx.slice(0, 3).join(', ') + (columns === undefined || idx.length > 3 ? ', …' : '');
    return `every ${ordinal(rule.step)} snapshot of X from the first (0-based columns ${shown}${columns !== undefined ? `; ${idx.length} centre${idx.length === 1 ? '' : 's'}` : ''})`;
  }
  const n = rule.indices.length;
  return `the snapshot${n === 1 ? '' : 's'} of X at 0-based column${n === 1 ? '' : 's'} ${rule.indices.slice(0, 12).join(', ')}${n > 12 ? `, … (${n} centres)` : ''}`;
}

const present = (v: unknown) => v !== undefined && v !== null;

export const methodConfig = z.discriminatedUnion('method', [
  z.object({ method: z.literal('dmd'), rankRule }),
  z
    .object({
      method: z.literal('edmd'),
      dictionary: z.enum(edmdDictionaries, { error: 'Choose monomials, Hermite polynomials or Gaussian radial functions' }),
      /** Monomials and Hermite polynomials: total degree. */
      degree: z.number({ error: 'Enter a whole number' }).int('Enter a whole number').min(1, 'Degree 1 or more').max(6, 'Degree 6 at most').optional(),
      /** Radial functions: width σ in exp(−‖x − c‖²/(2σ²)). */
      sigma: positive('σ').optional(),
      /** Radial functions: which snapshots of X are the centres. */
      centres: centreRule.optional(),
    })
    // `when`: these run even when another field of the method has an error, so every missing field is named at once.
    .superRefine(
      (m, ctx) => {
        if ((m.dictionary === 'monomial' || m.dictionary === 'hermite') && !present(m.degree)) ctx.addIssue({ code: 'custom', message: 'Give the total degree of the dictionary', path: ['degree'] });
        if (m.dictionary === 'radial') {
          if (!present(m.sigma)) ctx.addIssue({ code: 'custom', message: 'Radial functions need their width σ', path: ['sigma'] });
          if (!present(m.centres)) ctx.addIssue({ code: 'custom', message: 'Radial functions need their centres: every s-th snapshot of X, or a list of snapshot indices', path: ['centres'] });
        }
      },
      { when: (p) => typeof p.value === 'object' && p.value !== null },
    ),
  z
    .object({
      method: z.literal('kernel-edmd'),
      kernel: z.enum(['linear', 'polynomial', 'gaussian']),
      degree: z.number().int().min(1).max(10).optional(),
      coef0: z.number().finite().optional(),
      gamma: positive('γ').optional(),
      sigma: positive('σ').optional(),
      rankRule,
    })
    .refine((m) => m.kernel !== 'gaussian' || m.sigma !== undefined, { message: 'A Gaussian kernel needs its width σ', path: ['sigma'] })
    .refine((m) => m.rankRule.kind === 'rank' || m.rankRule.kind === 'tolerance', {
      message: 'Kernel EDMD truncates by a given rank or a tolerance',
      path: ['rankRule'],
    }),
]);
export type MethodConfig = z.infer<typeof methodConfig>;

export const feedbackPolicies = ['nothing', 'score', 'status'] as const;
export const feedbackLabels: Record<(typeof feedbackPolicies)[number], string> = {
  nothing: 'Nothing until release',
  score: 'Score only',
  status: 'Score and each value’s status (matched, near miss, unmatched), never a reference value',
};

/** One part to hand in; eigenfunction values are asked at the first `points` snapshots of the student's own data. */
export const assignmentPart = gradingPart.extend({
  points: z.number().int().min(1).max(200).optional(),
});
export type AssignmentPart = z.infer<typeof assignmentPart>;

export const toleranceConfig = z.object({
  absTol: z.number().nonnegative().finite().default(1e-6),
  relTol: z.number().nonnegative().finite().default(1e-3),
  zeroCreditMultiple: z.number().gt(1, 'Above 1').max(100).default(3),
  cutoffMultiple: z.number().positive().max(1000).default(10),
  conjugatePolicy: z.enum(['both-required', 'one-for-both']).default('both-required'),
  extraPenalty: z.number().min(0).max(1).default(0),
  unstablePolicy: z.enum(['exclude', 'spread-as-tolerance']).default('exclude'),
  unstableSpreadLimit: z.number().nonnegative().finite().default(0.05),
});
export type ToleranceConfig = z.infer<typeof toleranceConfig>;

export const variantConfig = z.object({
  mode: z.enum(['same', 'per-student']).default('per-student'),
  /** Added white noise, relative to the data's RMS (uploads and scenarios). */
  noise: z.number().min(0).max(0.5, 'At most 0.5 of the RMS').default(0.001),
  /** Relative jitter of a scenario's physical parameters. */
  jitter: z.number().min(0).lt(0.2, 'Below 0.2').default(0.02),
});
export type VariantConfig = z.infer<typeof variantConfig>;

function validTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

/** The whole configuration of one assignment version. */
export const assignmentConfig = z
  .object({
    title: z.string().trim().min(3, 'A title needs at least 3 characters').max(200),
    statement: z.string().max(20_000, 'At most 20 000 characters').default(''),
    /** An instant with its offset, e.g. 2027-03-01T17:00:00+01:00. */
    dueAt: z.iso.datetime({ offset: true, error: 'A date and time with its offset' }),
    timeZone: z.string().refine(validTimeZone, 'Not a time zone name (e.g. Europe/Oslo)').default('UTC'),
    latePolicy: z
      .object({
        /** Percent of the points taken off per day late (started days count). */
        penaltyPerDay: z.number().min(0).max(100).default(10),
        /** No hand-in later than this many days after the due date (0: none after the due date). */
        cutoffDays: z.number().min(0).max(60).default(3),
      })
      .default({ penaltyPerDay: 10, cutoffDays: 3 }),
    attempts: z.number().int().min(1, 'At least one attempt').max(100).default(3),
    feedback: z.enum(feedbackPolicies).default('status'),
    datasetId: z.number({ error: 'Choose a dataset' }).int().positive(),
    variants: variantConfig.default({ mode: 'per-student', noise: 0.001, jitter: 0.02 }),
    method: methodConfig,
    /** Time step; defaults to the dataset's. */
    dt: positive('dt').optional(),
    order: z.enum(orderings).default('magnitude'),
    /** How many leading values are graded (conjugate pairs never split); all when absent. */
    top: z.number().int().min(1).max(500).optional(),
    domain: z.enum(['discrete', 'continuous']).default('discrete'),
    parts: z
      .array(assignmentPart)
      .min(1, 'At least one part')
      .default([{ name: 'eigenvalues', kind: 'eigenvalues', weight: 10 }]),
    tolerances: toleranceConfig.default(toleranceConfig.parse({})),
  })
  .refine((c) => new Set(c.parts.map((p) => p.name)).size === c.parts.length, { message: 'Part names must be different', path: ['parts'] })
  .refine((c) => c.parts.filter((p) => p.kind === 'eigenvalues').length === 1, {
    message: 'Exactly one eigenvalues part: modes and eigenfunctions are paired through it',
    path: ['parts'],
  })
  .refine((c) => !c.parts.some((p) => p.kind === 'eigenfunctions') || c.method.method !== 'dmd', {
    message: 'Exact DMD gives modes, not eigenfunction values; ask for modes instead',
    path: ['parts'],
  })
  .refine((c) => !c.parts.some((p) => p.kind === 'prediction'), { message: 'Prediction parts are not offered yet', path: ['parts'] })
  .refine((c) => c.tolerances.cutoffMultiple >= c.tolerances.zeroCreditMultiple, {
    message: 'The cut-off must be at least the zero-credit multiple',
    path: ['tolerances', 'cutoffMultiple'],
  });
export type AssignmentConfig = z.output<typeof assignmentConfig>;
export type AssignmentConfigInput = z.input<typeof assignmentConfig>;

export { partKinds };

/** The task as a student (or a script) reads it: the spectrum CLI's option names. */
export const taskSchema = z.object({
  method: z.enum(['dmd', 'edmd', 'kernel-edmd']),
  /** The integer rank used for the caller's own variant (EDMD: the dictionary size); null until it is known. */
  rank: z.number().int().nullable(),
  /** How the rank is chosen, in words, when the instructor chose a rule rather than a number. */
  rankRule: z.string().optional(),
  kernel: z.enum(['linear', 'polynomial', 'gaussian']).optional(),
  degree: z.number().int().optional(),
  coef0: z.number().optional(),
  gamma: z.number().optional(),
  sigma: z.number().optional(),
  dictionary: z.enum(edmdDictionaries).optional(),
  /**
   * Radial dictionary: its centres are these columns of X (0-based; MATLAB and Julia add 1) of the caller's
   * own data; the functions are 1 and exp(−‖x − X[:, i]‖²/(2σ²)) for each listed i, in this order.
   */
  centres: z
    .object({
      kind: z.enum(['every', 'indices']),
      /** kind 'every': the step. */
      step: z.number().int().optional(),
      /** 0-based column indices of X; null when the data's shape is not known. */
      indices: z.array(z.number().int()).nullable(),
      /** The rule in words. */
      description: z.string(),
    })
    .optional(),
  dt: z.number().optional(),
  order: z.enum(orderings),
  top: z.number().int().optional(),
  domain: z.enum(['discrete', 'continuous']),
  parts: z.array(z.object({ name: z.string(), kind: z.enum(partKinds), weight: z.number(), points: z.number().int().optional() })),
  /** The same task as spectrum CLI options. */
  cli: z.string(),
});
export type Task = z.infer<typeof taskSchema>;

// ------------------------------------------------------------------ datasets

export const datasetLayouts = ['columns', 'rows'] as const;
export const scenarioNamesList = ['linear-field', 'drift-map', 'wave-field', 'vibration'] as const;
export const scenarioLabels: Record<(typeof scenarioNamesList)[number], string> = {
  'linear-field': 'Linear field: three damped rotations and a decaying direction seen by 24 mixed sensors (one trajectory; suits exact DMD)',
  'drift-map': 'Drift map: one-step pairs of a planar map with a finite invariant subspace (pairs; suits EDMD and kernel EDMD)',
  'wave-field': 'Wave field: two travelling, decaying waves on a periodic grid of 64 points (one trajectory; suits exact DMD)',
  vibration: 'Vibration: four masses on springs with light damping, positions then velocities (one trajectory; suits exact DMD or EDMD)',
};

export const scenarioDatasetBody = z.object({
  name: z.string().trim().min(2).max(120),
  scenario: z.enum(scenarioNamesList),
  seed: z.number().int().min(0).max(2_147_483_647).default(1),
  noise: z.number().min(0).max(1).default(0),
  samples: z.number().int().min(10).max(20_000).optional(),
});
export type ScenarioDatasetBody = z.input<typeof scenarioDatasetBody>;

/** Form fields of the multipart upload (files in `file` and, for explicit pairs, `fileY`). */
export const uploadDatasetFields = z.object({
  name: z.string().trim().min(2, 'A name needs at least 2 characters').max(120),
  layout: z.enum(datasetLayouts).default('columns'),
  dt: z.coerce.number().positive('dt must be above 0').finite().optional(),
});

export const datasetSummary = z.object({
  id: z.number().int(),
  name: z.string(),
  source: z.enum(['upload', 'scenario']),
  format: z.enum(['npy', 'csv']),
  layout: z.enum(datasetLayouts),
  /** State dimension and number of snapshots (columns of X). */
  n: z.number().int(),
  snapshots: z.number().int(),
  pairs: z.boolean(),
  dt: z.number().nullable(),
  bytes: z.number().int(),
  sha256: z.string(),
  scenario: z.object({ name: z.enum(scenarioNamesList), seed: z.number().int(), noise: z.number(), samples: z.number().int().optional() }).nullable(),
  createdAt: z.string(),
});
export type DatasetSummary = z.infer<typeof datasetSummary>;

/** A few snapshots for the small picture: rows of the matrix (at most 64 states × 200 times). */
export const datasetPreview = z.object({
  kind: z.enum(['lines', 'heatmap']),
  /** Indices of the states shown (lines) or sampled (heatmap). */
  states: z.array(z.number().int()),
  /** Snapshot indices (time axis). */
  times: z.array(z.number().int()),
  /** values[s][t] for states[s] at times[t]. */
  values: z.array(z.array(z.number())),
});
export type DatasetPreview = z.infer<typeof datasetPreview>;

export const datasetDetail = datasetSummary.extend({ preview: datasetPreview });
export type DatasetDetail = z.infer<typeof datasetDetail>;
export const datasetListResponse = z.object({ datasets: z.array(datasetSummary), maxUploadBytes: z.number().int() });
export type DatasetListResponse = z.infer<typeof datasetListResponse>;

// ------------------------------------------------------------------ assignments

export const referenceStatuses = ['queued', 'running', 'ready', 'failed'] as const;
export type ReferenceStatus = (typeof referenceStatuses)[number];

export const referenceProgress = z.object({
  total: z.number().int(),
  ready: z.number().int(),
  failed: z.number().int(),
  /** Failed references with their stored message (staff only). */
  failures: z.array(z.object({ referenceId: z.number().int(), student: z.string().nullable(), message: z.string(), attempts: z.number().int() })),
});
export type ReferenceProgress = z.infer<typeof referenceProgress>;

export const assignmentSummary = z.object({
  id: z.number().int(),
  title: z.string(),
  status: assignmentStatus,
  dueAt: z.string(),
  timeZone: z.string(),
  version: z.number().int(),
  method: z.enum(['dmd', 'edmd', 'kernel-edmd']),
  publishedAt: z.string().nullable(),
  /** Staff only. */
  progress: referenceProgress.optional(),
  /** Students only: where the caller stands on this assignment. */
  mine: z
    .object({
      /** The caller's due date: an extension's when she has one. */
      dueAt: z.string(),
      /** No hand-in is accepted after this (her due date plus the late policy's cut-off days). */
      cutoffAt: z.string(),
      attemptsLeft: z.number().int(),
      /** The latest attempt that counts (returned ones do not); points only as the feedback policy allows before release. */
      latest: z
        .object({
          attempt: z.number().int(),
          status: z.enum(['received', 'grading', 'scored', 'failed']),
          late: z.boolean(),
          points: z.number().nullable(),
          maxPoints: z.number().nullable(),
        })
        .nullable(),
      released: z.boolean(),
    })
    .optional(),
});
export type AssignmentSummary = z.infer<typeof assignmentSummary>;
export const assignmentListResponse = z.object({ assignments: z.array(assignmentSummary) });
export type AssignmentListResponse = z.infer<typeof assignmentListResponse>;

export const variantInfo = z.object({
  id: z.number().int(),
  seed: z.number().int(),
  checksum: z.string().nullable(),
  /** Scenario parameters after jitter, or the noise level. */
  parameters: z.record(z.string(), z.number()),
});

export const assignmentDetail = assignmentSummary.extend({
  statement: z.string(),
  /** Every member: exactly what to compute. */
  task: taskSchema,
  latePolicy: z.object({ penaltyPerDay: z.number(), cutoffDays: z.number() }),
  attempts: z.number().int(),
  feedback: z.enum(feedbackPolicies),
  dataset: z.object({ n: z.number().int(), snapshots: z.number().int(), pairs: z.boolean(), layout: z.enum(datasetLayouts), dt: z.number().nullable() }),
  /** Students: their own variant (null until made). */
  variant: variantInfo.nullable().optional(),
  /** Staff: the full configuration of the current version and the dataset it uses. */
  config: z.unknown().optional(),
  datasetSummary: datasetSummary.optional(),
  versions: z.array(z.object({ version: z.number().int(), createdAt: z.string(), author: z.string().nullable(), altersReferences: z.boolean() })).optional(),
});
export type AssignmentDetail = z.infer<typeof assignmentDetail>;

export const saveAssignmentBody = assignmentConfig;

export const referenceResponse = z.object({
  status: z.enum(referenceStatuses),
  student: z.object({ id: z.number().int(), displayName: z.string() }).nullable(),
  variantId: z.number().int(),
  version: z.number().int(),
  message: z.string().nullable(),
  reference: referenceSpectrum.nullable(),
  /** Singular values (DMD), Gram eigenvalue roots (kernel EDMD), or Ψ_X's (EDMD), for the decay picture. */
  singularValues: z.array(z.number()).optional(),
  /**
   * How the scorer treats each reference value under the assignment's settings (same order as reference.eigenvalues):
   * graded with its tolerance, or left out as unstable (rank band) or undetermined (sensitivity, dictionary rank), with the reason.
   */
  classification: z
    .array(z.object({ state: z.enum(['graded', 'unstable', 'undetermined', 'other']), tolerance: z.number(), sensitivity: z.number().optional(), resolvedFromRank: z.number().int().optional(), reason: z.string().nullable() }))
    .optional(),
  /** Mode shapes of the graded values (real and imaginary parts), when the task has a modes part or for the preview. */
  modes: z.array(z.object({ re: z.array(z.number()), im: z.array(z.number()) }).nullable()).optional(),
});
export type ReferenceResponse = z.infer<typeof referenceResponse>;

/** What makes the task ill-posed, shown before publishing. */
export const taskWarning = z.object({
  code: z.enum(['dictionary-rank-deficient', 'undetermined-values', 'unstable-values', 'rank-too-high', 'separation', 'reference-failed']),
  message: z.string(),
});
export type TaskWarning = z.infer<typeof taskWarning>;

export const separationResult = z.object({
  /** Number of variants compared. */
  variants: z.number().int(),
  /** Smallest distance between two variants' graded eigenvalues, in units of their tolerance; null when fewer than two variants. */
  smallest: z.number().nullable(),
  pair: z.array(z.string()).optional(),
  warning: z.string().nullable(),
});
export type SeparationResult = z.infer<typeof separationResult>;

export const previewResponse = z.object({
  reference: referenceResponse.nullable(),
  warnings: z.array(taskWarning),
  separation: separationResult.nullable(),
});
export type PreviewResponse = z.infer<typeof previewResponse>;

export const datasetFormats = ['npy', 'csv', 'json'] as const;
/** The small JSON of a variant's metadata (format=json). */
export const variantMetadata = z.object({
  assignmentId: z.number().int(),
  variantId: z.number().int(),
  shape: z.array(z.number().int()),
  layout: z.enum(datasetLayouts),
  pairs: z.boolean(),
  dt: z.number().nullable(),
  sha256: z.string(),
  files: z.array(z.string()),
});
export type VariantMetadata = z.infer<typeof variantMetadata>;
