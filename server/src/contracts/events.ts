import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { batchStateSchema, intakeStatusSchema } from './enums';

/**
 * The live events of the WebSocket `/api/events`, one variant per `type`. `data` always names the
 * record by id; the other fields are optional because each role sees only part of an event
 * (server/src/events/event-access.ts).
 */
const event = <T extends string, D extends z.ZodRawShape>(type: T, data: D) =>
  z.object({
    type: z.literal(type),
    data: z.object({ id: z.number(), ...data }),
    /** ISO 8601 time the server sent it. */
    at: z.string(),
  });

export const liveEventSchema = /* @__PURE__ */ lazySchema(() =>
  z.discriminatedUnion('type', [
    event('file.received', {
      profileId: z.number().nullable().optional(),
      status: intakeStatusSchema.optional(),
    }),
    event('file.duplicate', { duplicateOfId: z.number().nullable().optional() }),
    event('file.stored', {
      profileId: z.number().nullable().optional(),
      readingCount: z.number().optional(),
      runId: z.string().nullable().optional(),
      batchId: z.number().nullable().optional(),
      status: z.enum(['stored', 'unassigned']).optional(),
    }),
    event('file.quarantined', { profileId: z.number().nullable().optional(), error: z.string().optional() }),
    event('batch.updated', { state: batchStateSchema.optional() }),
    /** A comment on a batch was added or removed; `id` is the comment's. */
    event('batch.comment', {
      batchId: z.number().optional(),
      change: z.enum(['added', 'removed']).optional(),
    }),
  ]),
);

export type LiveEvent = z.infer<typeof liveEventSchema>;
export type LiveEventType = LiveEvent['type'];
/** One variant of the union. */
export type LiveEventOf<T extends LiveEventType> = Extract<LiveEvent, { type: T }>;
/** What an event of this type carries. */
export type LiveEventData<T extends LiveEventType> = LiveEventOf<T>['data'];
