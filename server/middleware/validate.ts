import type { z } from 'zod';
import { badRequest } from '../errors.js';

export interface FieldProblem {
  path: string;
  message: string;
}

export function zodDetails(error: z.ZodError): FieldProblem[] {
  return error.issues.map((i) => ({ path: i.path.map(String).join('.') || '(body)', message: i.message }));
}

/** Parse a request body with a shared schema; a failure becomes 400 bad-request naming each field. */
export function parseBody<S extends z.ZodType>(schema: S, body: unknown): z.infer<S> {
  const result = schema.safeParse(body ?? {});
  if (!result.success) {
    const details = zodDetails(result.error);
    const fields = [...new Set(details.map((d) => d.path))].join(', ');
    throw badRequest(`Please check: ${fields}`, details);
  }
  return result.data;
}
