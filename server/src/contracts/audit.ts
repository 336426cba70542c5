import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { pageOf } from './common';
import { AUDIT_ENTITIES, auditEntitySchema } from './enums';

export const auditQuerySchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    entity: z.enum(AUDIT_ENTITIES).optional(),
    entityId: z.coerce.number().int().positive().optional(),
    actorId: z.coerce.number().int().positive().optional(),
    action: z.string().trim().max(30).optional(),
    from: z.iso.datetime({ offset: true }).optional(),
    to: z.iso.datetime({ offset: true }).optional(),
    q: z.string().trim().max(200).optional(),
    page: z.coerce.number().int().min(0).default(0),
    pageSize: z.coerce.number().int().min(1).max(500).default(50),
  }),
);
export type AuditQuery = z.input<typeof auditQuerySchema>;

/** One entry of the audit trail, as GET /api/audit sends it. */
export const auditEntrySchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    at: z.string(),
    actorId: z.number().nullable(),
    actorName: z.string(),
    action: z.string(),
    entity: auditEntitySchema,
    entityId: z.number(),
    summary: z.string(),
    before: z.unknown(),
    after: z.unknown(),
    reason: z.string().nullable(),
  }),
);
export type AuditDto = z.infer<typeof auditEntrySchema>;
export const auditPageSchema = /* @__PURE__ */ lazySchema(() => pageOf(auditEntrySchema));
export type AuditPage = z.infer<typeof auditPageSchema>;
