/**
 * Who a signed-in person is, and the role lists that recur in the route table and the pages. Kept apart
 * from the schemas (enums.ts): the browser's first script needs these words and not the schema library.
 */
export const ROLES = ['admin', 'lab_manager', 'scientist'] as const;
export type Role = (typeof ROLES)[number];
export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  lab_manager: 'Lab manager',
  scientist: 'Scientist',
};
export const EVERYONE: readonly Role[] = ROLES;
export const MANAGERS: readonly Role[] = ['admin', 'lab_manager'];
export const ADMIN_ONLY: readonly Role[] = ['admin'];
