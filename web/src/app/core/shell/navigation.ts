import { EVERYONE, rolesOf } from '@equilight/contracts';
import type { Role } from '../auth/user';

export interface NavItem {
  path: string;
  label: string;
  icon: string;
  roles: readonly Role[];
}

/**
 * Every page of the app, with who may open it: the roles of the API route whose data the page shows
 * (the contracts' route table), or everyone for pages that compute in the browser. The shell shows only
 * the entries of the signed-in role.
 */
export const NAV_ITEMS: readonly NavItem[] = [
  { path: '/', label: 'Overview', icon: 'space_dashboard', roles: EVERYONE },
  { path: '/batches', label: 'Batches', icon: 'science', roles: rolesOf('get', '/api/batches') },
  {
    path: '/temperatures',
    label: 'Temperatures',
    icon: 'device_thermostat',
    roles: rolesOf('get', '/api/temperatures'),
  },
  { path: '/intake', label: 'Intake', icon: 'move_to_inbox', roles: rolesOf('get', '/api/intake') },
  { path: '/layouts', label: 'Layouts', icon: 'grid_on', roles: rolesOf('get', '/api/layouts') },
  {
    path: '/manifests',
    label: 'Manifests',
    icon: 'fact_check',
    roles: rolesOf('get', '/api/manifests'),
  },
  { path: '/planner', label: 'Planner', icon: 'calculate', roles: EVERYONE },
  {
    path: '/instruments',
    label: 'Instruments',
    icon: 'precision_manufacturing',
    roles: rolesOf('get', '/api/instruments'),
  },
  { path: '/people', label: 'People', icon: 'group', roles: rolesOf('get', '/api/users') },
  { path: '/outbox', label: 'Outbox', icon: 'outgoing_mail', roles: rolesOf('get', '/api/outbox') },
  { path: '/webhooks', label: 'Webhooks', icon: 'webhook', roles: rolesOf('get', '/api/webhooks') },
  { path: '/api-docs', label: 'API', icon: 'api', roles: EVERYONE },
  { path: '/audit', label: 'Audit', icon: 'history', roles: rolesOf('get', '/api/audit') },
];

export function navItemsFor(role: Role | undefined): NavItem[] {
  return role ? NAV_ITEMS.filter((item) => item.roles.includes(role)) : [];
}
