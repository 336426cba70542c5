import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { pageOf } from './common';
import { emailSchema } from './users';

export const notificationSettingsSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    batchComplete: z.boolean().optional(),
    qcFailure: z.boolean().optional(),
    batchApproved: z.boolean().optional(),
  }),
);

export const forgotPasswordSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    email: emailSchema,
  }),
);

export const outboxQuerySchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    page: z.coerce.number().int().min(0).default(0),
    pageSize: z.coerce.number().int().min(1).max(200).default(25),
  }),
);

/** My notification settings (GET/PUT /api/me/notifications). */
export const notificationSettingsResponseSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    batchComplete: z.boolean(),
    qcFailure: z.boolean(),
    batchApproved: z.boolean(),
  }),
);

/** One message the local SMTP stand-in received. */
export const outboxMessageSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    from: z.string(),
    to: z.string(),
    subject: z.string(),
    text: z.string().nullable(),
    html: z.string().nullable(),
    rawSize: z.number(),
    receivedAt: z.string(),
  }),
);
export type OutboxMessageDto = z.infer<typeof outboxMessageSchema>;
export const outboxPageSchema = /* @__PURE__ */ lazySchema(() => pageOf(outboxMessageSchema));
export type OutboxPage = z.infer<typeof outboxPageSchema>;
export const outboxStatusSchema = /* @__PURE__ */ lazySchema(() => z.object({ standIn: z.boolean() }));

/** POST /api/auth/forgot-password answers the same for every address. */
export const acceptedSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({ status: z.literal('accepted'), message: z.string() }),
);
