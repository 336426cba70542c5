import * as z from 'zod';
import { lazySchema } from './lazy-schema';

/** A page of a list and how many there are in all. */
export function pageOf<T extends z.ZodType>(item: T) {
  return z.object({ items: z.array(item), total: z.number() });
}

/** What every failed request answers. */
export const errorBodySchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    error: z.object({ code: z.string(), message: z.string(), details: z.unknown().optional() }),
  }),
);
export type ErrorBody = z.infer<typeof errorBodySchema>;
