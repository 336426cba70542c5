import { publicUserSchema } from '@equilight/contracts';
import type { User } from './user';

/** Check the shape of a user where it arrives from the API. */
export function isUser(value: unknown): value is User {
  return publicUserSchema.safeParse(value).success;
}
