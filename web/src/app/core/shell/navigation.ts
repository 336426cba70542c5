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
  { path: '/batches', label: 'Batches', icon: 'science', roles: ['admin', 'lab_manager', 'scientist'] },
  {
    path: '/temperatures',
    label: 'Temperatures',
    icon: 'device_thermostat',
    roles: ['admin', 'lab_manager', 'scientist'],
  },
  { path: '/intake', label: 'Intake', icon: 'move_to_inbox', roles: ['admin', 'lab_manager'] },
  { path: '/layouts', label: 'Layouts', icon: 'grid_on', roles: ['admin', 'lab_manager', 'scientist'] },
  {
    path: '/manifests',
    label: 'Manifests',
    icon: 'fact_check',
    roles: ['admin', 'lab_manager', 'scientist'],
  },
  { path: '/planner', label: 'Planner', icon: 'calculate', roles: ['admin', 'lab_manager', 'scientist'] },
  {
    path: '/instruments',
    label: 'Instruments',
    icon: 'precision_manufacturing',
    roles: ['admin', 'lab_manager'],
  },
  { path: '/people', label: 'People', icon: 'group', roles: ['admin'] },
  { path: '/outbox', label: 'Outbox', icon: 'outgoing_mail', roles: ['admin'] },
  { path: '/webhooks', label: 'Webhooks', icon: 'webhook', roles: ['admin'] },
  { path: '/api-docs', label: 'API', icon: 'api', roles: EVERYONE },
  { path: '/audit', label: 'Audit', icon: 'history', roles: ['admin', 'lab_manager'] },
];

export function navItemsFor(role: Role | undefined): NavItem[] {
  return role ? NAV_ITEMS.filter((item) => item.roles.includes(role)) : [];
}
