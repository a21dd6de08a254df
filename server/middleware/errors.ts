import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { Logger } from 'pino';
import { z } from 'zod';
import type { ApiError, ErrorCode } from '../../shared/errors.js';
import { HttpError } from '../errors.js';
import { zodDetails } from './validate.js';

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new HttpError(404, 'not-found', `There is no API route ${req.method} ${req.baseUrl}${req.path}`));
};

function body(code: ErrorCode, message: string, details?: unknown): ApiError {
  return details === undefined ? { error: { code, message } } : { error: { code, message, details } };
}

/** The one error-handling middleware: every failure leaves as { error: { code, message, details? } }. */
export function errorHandler(logger: Logger): ErrorRequestHandler {
  return (err, req, res, next) => {
    if (res.headersSent) return next(err);
    const e = err as { status?: number; statusCode?: number; type?: string; code?: string; message?: string };
    let status = 500;
    let payload: ApiError;
    if (err instanceof HttpError) {
      status = err.status;
      payload = body(err.code, err.message, err.details);
    } else if (err instanceof z.ZodError) {
      status = 400;
      payload = body('bad-request', 'Some fields are not valid', zodDetails(err));
    } else if (e.code === 'EBADCSRFTOKEN') {
      status = 403;
      payload = body('csrf', 'The security token is missing or out of date; reload the page and try again');
    } else if (e.type === 'entity.too.large') {
      status = 413;
      payload = body('payload-too-large', 'The request body is too large');
    } else if (e.type === 'entity.parse.failed') {
      status = 400;
      payload = body('bad-request', 'The request body is not valid JSON');
    } else if (typeof (e.status ?? e.statusCode) === 'number' && (e.status ?? e.statusCode)! < 500) {
      status = (e.status ?? e.statusCode)!;
      payload = body(status === 404 ? 'not-found' : status === 403 ? 'forbidden' : 'bad-request', e.message ?? 'Bad request');
    } else {
      payload = body('internal', 'Something went wrong on the server; it has been logged');
    }
    if (status >= 500) logger.error({ err, method: req.method, path: req.path }, 'request failed');
    res.status(status).json(payload);
  };
}
