import { z } from 'zod';

/**
 * The HTTP contract between client and server. Every request body and
 * response is defined here once; both sides import it.
 *
 * Endpoints (all JSON, under /api):
 *   GET    /api/csrf                         -> csrfTokenResponse   (also sets the CSRF cookie)
 *   POST   /api/auth/sign-in     signInBody  -> meResponse
 *   POST   /api/auth/sign-out                -> 204
 *   GET    /api/auth/me                      -> meResponse (401 when signed out)
 *   POST   /api/auth/password    changePasswordBody -> 204
 *   POST   /api/users/:userId/can-teach  grantTeachingBody -> userSummary  (caller must be allowed to teach)
 *   GET    /api/courses                      -> courseListResponse   (courses the caller is enrolled in)
 *   POST   /api/courses          createCourseBody -> courseDetail   (caller must be allowed to teach)
 *   GET    /api/courses/:courseId            -> courseDetail         (any member)
 *   GET    /api/courses/:courseId/members    -> memberListResponse   (instructor or teaching assistant)
 *   GET    /api/courses/:courseId/enrollment -> enrollment           (the caller's own enrollment, any member)
 *   POST   /api/courses/:courseId/join-code  joinCodeBody -> courseDetail (instructor: rotate or disable)
 *   POST   /api/courses/join     joinCourseBody -> courseDetail      (any signed-in user; joins as student)
 *   GET    /api/dev/mail                     -> mailListResponse     (development and test only)
 *
 * Datasets and assignments (schemas in shared/assignment.ts), under /api/courses/:courseId:
 *   GET    /datasets                         -> datasetListResponse   (staff)
 *   POST   /datasets        multipart: file, fileY?, name, layout, dt -> datasetDetail (instructor; 413 over the limit,
 *                                                400 with the reader's located message at details[].path "file"/"fileY")
 *   POST   /datasets/scenario scenarioDatasetBody -> datasetDetail (instructor)
 *   GET    /datasets/:datasetId              -> datasetDetail         (staff)
 *   GET    /assignments                      -> assignmentListResponse (students: published and closed only, each with "mine": her due date, cut-off, attempts left, latest attempt; staff: with progress)
 *   POST   /assignments     assignmentConfig -> assignmentDetail (201, a draft; instructor)
 *   GET    /assignments/:assignmentId        -> assignmentDetail, with "task" for every member (the spectrum CLI's option names)
 *   PUT    /assignments/:assignmentId assignmentConfig -> assignmentDetail (instructor; a new version once published)
 *   POST   /assignments/:assignmentId/publish | /close -> assignmentDetail (instructor)
 *   GET    /assignments/:assignmentId/progress -> referenceProgress   (staff)
 *   POST   /assignments/:assignmentId/references/retry -> referenceProgress (instructor: failed references again)
 *   GET    /assignments/:assignmentId/preview  -> previewResponse     (staff: dataset-as-given reference, warnings, separation)
 *   GET    /assignments/:assignmentId/variants -> { variants: [...] } (staff)
 *   GET    /assignments/:assignmentId/reference?student=USER_ID -> referenceResponse (staff only; 403 for students)
 *   GET    /assignments/:assignmentId/dataset?format=npy|csv|json[&part=x|y][&student=USER_ID]
 *                                                -> the caller's own variant (students); staff name a student
 *
 * Submissions, review and release (schemas in shared/submission.ts), under /api/courses/:courseId:
 *   POST   /assignments/:assignmentId/submissions  multipart "file" or { text } -> 202 createdSubmission
 *                                                (422 with the located reader error, no attempt used; 409 no attempts left / cut-off passed)
 *   GET    /assignments/:assignmentId/submissions/mine -> mySubmissionsResponse (student; as the feedback policy allows)
 *   GET    /assignments/:assignmentId/submissions[?student=USER_ID] -> staffSubmissionsResponse (staff; reports, flags, score history)
 *   GET    /assignments/:assignmentId/submissions/:submissionId/evidence?flag=FLAG_ID -> copyEvidence (staff)
 *   POST   /assignments/:assignmentId/submissions/:submissionId/decision decisionBody -> 204 (staff: accept / override / return)
 *   POST   /assignments/:assignmentId/submissions/:submissionId/second-look secondLookBody -> 201 (student, after release)
 *   POST   /assignments/:assignmentId/extensions extensionBody -> 204 (instructor)
 *   POST   /assignments/:assignmentId/regrade regradeBody -> 202 regradeProgress (instructor); GET .../regrades/:regradeId (staff)
 *   POST   /assignments/:assignmentId/release      -> 202 { releasedAt, messages } (instructor; one mail per student through the outbox)
 *   GET    /reviews -> { items: reviewQueueItem[] } (staff); POST /reviews/:reviewId/answer answerSecondLookBody -> 204
 *   GET    /gradebook -> gradebookResponse; GET /gradebook.csv (staff; cells starting with = + - @ tab CR escaped)
 *   GET    /dashboard -> dashboardResponse (staff)
 *
 * State-changing requests carry the header `x-csrf-token` with the token from GET /api/csrf.
 */

