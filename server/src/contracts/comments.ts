import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { roleSchema } from './enums';

/** The longest comment, in characters (UTF-16 code units, as the browser's text field counts them). */
export const COMMENT_MAX_CHARS = 4000;

/** A new comment on a batch, or a reply to one of its comments that starts a thread. */
export const createCommentSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    text: z
      .string('write the comment as text')
      .trim()
      .min(1, 'write something first')
      .max(COMMENT_MAX_CHARS, `must be at most ${COMMENT_MAX_CHARS} characters`),
    /** The comment this one answers; it must open a thread of the same batch (replies are one level deep). */
    replyToId: z.number().int().positive().nullable().optional(),
  }),
);
export type CreateCommentRequest = z.input<typeof createCommentSchema>;

/**
 * One comment as the API sends it. A removed comment keeps its place in the thread with `text` null;
 * what it said stays in the audit trail only.
 */
export const batchCommentSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    batchId: z.number(),
    /** The comment that opens this one's thread; null for a comment that opens a thread. */
    replyToId: z.number().nullable(),
    authorId: z.number().nullable(),
    authorName: z.string(),
    /** The author's role when they wrote it. */
    authorRole: roleSchema,
    /** ISO 8601. */
    createdAt: z.string(),
    text: z.string().nullable(),
    removed: z.boolean(),
    removedAt: z.string().nullable(),
    removedBy: z.string().nullable(),
  }),
);
export type BatchComment = z.infer<typeof batchCommentSchema>;

/** A batch's comments in reading order: each thread's first comment, then its replies, oldest first. */
export const batchCommentListSchema = /* @__PURE__ */ lazySchema(() => z.array(batchCommentSchema));
