import type * as z from 'zod';
import { type OperatorFunction, map } from 'rxjs';

/**
 * Checks an API answer with the route's response schema from `@equilight/contracts` and gives its
 * typed value; an answer of another shape is an error naming what was expected.
 */
export function parseResponse<S extends z.ZodType>(schema: S, what: string): (value: unknown) => z.infer<S> {
  return (value) => {
    const result = schema.safeParse(value);
    if (!result.success) {
      const issue = result.error.issues[0];
      const where = issue?.path.length ? ` (${issue.path.join('.')}: ${issue.message})` : '';
      throw new Error(`The server answered with an unexpected ${what}${where}.`);
    }
    return result.data;
  };
}

/** `parseResponse` as an RxJS operator: `http.get(url).pipe(parsed(schema, 'batch record'))`. */
export function parsed<S extends z.ZodType>(schema: S, what: string): OperatorFunction<unknown, z.infer<S>> {
  return map(parseResponse(schema, what));
}
