import { z } from 'zod';
import { scoreReport } from './score-report.js';

/**
 * Submissions, scores (append-only rows), flags, reviews, extensions,
 * regrades, the gradebook and release: the API bodies and responses.
 */

export const submissionStatuses = ['received', 'grading', 'scored', 'failed'] as const;
export type SubmissionStatus = (typeof submissionStatuses)[number];
export const submissionStatusLabels: Record<SubmissionStatus, string> = {
  received: 'Received, waiting for the autograder',
  grading: 'Being scored',
  scored: 'Scored',
  failed: 'Could not be scored (staff have been told)',
};

/** Pasted values: what a tool printed. */
export const pasteSubmissionBody = z.object({
  text: z.string().min(1, 'Paste the values your tool printed').max(2_000_000, 'At most 2 MB of text'),
});

export const createdSubmission = z.object({
  submission: z.object({ id: z.number().int(), status: z.enum(submissionStatuses), attempt: z.number().int() }),
});
export type CreatedSubmission = z.infer<typeof createdSubmission>;

/** One submitted value's status as the feedback policy 'status' allows: never a reference value. */
export const valueStatus = z.object({
  submitted: z.object({ re: z.number(), im: z.number() }),
  status: z.enum(['matched', 'near-miss', 'unmatched', 'not-graded']),
});
export type ValueStatus = z.infer<typeof valueStatus>;

export const scoreReasons = ['autograde', 'regrade', 'accept', 'override', 'return', 'second-look'] as const;
export type ScoreReason = (typeof scoreReasons)[number];
export const scoreReasonLabels: Record<ScoreReason, string> = {
  autograde: 'Scored by the autograder',
  regrade: 'Scored again by the autograder',
  accept: 'Accepted by staff',
  override: 'Points set by staff',
  return: 'Returned to the student',
  'second-look': 'Answer to a second-look request',
};

export const scoreRow = z.object({
  id: z.number().int(),
  points: z.number(),
  maxPoints: z.number(),
  /** Fraction of the points taken off for lateness (0…1), already applied to points. */
  latePenalty: z.number(),
  reason: z.enum(scoreReasons),
  author: z.string().nullable(),
  comment: z.string().nullable(),
  createdAt: z.string(),
  assignmentVersion: z.number().int(),
});
export type ScoreRow = z.infer<typeof scoreRow>;

export const flagRow = z.object({
  id: z.number().int(),
  code: z.string(),
  message: z.string(),
  /** Copy signals: the other student (staff only). */
  otherStudent: z.object({ id: z.number().int(), displayName: z.string() }).nullable().optional(),
  otherSubmissionId: z.number().int().nullable().optional(),
  open: z.boolean(),
});
export type FlagRow = z.infer<typeof flagRow>;

export const reviewRow = z.object({
  id: z.number().int(),
  kind: z.enum(['flag', 'second-look']),
  state: z.enum(['open', 'accepted', 'overridden', 'returned', 'answered']),
  requestComment: z.string().nullable(),
  decisionComment: z.string().nullable(),
  decidedBy: z.string().nullable(),
  decidedAt: z.string().nullable(),
  createdAt: z.string(),
});
export type ReviewRow = z.infer<typeof reviewRow>;

/** A submission as its student may see it (feedback policy and release applied). */
/** What every view of a submission shows. */
const submissionBase = z.object({
  id: z.number().int(),
  attempt: z.number().int(),
  status: z.enum(submissionStatuses),
  receivedAt: z.string(),
  fileName: z.string(),
  late: z.boolean(),
  daysLate: z.number().int(),
});

export const mySubmission = submissionBase.extend({
  /** Present when the policy shows a score, or after release. */
  points: z.number().optional(),
  maxPoints: z.number().optional(),
  provisional: z.boolean(),
  /** Policy 'status': each submitted value's status. */
  values: z.array(valueStatus).optional(),
  /** After release: the full report, with the student's own reference values. */
  report: scoreReport.optional(),
  /** Returned or answered by staff. */
  staffComment: z.string().nullable().optional(),
  reviews: z.array(reviewRow).optional(),
  canAskSecondLook: z.boolean().optional(),
});
export type MySubmission = z.infer<typeof mySubmission>;
export const mySubmissionsResponse = z.object({
  submissions: z.array(mySubmission),
  attemptsLeft: z.number().int(),
  dueAt: z.string(),
  /** The student's extension, if any. */
  extendedTo: z.string().nullable(),
  cutoffAt: z.string(),
  released: z.boolean(),
});
export type MySubmissionsResponse = z.infer<typeof mySubmissionsResponse>;

/** A submission as staff see it, whatever the feedback policy. */
export const staffSubmission = submissionBase.extend({
  student: z.object({ id: z.number().int(), displayName: z.string(), email: z.string() }),
  points: z.number().nullable(),
  maxPoints: z.number().nullable(),
  report: scoreReport.nullable(),
  message: z.string().nullable(),
  flags: z.array(flagRow),
  scores: z.array(scoreRow),
  reviews: z.array(reviewRow),
});
export type StaffSubmission = z.infer<typeof staffSubmission>;
export const staffSubmissionsResponse = z.object({ submissions: z.array(staffSubmission) });
export type StaffSubmissionsResponse = z.infer<typeof staffSubmissionsResponse>;

