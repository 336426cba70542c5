import type { Role } from '../auth/user';

export interface NavItem {
  path: string;
  label: string;
  icon: string;
  roles: readonly Role[];
}

const EVERYONE: readonly Role[] = ['admin', 'lab_manager', 'scientist'];

/** Every page of the app, with who may open it. The shell shows only the entries of the signed-in role. */
export const NAV_ITEMS: readonly NavItem[] = [
  { path: '/', label: 'Overview', icon: 'space_dashboard', roles: EVERYONE },
  { path: '/people', label: 'People', icon: 'group', roles: ['admin'] },
];

export function navItemsFor(role: Role | undefined): NavItem[] {
  return role ? NAV_ITEMS.filter((item) => item.roles.includes(role)) : [];
}
