import type { RequestHandler } from 'express';
import type { ParamsDictionary } from 'express-serve-static-core';
import type * as z from 'zod';
import { AppError } from './app-error';

/** Describe zod issues in one sentence a person can act on. */
export function describeIssues(issues: readonly z.core.$ZodIssue[]): string {
  return issues
    .map((issue) => (issue.path.length ? `${issue.path.join('.')}: ${issue.message}` : issue.message))
    .join('; ');
}

/**
 * Parse `req.body` with the schema at the boundary; the handler then sees typed, checked data: the
 * handler that follows in the same route gets `req.body` typed as the schema's output.
 */
export function validateBody<T extends z.ZodType>(
  schema: T,
): RequestHandler<ParamsDictionary, unknown, z.output<T>> {
  return (req, _res, next) => {
    const result = schema.safeParse(req.body ?? {});
    if (!result.success) {
      next(
        AppError.badRequest(`Invalid request: ${describeIssues(result.error.issues)}`, result.error.issues),
      );
      return;
    }
    req.body = result.data;
    next();
  };
}

/** Parse a route parameter as a positive integer id. */
export function idParam(value: unknown, what: string): number {
  const id = Number(value);
  if (!Number.isInteger(id) || id <= 0)
    throw AppError.badRequest(`${what} id must be a positive whole number.`);
  return id;
}
