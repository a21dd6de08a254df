import type { z } from 'zod';
import { apiErrorSchema } from '../../shared/errors';
import { csrfTokenResponse } from '../../shared/api';

/** A failed API call: HTTP status, the server's error code, a readable message and per-field messages. */
export class ApiError extends Error {
  readonly status: number;
  readonly code: string;
  readonly details: unknown;
  readonly fieldErrors: Record<string, string>;

  constructor(status: number, code: string, message: string, details?: unknown) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.details = details;
    this.fieldErrors = fieldErrorsFrom(details);
  }
}

/**
 * Reads per-field messages out of an error's `details`, whichever of the
 * usual shapes the server used: an array of `{ path, message }` (zod issues),
 * `{ fieldErrors: { name: [..] } }` (zod flatten), or `{ name: message }`.
 */
export function fieldErrorsFrom(details: unknown): Record<string, string> {
  const out: Record<string, string> = {};
  const put = (key: unknown, msg: unknown) => {
    const k = Array.isArray(key) ? key.join('.') : typeof key === 'string' ? key : '';
    const m = Array.isArray(msg) ? msg.filter((x) => typeof x === 'string').join(' ') : typeof msg === 'string' ? msg : '';
    if (k && m && !out[k]) out[k] = m;
  };
  if (Array.isArray(details)) {
    for (const d of details) if (d && typeof d === 'object') put((d as { path?: unknown; field?: unknown }).path ?? (d as { field?: unknown }).field, (d as { message?: unknown }).message);
  } else if (details && typeof details === 'object') {
    const o = details as Record<string, unknown>;
    const src = (o.fieldErrors ?? o.fields ?? o.issues ?? o) as unknown;
    if (Array.isArray(src)) return fieldErrorsFrom(src);
    if (src && typeof src === 'object') for (const [k, v] of Object.entries(src as Record<string, unknown>)) put(k, v);
  }
  return out;
}

const statusMessages: Record<number, string> = {
  401: 'You are signed out. Sign in again to continue.',
  403: 'You do not have access to this.',
  404: 'That could not be found.',
  413: 'That is larger than the site accepts.',
  429: 'Too many attempts in a short time. Wait a minute and try again.',
};

let csrfToken: Promise<string> | null = null;

/** The CSRF token from GET /api/csrf, fetched once and cached until the session changes. */
function getCsrfToken(): Promise<string> {
  if (!csrfToken) {
    csrfToken = request('GET', '/api/csrf', undefined, csrfTokenResponse, false).then((r) => r.token);
    csrfToken.catch(() => {
      csrfToken = null;
    });
  }
  return csrfToken;
}

/** Forget the cached CSRF token (after sign-in or sign-out the server issues a new one). */
export function resetCsrfToken() {
  csrfToken = null;
}

async function toApiError(res: Response): Promise<ApiError> {
  let body: unknown = null;
  try {
    body = await res.json();
  } catch {
    /* not JSON */
  }
  const parsed = apiErrorSchema.safeParse(body);
  if (parsed.success) {
    const { code, message, details } = parsed.data.error;
    return new ApiError(res.status, code, message || statusMessages[res.status] || `The server answered ${res.status}.`, details);
  }
  return new ApiError(
    res.status,
    res.status >= 500 ? 'internal' : 'unknown',
    statusMessages[res.status] ?? `The server answered ${res.status} ${res.statusText}. Try again in a moment.`,
  );
}

/**
 * fetch with the session cookie and, except for GET/HEAD, the CSRF header. A network failure
 * or an error answer becomes an ApiError; a stale CSRF token is renewed and the call made once more.
 */
async function send(method: string, path: string, headers: Record<string, string>, body: BodyInit | undefined, retryCsrf = true): Promise<Response> {
  const all: Record<string, string> = { accept: 'application/json', ...headers };
  if (method !== 'GET' && method !== 'HEAD') all['x-csrf-token'] = await getCsrfToken();
  let res: Response;
  try {
    res = await fetch(path, { method, headers: all, credentials: 'same-origin', body });
  } catch {
    throw new ApiError(0, 'network', 'Could not reach the Modewright server. Check your connection and try again.');
  }
  if (!res.ok) {
    const err = await toApiError(res);
    if (err.code === 'csrf' && retryCsrf) {
      resetCsrfToken();
      return send(method, path, headers, body, false);
    }
    throw err;
  }
  return res;
}

async function request<S extends z.ZodType>(method: string, path: string, body: unknown, schema: S | null, retryCsrf = true): Promise<z.infer<S>> {
  const hasBody = body !== undefined;
  const res = await send(method, path, hasBody ? { 'content-type': 'application/json' } : {}, hasBody ? JSON.stringify(body) : undefined, retryCsrf);
  if (schema === null || res.status === 204) return undefined as z.infer<S>;
  let json: unknown;
  try {
    json = await res.json();
  } catch {
    throw new ApiError(res.status, 'bad-response', `The server sent something that is not JSON for ${path}.`);
  }
  const parsed = schema.safeParse(json);
  if (!parsed.success) {
    throw new ApiError(res.status, 'bad-response', `The server's answer for ${path} did not have the expected shape.`, parsed.error.issues);
  }
  return parsed.data;
}

/** GET a JSON resource and check it against its schema. */
export function apiGet<S extends z.ZodType>(path: string, schema: S): Promise<z.infer<S>> {
  return request('GET', path, undefined, schema);
}

/** POST/PUT/PATCH/DELETE with the CSRF header; pass `null` as schema for 204 answers. */
export function apiSend<S extends z.ZodType>(method: 'POST' | 'PUT' | 'PATCH' | 'DELETE', path: string, body: unknown, schema: S): Promise<z.infer<S>>;
export function apiSend(method: 'POST' | 'PUT' | 'PATCH' | 'DELETE', path: string, body: unknown, schema: null): Promise<void>;
export function apiSend<S extends z.ZodType>(method: 'POST' | 'PUT' | 'PATCH' | 'DELETE', path: string, body: unknown, schema: S | null) {
  return request(method, path, body ?? {}, schema);
}

export function isApiError(e: unknown, status?: number): e is ApiError {
  return e instanceof ApiError && (status === undefined || e.status === status);
}

/**
 * POST a multipart form (file uploads) with the CSRF header; the browser sets the
 * multipart boundary. Errors come back as ApiError like every other call (413 included).
 */
export async function apiSendForm<S extends z.ZodType>(path: string, form: FormData, schema: S): Promise<z.infer<S>> {
  const res = await send('POST', path, {}, form);
  const parsed = schema.safeParse(await res.json().catch(() => null));
  if (!parsed.success) throw new ApiError(res.status, 'bad-response', `The server's answer for ${path} did not have the expected shape.`, parsed.error.issues);
  return parsed.data;
}
