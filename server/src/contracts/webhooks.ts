import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { pageOf } from './common';
import { DELIVERY_STATUSES, WEBHOOK_EVENTS, deliveryStatusSchema, webhookEventSchema } from './enums';

const LOCAL_HOSTS = new Set(['localhost', '127.0.0.1', '[::1]']);

/** https anywhere; plain http only to this machine (a receiver under test), never across a network. */
export const webhookUrlSchema = /* @__PURE__ */ lazySchema(() =>
  z
    .string()
    .trim()
    .max(2048)
    .superRefine((value, ctx) => {
      let url: URL;
      try {
        url = new URL(value);
      } catch {
        ctx.addIssue({ code: 'custom', message: 'must be a full URL, e.g. https://lims.example.org/hooks' });
        return;
      }
      if (url.username || url.password) {
        ctx.addIssue({ code: 'custom', message: 'must not carry a user name or password' });
      } else if (url.protocol === 'http:') {
        if (!LOCAL_HOSTS.has(url.hostname))
          ctx.addIssue({
            code: 'custom',
            message: 'must use https; plain http is allowed only for localhost, 127.0.0.1 or [::1]',
          });
      } else if (url.protocol !== 'https:') {
        ctx.addIssue({ code: 'custom', message: 'must start with https://' });
      }
    }),
);

export const webhookEventsSchema = /* @__PURE__ */ lazySchema(() =>
  z
    .array(z.enum(WEBHOOK_EVENTS))
    .min(1, 'choose at least one event')
    .max(WEBHOOK_EVENTS.length)
    .refine((events) => new Set(events).size === events.length, 'each event once'),
);

/** Long enough to resist guessing; printable so it can be pasted into the receiver's settings. */
export const webhookSecretSchema = /* @__PURE__ */ lazySchema(() =>
  z
    .string()
    .min(16, 'must be at least 16 characters')
    .max(200)
    .regex(/^[\x21-\x7e]+$/, 'printable ASCII without spaces'),
);

export const createWebhookSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    url: webhookUrlSchema,
    secret: webhookSecretSchema,
    events: webhookEventsSchema,
  }),
);
export type CreateWebhookInput = z.infer<typeof createWebhookSchema>;
export type CreateWebhookRequest = z.input<typeof createWebhookSchema>;

export const updateWebhookSchema = /* @__PURE__ */ lazySchema(() =>
  z
    .strictObject({
      url: webhookUrlSchema.optional(),
      secret: webhookSecretSchema.optional(),
      events: webhookEventsSchema.optional(),
      active: z.boolean().optional(),
    })
    .refine((body) => Object.keys(body).length > 0, 'change at least one of url, secret, events, active'),
);
export type UpdateWebhookInput = z.infer<typeof updateWebhookSchema>;

export const deliveriesQuerySchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    webhookId: z.coerce.number().int().positive().optional(),
    status: z.enum(DELIVERY_STATUSES).optional(),
    page: z.coerce.number().int().min(0).default(0),
    pageSize: z.coerce.number().int().min(1).max(200).default(25),
  }),
);
export type DeliveriesQuery = z.infer<typeof deliveriesQuerySchema>;

// ---------------------------------------------------------------------------------------------------
// Responses

/** A registered receiver (the secret only masked: its last four characters), with delivery counts. */
export const webhookSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    url: z.string(),
    events: z.array(webhookEventSchema),
    active: z.boolean(),
    secretMasked: z.string(),
    createdAt: z.string(),
    updatedAt: z.string(),
    /** Deliveries by status, for the list. */
    counts: z.object({ pending: z.number(), delivered: z.number(), failed: z.number() }),
  }),
);
export type WebhookDto = z.infer<typeof webhookSchema>;

/** One attempt to tell a receiver of an event, with its payload. */
export const deliverySchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    eventId: z.string(),
    event: webhookEventSchema,
    webhookId: z.number(),
    url: z.string().nullable(),
    status: deliveryStatusSchema,
    attempts: z.number(),
    lastResponseCode: z.number().nullable(),
    lastError: z.string().nullable(),
    createdAt: z.string(),
    lastAttemptAt: z.string().nullable(),
    deliveredAt: z.string().nullable(),
    payload: z.unknown(),
  }),
);
export type DeliveryDto = z.infer<typeof deliverySchema>;
export const deliveriesPageSchema = /* @__PURE__ */ lazySchema(() => pageOf(deliverySchema));
export type DeliveriesPage = z.infer<typeof deliveriesPageSchema>;
