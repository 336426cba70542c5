import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { normaliseEmail } from './email-address';
import { passwordSchema } from './users';

export const loginSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    email: z
      .string({ message: 'email is required' })
      .transform(normaliseEmail)
      .pipe(z.string().min(1, 'is required').max(254, 'must be at most 254 characters')),
    password: z
      .string({ message: 'password is required' })
      .min(1, 'is required')
      .max(200, 'must be at most 200 characters'),
  }),
);
export type LoginInput = z.infer<typeof loginSchema>;

export const setPasswordSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    token: z.string().min(20).max(200),
    password: passwordSchema,
  }),
);
export type SetPasswordInput = z.infer<typeof setPasswordSchema>;
