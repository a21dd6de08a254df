import { z } from 'zod';
import { emailSchema, passwordSchema, roleSchema } from './api.js';

/**
 * The HTTP contract for accounts, invitations, mail and the audit log (extends shared/api.ts).
 *
 *   POST /api/auth/sign-up                signUpBody -> 202 acceptedResponse (same answer whether or not the address has an account)
 *   POST /api/auth/sign-up/confirm        tokenBody -> 201 meResponse (creates the account and signs in)
 *   POST /api/auth/password-reset         passwordResetRequestBody -> 202 acceptedResponse (never tells whether the address exists)
 *   POST /api/auth/password-reset/complete passwordResetBody -> 204 (every session of the account ends)
 *   POST /api/auth/token-status           tokenStatusBody -> tokenStatus (is a link still good, before filling a form)
 *   POST /api/invitations/lookup          tokenBody -> invitationLookup
 *   POST /api/invitations/accept          acceptInvitationBody -> 200/201 acceptInvitationResponse
 *   GET  /api/courses/:courseId/invitations            -> invitationListResponse   (instructor)
 *   POST /api/courses/:courseId/invitations  createInvitationsBody -> 201 createInvitationsResponse (instructor)
 *   POST /api/courses/:courseId/invitations/:id/revoke -> invitation               (instructor)
 *   POST /api/courses/:courseId/members/:userId/role  changeRoleBody -> member     (instructor)
 *   GET  /api/courses/:courseId/outbox?state=unsent|failed|all -> outboxListResponse (instructor)
 *   POST /api/courses/:courseId/outbox/:id/retry       -> outboxMessage            (instructor; failed messages only)
 *   GET  /api/courses/:courseId/audit?action=&actor=&since=&before= -> auditListResponse (instructor)
 */

export const displayNameSchema = z.string().trim().min(2, 'A name needs at least 2 characters').max(120);

export const signUpBody = z.object({
  displayName: displayNameSchema,
  email: emailSchema,
  password: passwordSchema,
});
export type SignUpBody = z.infer<typeof signUpBody>;

export const acceptedResponse = z.object({ message: z.string() });
export type AcceptedResponse = z.infer<typeof acceptedResponse>;

/** A token from a link: 43 base64url characters (32 random bytes). */
export const tokenSchema = z
  .string()
  .trim()
  .regex(/^[A-Za-z0-9_-]{43}$/, 'This link is not complete; open it again from the e-mail (copy the whole address if needed)');
export const tokenBody = z.object({ token: tokenSchema });

export const passwordResetRequestBody = z.object({ email: emailSchema });
export type PasswordResetRequestBody = z.infer<typeof passwordResetRequestBody>;

export const passwordResetBody = z.object({ token: tokenSchema, newPassword: passwordSchema });
export type PasswordResetBody = z.infer<typeof passwordResetBody>;

export const tokenPurposeSchema = z.enum(['sign-up', 'invitation', 'password-reset']);
export const tokenStatusBody = z.object({ token: tokenSchema, purpose: tokenPurposeSchema });
export const tokenStates = ['valid', 'used', 'expired', 'revoked', 'unknown'] as const;
export const tokenStatus = z.object({
  state: z.enum(tokenStates),
  /** Present when state is valid: the address the link was sent to. */
  email: z.string().optional(),
  expiresAt: z.string().optional(),
});
export type TokenStatus = z.infer<typeof tokenStatus>;

// --- Invitations

export const invitableRoleSchema = z.enum(['student', 'teaching_assistant']);
export type InvitableRole = z.infer<typeof invitableRoleSchema>;

export const createInvitationsBody = z.object({
  emails: z.array(emailSchema).min(1, 'Enter at least one e-mail address').max(200, 'Invite at most 200 addresses at a time'),
  role: invitableRoleSchema,
});
export type CreateInvitationsBody = z.infer<typeof createInvitationsBody>;

/**
 * Addresses as people paste them: separated by commas, semicolons, spaces or lines; "Name <a@b>"
 * keeps the address. Every other piece is kept as typed (lowercased), so a typo is reported, never dropped.
 */
export function splitAddresses(text: string): string[] {
  const withoutNames = text.replace(/[^,;\n<>]*<([^<>]*)>/g, ' $1 ');
  const parts = withoutNames
    .split(/[\s,;]+/)
    .map((p) => p.trim().replace(/^mailto:/i, ''))
    .filter((p) => p.length > 0);
  return [...new Set(parts.map((p) => p.toLowerCase()))];
}

/** The invitations form: a pasted list, checked address by address. */
export const invitationsForm = z.object({
  addresses: z.string().superRefine((text, ctx) => {
    const list = splitAddresses(text);
    if (list.length === 0) ctx.addIssue({ code: 'custom', message: 'Enter at least one e-mail address' });
    if (list.length > 200) ctx.addIssue({ code: 'custom', message: `Invite at most 200 addresses at a time (this list has ${list.length})` });
    const bad = list.filter((a) => !emailSchema.safeParse(a).success);
    if (bad.length) ctx.addIssue({ code: 'custom', message: `Not an e-mail address: ${bad.slice(0, 5).join(', ')}${bad.length > 5 ? ` and ${bad.length - 5} more` : ''}` });
  }),
  role: invitableRoleSchema,
});
export type InvitationsForm = z.infer<typeof invitationsForm>;

