import { z } from 'zod';

export const notificationSettingsSchema = z.strictObject({
  batchComplete: z.boolean().optional(),
  qcFailure: z.boolean().optional(),
  batchApproved: z.boolean().optional(),
});

export const forgotPasswordSchema = z.strictObject({
  email: z.string().trim().toLowerCase().max(254).pipe(z.email('must be an e-mail address')),
});

export const outboxQuerySchema = z.strictObject({
  page: z.coerce.number().int().min(0).default(0),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
});
