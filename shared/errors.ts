import { z } from 'zod';

/** Every API error has this body: `{ error: { code, message, details? } }`. */
export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.unknown().optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>;

/** Stable error codes used by the server and understood by the client. */
export const errorCodes = [
  'bad-request', // body or query failed validation; details lists the fields
  'unauthenticated', // 401: no session
  'forbidden', // 403: wrong role, or not a member of this course
  'not-found',
  'conflict', // e.g. e-mail already taken
  'csrf', // 403: missing or wrong CSRF token
  'rate-limited', // 429
  'payload-too-large', // 413
  'internal',
] as const;
export type ErrorCode = (typeof errorCodes)[number];
