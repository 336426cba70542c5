import { type PublicUser, publicUserSchema } from '@equilight/contracts';

export type { Role } from '@equilight/contracts';
export { ROLE_LABELS } from '@equilight/contracts';

/** A person as the API shows them. */
export type User = PublicUser;

/** Check the shape of a user where it arrives from the API. */
export function isUser(value: unknown): value is User {
  return publicUserSchema.safeParse(value).success;
}
