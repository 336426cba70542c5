import { z } from 'zod';
import { emailSchema } from '../users/users.schema';

export const notificationSettingsSchema = z.strictObject({
  batchComplete: z.boolean().optional(),
  qcFailure: z.boolean().optional(),
  batchApproved: z.boolean().optional(),
});

export const forgotPasswordSchema = z.strictObject({
  email: emailSchema,
});

export const outboxQuerySchema = z.strictObject({
  page: z.coerce.number().int().min(0).default(0),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
});
