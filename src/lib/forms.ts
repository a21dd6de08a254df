import type { z } from 'zod';

/** The first message for each top-level field of a failed zod parse, keyed by field name. */
export function fieldErrorsOf(error: z.ZodError): Record<string, string> {
  const errs: Record<string, string> = {};
  for (const issue of error.issues) errs[String(issue.path[0])] ??= issue.message;
  return errs;
}