export const roles = ['instructor', 'teaching_assistant', 'student'] as const;
export const roleSchema = z.enum(roles);
export type Role = z.infer<typeof roleSchema>;

/** Human labels, one place. */
export const roleLabels: Record<Role, string> = {
  instructor: 'Instructor',
  teaching_assistant: 'Teaching assistant',
  student: 'Student',
};

export const emailSchema = z.string().trim().toLowerCase().email('Enter a valid e-mail address').max(254);
export const passwordSchema = z.string().min(10, 'A password needs at least 10 characters').max(200);

export const signInBody = z.object({
  email: emailSchema,
  password: z.string().min(1, 'Enter your password').max(200),
});
export type SignInBody = z.infer<typeof signInBody>;

export const changePasswordBody = z.object({
  currentPassword: z.string().min(1).max(200),
  newPassword: passwordSchema,
});
export type ChangePasswordBody = z.infer<typeof changePasswordBody>;

export const userSummary = z.object({
  id: z.number().int(),
  email: z.string(),
  displayName: z.string(),
  canTeach: z.boolean(),
});
export type UserSummary = z.infer<typeof userSummary>;

export const meResponse = z.object({ user: userSummary });
export type MeResponse = z.infer<typeof meResponse>;

export const grantTeachingBody = z.object({ canTeach: z.boolean() });

export const csrfTokenResponse = z.object({ token: z.string() });

export const courseCodeSchema = z
  .string()
  .trim()
  .min(2)
  .max(20)
  .regex(/^[A-Za-z0-9][A-Za-z0-9 ._-]*$/, 'Letters, digits, space, dot, dash or underscore');

export const createCourseBody = z.object({
  title: z.string().trim().min(3, 'A title needs at least 3 characters').max(200),
  code: courseCodeSchema,
  term: z.string().trim().min(2).max(40),
});
export type CreateCourseBody = z.infer<typeof createCourseBody>;

export const courseSummary = z.object({
  id: z.number().int(),
  title: z.string(),
  code: z.string(),
  term: z.string(),
  role: roleSchema, // the caller's role in this course
  memberCount: z.number().int(),
});
export type CourseSummary = z.infer<typeof courseSummary>;

export const courseListResponse = z.object({ courses: z.array(courseSummary) });
export type CourseListResponse = z.infer<typeof courseListResponse>;

export const courseDetail = courseSummary.extend({
  /** Only present for instructors; null when joining is disabled. */
  joinCode: z.string().nullable().optional(),
  createdAt: z.string(),
});
export type CourseDetail = z.infer<typeof courseDetail>;

export const enrollment = z.object({
  courseId: z.number().int(),
  userId: z.number().int(),
  role: roleSchema,
  joinedAt: z.string(),
});
export type Enrollment = z.infer<typeof enrollment>;

export const member = z.object({
  userId: z.number().int(),
  displayName: z.string(),
  email: z.string(),
  role: roleSchema,
  joinedAt: z.string(),
});
export type Member = z.infer<typeof member>;
export const memberListResponse = z.object({ members: z.array(member) });
export type MemberListResponse = z.infer<typeof memberListResponse>;

export const joinCodeBody = z.object({ action: z.enum(['rotate', 'disable']) });
export const joinCourseBody = z.object({
  code: z.string().trim().min(4, 'Enter the join code your instructor gave you').max(40),
});
export type JoinCourseBody = z.infer<typeof joinCourseBody>;

export const mailMessage = z.object({
  id: z.string(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  receivedAt: z.string(),
});
export const mailListResponse = z.object({ messages: z.array(mailMessage) });
export type MailMessage = z.infer<typeof mailMessage>;

// --- Added by the server helper (append only) ---
export type MailListResponse = z.infer<typeof mailListResponse>;

/** `details` of a 400 bad-request error: one entry per field that failed (path is dotted, e.g. "email"). */
export const fieldProblem = z.object({ path: z.string(), message: z.string() });
export const validationDetails = z.array(fieldProblem);
export type FieldProblem = z.infer<typeof fieldProblem>;
