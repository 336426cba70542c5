import type { Role } from '../users/user.entity';
import type { UsersService } from '../users/users.service';

/** Demo-only accounts, one per role. Their password comes from DEMO_PASSWORD. */
export const DEMO_PEOPLE: ReadonlyArray<{ email: string; displayName: string; role: Role }> = [
  { email: 'admin@equilight.test', displayName: 'Ada Admin (demo)', role: 'admin' },
  { email: 'manager@equilight.test', displayName: 'Mika Manager (demo)', role: 'lab_manager' },
  { email: 'scientist@equilight.test', displayName: 'Sam Scientist (demo)', role: 'scientist' },
];

/** Seed the demo people into an empty database; a database that has anyone in it is left alone. */
export async function seedDemoPeople(users: UsersService, password: string): Promise<boolean> {
  if ((await users.count()) > 0) return false;
  for (const person of DEMO_PEOPLE) await users.create({ ...person, password });
  return true;
}