export const invitationStates = ['pending', 'accepted', 'expired', 'revoked'] as const;
export type InvitationState = (typeof invitationStates)[number];

export const outboxStateSchema = z.enum(['queued', 'sending', 'sent', 'failed']);
export type OutboxStateName = z.infer<typeof outboxStateSchema>;

export const invitation = z.object({
  id: z.number().int(),
  email: z.string(),
  role: invitableRoleSchema,
  state: z.enum(invitationStates),
  invitedBy: z.string().nullable(),
  createdAt: z.string(),
  expiresAt: z.string(),
  acceptedAt: z.string().nullable(),
  /** The invitation e-mail: queued, sending, sent or failed (null when no message is recorded). */
  mail: z.object({ state: outboxStateSchema, lastError: z.string().nullable(), attempts: z.number().int() }).nullable(),
});
export type Invitation = z.infer<typeof invitation>;
export const invitationListResponse = z.object({ invitations: z.array(invitation) });

export const createInvitationsResponse = z.object({
  invitations: z.array(invitation),
  /** Addresses not invited, with the reason (already a member, say). */
  skipped: z.array(z.object({ email: z.string(), reason: z.string() })),
});
export type CreateInvitationsResponse = z.infer<typeof createInvitationsResponse>;

export const invitationLookup = z.object({
  state: z.enum(tokenStates),
  email: z.string().optional(),
  role: invitableRoleSchema.optional(),
  course: z.object({ id: z.number().int(), title: z.string(), code: z.string(), term: z.string() }).optional(),
  invitedBy: z.string().nullable().optional(),
  expiresAt: z.string().optional(),
  /** Whether an account with the invited address exists (so the page asks to sign in rather than sign up). */
  accountExists: z.boolean().optional(),
});
export type InvitationLookup = z.infer<typeof invitationLookup>;

export const acceptInvitationBody = z.object({
  token: tokenSchema,
  /** Only when signed out and the address has no account yet: the new account's name and password. */
  displayName: displayNameSchema.optional(),
  password: passwordSchema.optional(),
});
export type AcceptInvitationBody = z.infer<typeof acceptInvitationBody>;

/** The form on the invitation page for a new account (both fields required there). */
export const invitationSignUpForm = z.object({ displayName: displayNameSchema, password: passwordSchema });

export const acceptInvitationResponse = z.object({
  courseId: z.number().int(),
  role: roleSchema,
  /** True when this accept created the account (and signed it in). */
  accountCreated: z.boolean(),
});
export type AcceptInvitationResponse = z.infer<typeof acceptInvitationResponse>;

export const changeRoleBody = z.object({ role: roleSchema });

// --- Outbox

export const outboxMessage = z.object({
  id: z.number().int(),
  to: z.string(),
  subject: z.string(),
  kind: z.string().nullable(),
  state: outboxStateSchema,
  attempts: z.number().int(),
  lastError: z.string().nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  sentAt: z.string().nullable(),
});
export type OutboxMessageDto = z.infer<typeof outboxMessage>;
export const outboxFilterSchema = z.enum(['unsent', 'failed', 'all']);
export const outboxListResponse = z.object({
  messages: z.array(outboxMessage),
  counts: z.object({ queued: z.number().int(), sending: z.number().int(), sent: z.number().int(), failed: z.number().int() }),
});
export type OutboxListResponse = z.infer<typeof outboxListResponse>;

// --- Audit log

export const auditEvent = z.object({
  id: z.string(),
  createdAt: z.string(),
  action: z.string(),
  actor: z.object({ id: z.number().int(), displayName: z.string(), email: z.string() }).nullable(),
  subjectType: z.string(),
  subjectId: z.string().nullable(),
  before: z.unknown(),
  after: z.unknown(),
});
export type AuditEventDto = z.infer<typeof auditEvent>;

export const auditQuery = z.object({
  action: z.string().trim().max(60).optional(),
  actor: z.coerce.number().int().positive().optional(),
  since: z.iso.datetime({ offset: true }).or(z.iso.date()).optional(),
  /** Paging: events with an id below this one. */
  before: z.string().regex(/^[0-9]{1,18}$/).optional(),
  limit: z.coerce.number().int().min(1).max(500).optional(),
});
export type AuditQuery = z.infer<typeof auditQuery>;

export const auditListResponse = z.object({
  events: z.array(auditEvent),
  /** Id to pass as `before` for the next (older) page; null when this is the last. */
  nextBefore: z.string().nullable(),
  /** Every action and actor in this course's log, for the filters. */
  actions: z.array(z.string()),
  actors: z.array(z.object({ id: z.number().int(), displayName: z.string() })),
});
export type AuditListResponse = z.infer<typeof auditListResponse>;

/** Plain words for the actions recorded (others show their code). */
export const auditActionLabels: Record<string, string> = {
  'role.changed': 'Role changed',
  'join-code.rotated': 'Join code changed',
  'join-code.disabled': 'Joining turned off',
  'invitation.sent': 'Invitation sent',
  'invitation.revoked': 'Invitation withdrawn',
  'invitation.accepted': 'Invitation accepted',
  'mail.resent': 'Mail sent again',
};
