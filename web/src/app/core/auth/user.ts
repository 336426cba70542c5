import type { PublicUser } from '@equilight/contracts';

export type { Role } from '@equilight/contracts';
export { ROLE_LABELS } from '@equilight/contracts';

/** A person as the API shows them. */
export type User = PublicUser;
