export type Role = 'admin' | 'lab_manager' | 'scientist';

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  lab_manager: 'Lab manager',
  scientist: 'Scientist',
};

export interface User {
  id: number;
  email: string;
  displayName: string;
  role: Role;
  active: boolean;
}

/** Check the shape of a user where it arrives from the API. */
export function isUser(value: unknown): value is User {
  const v = value as Partial<User> | null;
  return (
    !!v &&
    typeof v.id === 'number' &&
    typeof v.email === 'string' &&
    typeof v.displayName === 'string' &&
    typeof v.role === 'string' &&
    v.role in ROLE_LABELS
  );
}