export const decisionBody = z
  .object({
    action: z.enum(['accept', 'override', 'return']),
    points: z.number().min(0).optional(),
    comment: z.string().trim().max(4000).default(''),
  })
  .refine((b) => b.action !== 'override' || (b.points !== undefined && b.comment.length > 0), {
    message: 'Setting the points needs the points and a comment that explains them',
    path: ['comment'],
  })
  .refine((b) => b.action !== 'return' || b.comment.length > 0, { message: 'Say what the student should change', path: ['comment'] });
export type DecisionBody = z.input<typeof decisionBody>;

export const secondLookBody = z.object({ comment: z.string().trim().min(5, 'Say what you would like looked at').max(4000) });
export const answerSecondLookBody = z.object({
  comment: z.string().trim().min(1, 'Write the answer').max(4000),
  points: z.number().min(0).optional(),
});

export const reviewQueueItem = z.object({
  reviewId: z.number().int(),
  kind: z.enum(['flag', 'second-look']),
  assignment: z.object({ id: z.number().int(), title: z.string() }),
  submissionId: z.number().int(),
  student: z.object({ id: z.number().int(), displayName: z.string() }),
  attempt: z.number().int(),
  points: z.number().nullable(),
  maxPoints: z.number().nullable(),
  /** Each reason in a sentence. */
  reasons: z.array(z.string()),
  createdAt: z.string(),
});
export type ReviewQueueItem = z.infer<typeof reviewQueueItem>;
export const reviewQueueResponse = z.object({ items: z.array(reviewQueueItem) });

export const extensionBody = z.object({
  userId: z.number().int().positive(),
  dueAt: z.iso.datetime({ offset: true, error: 'A date and time with its offset' }),
  comment: z.string().trim().max(1000).default(''),
});

export const regradeBody = z.object({ submissionId: z.number().int().positive().optional(), reason: z.string().trim().min(3, 'Say why').max(1000) });
export const regradeProgress = z.object({
  id: z.number().int(),
  total: z.number().int(),
  done: z.number().int(),
  failed: z.number().int(),
  state: z.enum(['running', 'finished']),
});
export type RegradeProgress = z.infer<typeof regradeProgress>;

export const gradebookCell = z.object({
  points: z.number().nullable(),
  maxPoints: z.number().nullable(),
  late: z.boolean(),
  flagged: z.boolean(),
  status: z.enum(['none', 'waiting', 'scored', 'failed']),
  submissionId: z.number().int().nullable(),
  /** Nothing handed in yet and the student's due date (with any extension) still ahead: not missing. */
  open: z.boolean(),
});
export const gradebookResponse = z.object({
  assignments: z.array(z.object({ id: z.number().int(), title: z.string(), maxPoints: z.number(), released: z.boolean() })),
  students: z.array(z.object({ id: z.number().int(), displayName: z.string(), email: z.string(), cells: z.array(gradebookCell) })),
  stats: z.array(
    z.object({
      assignmentId: z.number().int(),
      submitted: z.number().int(),
      mean: z.number().nullable(),
      median: z.number().nullable(),
      /** Counts of scores in ten equal bins from 0 to maxPoints. */
      histogram: z.array(z.number().int()),
    }),
  ),
});
export type GradebookResponse = z.infer<typeof gradebookResponse>;

export const dashboardResponse = z.object({
  assignments: z.array(
    z.object({
      id: z.number().int(),
      title: z.string(),
      status: z.string(),
      dueAt: z.string(),
      students: z.number().int(),
      submitted: z.number().int(),
      scored: z.number().int(),
      flagged: z.number().int(),
      waitingForReview: z.number().int(),
      released: z.boolean(),
      /** The next thing to do, in words. */
      next: z.string(),
    }),
  ),
});
export type DashboardResponse = z.infer<typeof dashboardResponse>;

export const releaseResponse = z.object({ releasedAt: z.string(), messages: z.number().int() });

/** Staff: a copy signal's evidence side by side (both spectra against both references). */
const evidenceSide = z.object({
  student: z.object({ id: z.number().int(), displayName: z.string() }),
  submissionId: z.number().int().nullable(),
  submitted: z.array(z.object({ re: z.number(), im: z.number() })),
  reference: z.array(z.object({ re: z.number(), im: z.number() })),
  /** Points of this side's submission against its own reference and against the other's. */
  pointsOwn: z.number().nullable(),
  pointsOther: z.number().nullable(),
  maxPoints: z.number(),
});
export const copyEvidence = z.object({ flagId: z.number().int(), sides: z.array(evidenceSide) });
export type CopyEvidence = z.infer<typeof copyEvidence>;
