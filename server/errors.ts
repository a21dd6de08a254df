import type { ErrorCode } from '../shared/errors.js';

/** A failure with an HTTP status and one of the stable error codes; the error middleware renders it. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: ErrorCode,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export const badRequest = (message: string, details?: unknown) => new HttpError(400, 'bad-request', message, details);
export const unauthenticated = (message = 'Sign in to continue') => new HttpError(401, 'unauthenticated', message);
export const forbidden = (message = 'You are not allowed to do that') => new HttpError(403, 'forbidden', message);
export const notFound = (message = 'Not found') => new HttpError(404, 'not-found', message);
export const conflict = (message: string, details?: unknown) => new HttpError(409, 'conflict', message, details);
