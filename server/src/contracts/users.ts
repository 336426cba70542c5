import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { normaliseEmail } from './email-address';
import { roleSchema } from './enums';
import { ROLES } from './roles';

export const emailSchema = /* @__PURE__ */ lazySchema(() =>
  z
    .string()
    .transform(normaliseEmail)
    .pipe(z.string().max(254, 'must be at most 254 characters').pipe(z.email('must be an e-mail address'))),
);
const displayName = /* @__PURE__ */ lazySchema(() =>
  z.string().trim().min(1, 'is required').max(120, 'must be at most 120 characters'),
);
export const passwordSchema = /* @__PURE__ */ lazySchema(() =>
  z.string().min(10, 'must be at least 10 characters').max(200, 'must be at most 200 characters'),
);
const role = /* @__PURE__ */ lazySchema(() =>
  z.enum(ROLES, { message: `must be one of ${ROLES.join(', ')}` }),
);

export const createUserSchema = /* @__PURE__ */ lazySchema(() =>
  z.strictObject({
    email: emailSchema,
    displayName,
    role,
    /** Without a password the person is invited: they set one through a one-time link. */
    password: passwordSchema.optional(),
  }),
);
export type CreateUserInput = z.infer<typeof createUserSchema>;

export const updateUserSchema = /* @__PURE__ */ lazySchema(() =>
  z
    .strictObject({
      displayName: displayName.optional(),
      role: role.optional(),
      active: z.boolean().optional(),
    })
    .refine((v) => v.displayName !== undefined || v.role !== undefined || v.active !== undefined, {
      message: 'give at least one of displayName, role, active',
    }),
);
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

// ---------------------------------------------------------------------------------------------------
// Responses

/** A person as the API shows them (never a password hash). */
export const publicUserSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({
    id: z.number(),
    email: z.string(),
    displayName: z.string(),
    role: roleSchema,
    active: z.boolean(),
    /** Invited and no password set yet: they cannot sign in until they use their one-time link. */
    invited: z.boolean().default(false),
  }),
);
export type PublicUser = z.infer<typeof publicUserSchema>;

/** POST /api/users: the person and, for an invitation, the set-password link (shown once). */
export const createdUserSchema = /* @__PURE__ */ lazySchema(() =>
  z.object({ user: publicUserSchema, setPasswordUrl: z.string().optional() }),
);
